import express, { type NextFunction, type Request, type Response, type Router } from 'express';
import multer from 'multer';
import { dewPoint, dewPointNote, roundTo } from '../../shared/domain/dew-point';
import { demonstratedReliability, successRunSampleSize } from '../../shared/domain/reliability';
import {
  CAMPAIGN_LOG_MAX_CHARS,
  CampaignListQuerySchema,
  CampaignLogSchema,
  CampaignProgressSchema,
  CreateAllocationSchema,
  CreateCampaignSchema,
  CreateValidationTestSchema,
  DemonstratedReliabilityQuerySchema,
  DewPointQuerySchema,
  REPORT_FIELD,
  REPORT_MAX_BYTES,
  SampleSizeQuerySchema,
  UpdateAllocationSchema,
  UpdateCampaignSchema,
  UpdateValidationTestSchema,
  ValidationTestListQuerySchema,
} from '../../shared/schemas/validation';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';
import { pathId } from '../lib/ids';
import { RouteTable } from '../lib/routes';
import { currentUser } from '../middleware/auth';
import { idempotent } from '../middleware/idempotency';
import * as campaigns from '../services/campaigns';
import * as validation from '../services/validation';

/** Who plans tests (PRODUCT.md section 2: engineers keep the configuration, leads run the gates). */
const PLANNERS = ['engineer', 'lead'] as const;
/** Who records results, reports and campaign hours: the planners and the garage technicians. */
const TESTERS = ['technician', 'engineer', 'lead'] as const;

/** One report in memory (at most REPORT_MAX_BYTES) in the form field `report`; multer's refusals become the API's errors. */
const reportUpload = (() => {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: REPORT_MAX_BYTES, files: 1, fields: 2, fieldSize: 200, parts: 4 },
  }).single(REPORT_FIELD);
  return (req: Request, res: Response, next: NextFunction) =>
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') {
        return next(
          new AppError(413, 'upload/too-large', `The report is larger than ${REPORT_MAX_BYTES / 1024 / 1024} MB. Send a smaller one.`, {
            fields: { [REPORT_FIELD]: 'Too large.' },
          }),
        );
      }
      next(
        new AppError(400, 'request/invalid', `${REPORT_FIELD}: Send one file in the form field "${REPORT_FIELD}".`, {
          fields: { [REPORT_FIELD]: `Send one file in the form field "${REPORT_FIELD}".` },
        }),
      );
    });
})();

/** A run log may come as a `text/csv` (or plain text) body; JSON `{ csv }` goes through the API's JSON parser. */
const csvBody = express.text({ type: ['text/csv', 'text/plain'], limit: CAMPAIGN_LOG_MAX_CHARS * 4 });

/**
 * The validation plan (DVP&R), test campaigns and their calculations (issue 7; PRODUCT.md
 * section 3F). Reading is open to every member of the program; another program's tests,
 * allocations, campaigns and assets answer 404.
 */
export function validationRoutes(_router: Router, deps: Deps, table: RouteTable) {
  const once = idempotent(deps);

  // ---- Calculations (pure; any signed-in user) ----

  table.add({ method: 'get', path: '/calc/sample-size', access: 'user' }, (req, res) => {
    const q = SampleSizeQuerySchema.parse(req.query);
    res.json(successRunSampleSize(q));
  });

  table.add({ method: 'get', path: '/calc/demonstrated-reliability', access: 'user' }, (req, res) => {
    const q = DemonstratedReliabilityQuerySchema.parse(req.query);
    res.json({ reliability: demonstratedReliability(q.samples, q.confidence, { testToLife: q.testToLife, shape: q.shape }) });
  });

  table.add({ method: 'get', path: '/calc/dew-point', access: 'user' }, (req, res) => {
    const q = DewPointQuerySchema.parse(req.query);
    const value = dewPoint(q.temperature, q.humidity);
    res.json({ dewPoint: roundTo(value, 2), note: dewPointNote(q.temperature, value) });
  });

  // ---- Validation plan ----

  table.add({ method: 'get', path: '/validation/tests', access: 'user' }, async (req, res) => {
    const query = ValidationTestListQuerySchema.parse(req.query);
    res.json(await validation.listTests(deps, currentUser(req), query));
  });

  table.add({ method: 'post', path: '/validation/tests', access: PLANNERS }, async (req, res) => {
    const body = CreateValidationTestSchema.parse(req.body);
    res.status(201).json(await validation.createTest(deps, currentUser(req), body));
  });

  table.add({ method: 'get', path: '/validation/tests/:id', access: 'user' }, async (req, res) => {
    res.json(await validation.getTest(deps, currentUser(req), pathId(req.params.id, 'This validation test')));
  });

  table.add({ method: 'patch', path: '/validation/tests/:id', access: PLANNERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This validation test');
    const body = UpdateValidationTestSchema.parse(req.body);
    res.json(await validation.updateTest(deps, currentUser(req), id, body));
  });

  table.add({ method: 'post', path: '/validation/tests/:id/allocations', access: PLANNERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This validation test');
    const body = CreateAllocationSchema.parse(req.body);
    res.status(201).json(await validation.allocateAsset(deps, currentUser(req), id, body));
  });

  table.add({ method: 'patch', path: '/validation/allocations/:id', access: TESTERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This allocation');
    const body = UpdateAllocationSchema.parse(req.body);
    res.json(await validation.updateAllocation(deps, currentUser(req), id, body));
  });

  table.add({ method: 'post', path: '/validation/allocations/:id/report', access: TESTERS }, reportUpload, once, async (req, res) => {
    const id = pathId(req.params.id, 'This allocation');
    res.status(201).json(await validation.uploadReport(deps, currentUser(req), id, req.file));
  });

  table.add({ method: 'get', path: '/validation/campaigns', access: 'user' }, async (req, res) => {
    const query = CampaignListQuerySchema.parse(req.query);
    res.json(await campaigns.listProgramCampaigns(deps, currentUser(req), query));
  });

  // ---- Test campaigns ----

  table.add({ method: 'get', path: '/assets/:id/campaigns', access: 'user' }, async (req, res) => {
    res.json(await campaigns.listAssetCampaigns(deps, currentUser(req), pathId(req.params.id, 'This asset')));
  });

  table.add({ method: 'post', path: '/assets/:id/campaigns', access: TESTERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This asset');
    await campaigns.assertCampaignAsset(currentUser(req), id);
    const body = CreateCampaignSchema.parse(req.body);
    res.status(201).json(await campaigns.createCampaign(deps, currentUser(req), id, body));
  });

  table.add({ method: 'get', path: '/campaigns/:id', access: 'user' }, async (req, res) => {
    res.json(await campaigns.getCampaign(deps, currentUser(req), pathId(req.params.id, 'This campaign')));
  });

  table.add({ method: 'patch', path: '/campaigns/:id', access: TESTERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This campaign');
    const body = UpdateCampaignSchema.parse(req.body);
    res.json(await campaigns.updateCampaign(deps, currentUser(req), id, body));
  });

  table.add({ method: 'post', path: '/campaigns/:id/progress', access: TESTERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This campaign');
    const body = CampaignProgressSchema.parse(req.body);
    res.json(await campaigns.recordProgress(deps, currentUser(req), id, body));
  });

  table.add({ method: 'post', path: '/campaigns/:id/log', access: TESTERS }, csvBody, once, async (req, res) => {
    const id = pathId(req.params.id, 'This campaign');
    const body = CampaignLogSchema.parse(typeof req.body === 'string' ? { csv: req.body } : req.body);
    res.json(await campaigns.importLog(deps, currentUser(req), id, body));
  });
}
