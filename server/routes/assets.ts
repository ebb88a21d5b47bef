import { pipeline } from 'node:stream/promises';
import type { NextFunction, Request, Response, Router } from 'express';
import multer from 'multer';
import { z } from 'zod';
import { checkVin } from '../../shared/domain/vin';
import {
  AssetListQuerySchema,
  ChecklistQuerySchema,
  CreateAssetSchema,
  IDEMPOTENCY_HEADER,
  MoveStageSchema,
  PHOTO_FIELD,
  PHOTO_MAX_BYTES,
  UpdateAssetSchema,
  UpdateChecklistItemSchema,
} from '../../shared/schemas/assets';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';
import { pathId } from '../lib/ids';
import { RouteTable } from '../lib/routes';
import { currentUser, requireAuth } from '../middleware/auth';
import * as assets from '../services/assets';
import { getChecklist, updateChecklistItem } from '../services/checklists';
import { findPhotoFor, uploadPhoto, verifyPhotoSignature, type PhotoSize } from '../services/photos';

const BUILDERS = ['technician', 'engineer', 'lead'] as const;
const ASSET_EDITORS = ['technician', 'engineer', 'coordinator', 'lead'] as const;
const STAGE_MOVERS = ['engineer', 'lead'] as const;
const CHECKLIST_WORKERS = ['technician', 'engineer', 'lead'] as const;

const ExportQuerySchema = AssetListQuerySchema.omit({ cursor: true, limit: true });
const PhotoQuerySchema = z.object({
  size: z.enum(['original', 'thumb']).default('original'),
  exp: z.string().max(20).optional(),
  sig: z.string().max(200).optional(),
});

/** multer keeps the photo in memory (at most PHOTO_MAX_BYTES); its refusals become the API's own errors. */
const photoUpload = (() => {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: PHOTO_MAX_BYTES, files: 1, fields: 4, fieldSize: 200, parts: 6 },
  }).single(PHOTO_FIELD);
  return (req: Request, res: Response, next: NextFunction) =>
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        if (err.code === 'LIMIT_FILE_SIZE') {
          return next(
            new AppError(413, 'upload/too-large', `The photo is larger than ${PHOTO_MAX_BYTES / 1024 / 1024} MB. Send a smaller one.`, {
              fields: { [PHOTO_FIELD]: 'Too large.' },
            }),
          );
        }
        const field = err.code === 'LIMIT_UNEXPECTED_FILE' ? PHOTO_FIELD : (err.field ?? 'body');
        return next(
          new AppError(400, 'request/invalid', `${field}: Send one photo in the form field "${PHOTO_FIELD}".`, {
            fields: { [field]: `Send one photo in the form field "${PHOTO_FIELD}".` },
          }),
        );
      }
      next(new AppError(400, 'request/invalid', 'The upload could not be read. Try again.', { fields: { body: 'Not a valid upload.' } }));
    });
})();

/** Runs the bearer-token check inside a handler (the photo route also accepts a signed URL instead). */
function authenticate(deps: Deps, req: Request, res: Response) {
  return new Promise<void>((resolve, reject) => requireAuth(deps)(req, res, (err?: unknown) => (err ? reject(err) : resolve())));
}

export function assetRoutes(_router: Router, deps: Deps, table: RouteTable) {
  table.add({ method: 'get', path: '/assets', access: 'user' }, async (req, res) => {
    const query = AssetListQuerySchema.parse(req.query);
    res.json(await assets.listAssets(deps, currentUser(req), query));
  });

  // Declared before /assets/:id so that "export.csv" is never taken for an id.
  table.add({ method: 'get', path: '/assets/export.csv', access: 'user' }, async (req, res) => {
    const query = ExportQuerySchema.parse(req.query);
    const { csv, filename } = await assets.exportAssetsCsv(deps, currentUser(req), query);
    res.set('Content-Type', 'text/csv; charset=utf-8');
    res.set('Content-Disposition', `attachment; filename="${filename}"`);
    res.send(csv);
  });

  table.add({ method: 'post', path: '/assets', access: BUILDERS }, async (req, res) => {
    const body = CreateAssetSchema.parse(req.body);
    res.status(201).json(await assets.createAsset(deps, currentUser(req), body));
  });

  table.add({ method: 'get', path: '/assets/:id', access: 'user' }, async (req, res) => {
    res.json(await assets.getAsset(deps, currentUser(req), pathId(req.params.id, 'This asset')));
  });

  table.add({ method: 'patch', path: '/assets/:id', access: ASSET_EDITORS }, async (req, res) => {
    const id = pathId(req.params.id, 'This asset');
    const body = UpdateAssetSchema.parse(req.body);
    res.json(await assets.updateAsset(deps, currentUser(req), id, body));
  });

  table.add({ method: 'post', path: '/assets/:id/stage', access: STAGE_MOVERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This asset');
    const body = MoveStageSchema.parse(req.body);
    res.json(await assets.moveAssetStage(deps, currentUser(req), id, body));
  });

  table.add({ method: 'get', path: '/assets/:id/checklist', access: 'user' }, async (req, res) => {
    const id = pathId(req.params.id, 'This asset');
    const { visitId } = ChecklistQuerySchema.parse(req.query);
    res.json(await getChecklist(deps, currentUser(req), id, visitId));
  });

  table.add({ method: 'get', path: '/assets/:id/history', access: 'user' }, async (req, res) => {
    res.json(await assets.assetHistory(deps, currentUser(req), pathId(req.params.id, 'This asset')));
  });

  // Anyone in the asset's program may add a photo (a driver photographs damage at check-in).
  table.add({ method: 'post', path: '/assets/:id/photos', access: 'user' }, photoUpload, async (req, res) => {
    const id = pathId(req.params.id, 'This asset');
    const { photo, replayed } = await uploadPhoto(deps, currentUser(req), id, {
      file: req.file,
      checklistItemId: (req.body as Record<string, unknown> | undefined)?.checklistItemId,
      idempotencyKey: req.get(IDEMPOTENCY_HEADER),
    });
    // A retried upload answers as the first one did, with the same photo.
    if (replayed) res.set('Idempotent-Replayed', 'true');
    res.status(201).json(photo);
  });

  table.add({ method: 'patch', path: '/checklist-items/:id', access: CHECKLIST_WORKERS }, async (req, res) => {
    const id = pathId(req.params.id, 'This checklist item');
    const body = UpdateChecklistItemSchema.parse(req.body);
    res.json(await updateChecklistItem(deps, currentUser(req), id, body));
  });

  // Public in the route table: the handler accepts a valid signed URL or the bearer token of a program member.
  table.add({ method: 'get', path: '/photos/:id', access: 'public' }, async (req, res) => {
    const id = pathId(req.params.id, 'This photo');
    const query = PhotoQuerySchema.parse(req.query);
    const size: PhotoSize = query.size;
    let photo;
    if (query.sig !== undefined && verifyPhotoSignature(deps, id, size, query.exp, query.sig)) {
      photo = await findPhotoFor(id, { signed: true });
    } else if (req.get('authorization')) {
      await authenticate(deps, req, res);
      photo = await findPhotoFor(id, { user: currentUser(req) });
    } else if (query.sig !== undefined) {
      throw new AppError(401, 'photo/link-invalid', 'This photo link has expired or is not valid. Reload the page to get a fresh one.');
    } else {
      throw new AppError(401, 'auth/unauthenticated', 'Your session has ended or is not valid. Please sign in again.');
    }
    const object = await deps.storage.get(size === 'thumb' ? photo.thumbKey : photo.s3Key);
    if (!object) throw new AppError(404, 'request/not-found', 'The file of this photo is missing.');
    res.status(200);
    res.set('Content-Type', size === 'thumb' ? 'image/jpeg' : photo.contentType);
    if (object.contentLength !== undefined) res.set('Content-Length', String(object.contentLength));
    // A photo never changes under its id; it is private to the people who may see it.
    res.set('Cache-Control', 'private, max-age=3600');
    // The Expo dev server serves the web app from another port of the same host.
    res.set('Cross-Origin-Resource-Policy', 'same-site');
    res.set('Content-Disposition', 'inline');
    if (size === 'original') res.set('ETag', `"${photo.sha256}"`);
    try {
      await pipeline(object.body, res);
    } catch {
      res.destroy();
    }
  });

  table.add({ method: 'get', path: '/calc/vin/:vin', access: 'user' }, async (req, res) => {
    const raw = String(req.params.vin);
    if (raw.length > 40) {
      throw new AppError(400, 'request/invalid', 'vin: A VIN has 17 characters.', { fields: { vin: 'A VIN has 17 characters.' } });
    }
    res.json(checkVin(raw.trim().toUpperCase().replace(/\s+/g, '')));
  });
}
