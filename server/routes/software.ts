import type { NextFunction, Request, Response, Router } from 'express';
import multer from 'multer';
import { compareVersions } from '../../shared/domain/software';
import {
  BaselineListQuerySchema,
  CreateBaselineSchema,
  CreateEcuSchema,
  EcuListQuerySchema,
  IMPORT_FILE_FIELD,
  IMPORT_MAX_BYTES,
  ImportBodySchema,
  ImportFormSchema,
  MatrixQuerySchema,
  RecordFlashSchema,
  ReflashDoneSchema,
  ReflashQuerySchema,
  ReleaseBaselineSchema,
  UpdateBaselineSchema,
  UpdateEcuSchema,
  VersionCompareQuerySchema,
} from '../../shared/schemas/software';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';
import { pathId } from '../lib/ids';
import { RouteTable } from '../lib/routes';
import { currentUser } from '../middleware/auth';
import { idempotent } from '../middleware/idempotency';
import * as catalogue from '../services/software-catalogue';
import { applyImport, parseJsonRows, parseReadoutFile, previewImport } from '../services/software-import';
import { getAssetSoftware, recordFlash } from '../services/software-installed';
import { reflashCsv, reflashDone, reflashList, softwareMatrix } from '../services/software-matrix';

/** PRODUCT.md section 2: integration engineers keep the ECU catalogue and the baselines; leads may too. */
const CATALOGUE_KEEPERS = ['engineer', 'lead'] as const;
/** Those who flash ECUs or record what is flashed. */
const FLASHERS = ['technician', 'engineer', 'lead'] as const;

/** One read-out file in memory (at most IMPORT_MAX_BYTES) in the form field `file`; multer's refusals become 400s naming the problem. */
const readoutUpload = (() => {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: IMPORT_MAX_BYTES, files: 1, fields: 4, fieldSize: 200, parts: 6 },
  }).single(IMPORT_FILE_FIELD);
  return (req: Request, res: Response, next: NextFunction) =>
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') {
        const message = `The file is larger than ${IMPORT_MAX_BYTES / 1024 / 1024} MB. Split the read-out and import each part.`;
        return next(new AppError(400, 'import/too-large', message, { fields: { [IMPORT_FILE_FIELD]: message } }));
      }
      const message = `Send one read-out file (CSV or JSON) in the form field "${IMPORT_FILE_FIELD}", with the fields programId and skipInvalid.`;
      next(new AppError(400, 'request/invalid', `${IMPORT_FILE_FIELD}: ${message}`, { fields: { [IMPORT_FILE_FIELD]: message } }));
    });
})();

/** The read-out of an import request: a multipart file, or a JSON body with `rows`. */
function readoutOf(req: Request) {
  if (req.is('multipart/form-data')) {
    const form = ImportFormSchema.parse(req.body ?? {});
    if (!req.file) {
      const message = `Attach the read-out file in the form field "${IMPORT_FILE_FIELD}".`;
      throw new AppError(400, 'request/invalid', `${IMPORT_FILE_FIELD}: ${message}`, { fields: { [IMPORT_FILE_FIELD]: message } });
    }
    return { programId: form.programId, skipInvalid: form.skipInvalid, parsed: parseReadoutFile(req.file), source: req.file.originalname || 'a file' };
  }
  const body = ImportBodySchema.parse(req.body);
  return { programId: body.programId, skipInvalid: body.skipInvalid, parsed: parseJsonRows(body.rows), source: 'rows sent as JSON' };
}

/**
 * ECU software configuration (issue 5; PRODUCT.md section 3D). Reading is open to every member
 * of the program; the catalogue and baselines to engineers and leads; recording flashes to the
 * people who flash. Another program's objects answer 404.
 */
export function softwareRoutes(_router: Router, deps: Deps, table: RouteTable) {
  const once = idempotent(deps);

  table.add({ method: 'get', path: '/calc/version-compare', access: 'user' }, async (req, res) => {
    const q = VersionCompareQuerySchema.parse(req.query);
    res.json(compareVersions(q.installed, q.target, q.range));
  });

  // ---- ECU catalogue
  table.add({ method: 'get', path: '/ecus', access: 'user' }, async (req, res) => {
    const { programId } = EcuListQuerySchema.parse(req.query);
    res.json(await catalogue.listEcus(deps, currentUser(req), programId));
  });
  table.add({ method: 'post', path: '/ecus', access: CATALOGUE_KEEPERS }, async (req, res) => {
    const body = CreateEcuSchema.parse(req.body);
    res.status(201).json(await catalogue.createEcu(deps, currentUser(req), body));
  });
  table.add({ method: 'patch', path: '/ecus/:id', access: CATALOGUE_KEEPERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This ECU');
    const body = UpdateEcuSchema.parse(req.body);
    res.json(await catalogue.updateEcu(deps, currentUser(req), id, body));
  });

  // ---- Baselines
  table.add({ method: 'get', path: '/baselines', access: 'user' }, async (req, res) => {
    const q = BaselineListQuerySchema.parse(req.query);
    res.json(await catalogue.listBaselines(deps, currentUser(req), q));
  });
  table.add({ method: 'post', path: '/baselines', access: CATALOGUE_KEEPERS }, async (req, res) => {
    const body = CreateBaselineSchema.parse(req.body);
    res.status(201).json(await catalogue.createBaseline(deps, currentUser(req), body));
  });
  table.add({ method: 'get', path: '/baselines/:id', access: 'user' }, async (req, res) => {
    res.json(await catalogue.getBaseline(deps, currentUser(req), pathId(req.params.id, 'This baseline')));
  });
  table.add({ method: 'patch', path: '/baselines/:id', access: CATALOGUE_KEEPERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This baseline');
    const body = UpdateBaselineSchema.parse(req.body);
    res.json(await catalogue.updateBaseline(deps, currentUser(req), id, body));
  });
  table.add({ method: 'delete', path: '/baselines/:id', access: CATALOGUE_KEEPERS }, async (req, res) => {
    await catalogue.deleteBaseline(deps, currentUser(req), pathId(req.params.id, 'This baseline'));
    res.status(204).end();
  });
  table.add({ method: 'post', path: '/baselines/:id/release', access: CATALOGUE_KEEPERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This baseline');
    const body = ReleaseBaselineSchema.parse(req.body);
    res.json(await catalogue.releaseBaseline(deps, currentUser(req), id, body));
  });
  table.add({ method: 'get', path: '/baselines/:id/diff/:otherId', access: 'user' }, async (req, res) => {
    const from = pathId(req.params.id, 'This baseline');
    const to = pathId(req.params.otherId, 'This baseline');
    res.json(await catalogue.diffBaselines(deps, currentUser(req), from, to));
  });

  // ---- Installed software
  table.add({ method: 'get', path: '/assets/:id/software', access: 'user' }, async (req, res) => {
    res.json(await getAssetSoftware(deps, currentUser(req), pathId(req.params.id, 'This asset')));
  });
  table.add({ method: 'put', path: '/assets/:id/software/:ecuId', access: FLASHERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This asset');
    const ecuId = pathId(req.params.ecuId, 'This ECU');
    const { version, ...body } = RecordFlashSchema.parse(req.body);
    res.json(await recordFlash(deps, currentUser(req), id, ecuId, { ...body, recordVersion: version }));
  });

  // ---- Import of a read-out
  table.add({ method: 'post', path: '/software/import/preview', access: FLASHERS }, readoutUpload, async (req, res) => {
    const { programId, parsed } = readoutOf(req);
    res.json(await previewImport(deps, currentUser(req), programId, parsed));
  });
  table.add({ method: 'post', path: '/software/import/apply', access: FLASHERS }, readoutUpload, once, async (req, res) => {
    const { programId, parsed, skipInvalid, source } = readoutOf(req);
    res.json(await applyImport(deps, currentUser(req), programId, parsed, skipInvalid, source));
  });

  // ---- Matrix and reflash list
  table.add({ method: 'get', path: '/software/matrix', access: 'user' }, async (req, res) => {
    const q = MatrixQuerySchema.parse(req.query);
    res.json(await softwareMatrix(deps, currentUser(req), q));
  });
  table.add({ method: 'get', path: '/software/reflash', access: 'user' }, async (req, res) => {
    const q = ReflashQuerySchema.parse(req.query);
    res.json(await reflashList(deps, currentUser(req), q));
  });
  table.add({ method: 'get', path: '/software/reflash.csv', access: 'user' }, async (req, res) => {
    const q = ReflashQuerySchema.parse(req.query);
    const { csv, filename } = await reflashCsv(deps, currentUser(req), q);
    res.set('Content-Type', 'text/csv; charset=utf-8');
    res.set('Content-Disposition', `attachment; filename="${filename}"`);
    res.send(csv);
  });
  table.add({ method: 'post', path: '/software/reflash/done', access: FLASHERS }, once, async (req, res) => {
    const body = ReflashDoneSchema.parse(req.body);
    res.json(await reflashDone(deps, currentUser(req), body));
  });
}
