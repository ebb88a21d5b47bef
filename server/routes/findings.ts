import type { NextFunction, Request, Response, Router } from 'express';
import multer from 'multer';
import { FINDING_MEMBER_ROLES } from '../../shared/domain/finding-workflow';
import { IDEMPOTENCY_HEADER, PHOTO_FIELD, PHOTO_MAX_BYTES } from '../../shared/schemas/assets';
import {
  CreateCommentSchema,
  CreateFindingSchema,
  EmailPrefsSchema,
  FindingListQuerySchema,
  UpdateFindingSchema,
} from '../../shared/schemas/findings';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';
import { pathId } from '../lib/ids';
import { RouteTable } from '../lib/routes';
import { currentUser } from '../middleware/auth';
import { idempotent } from '../middleware/idempotency';
import { addComment, addFindingPhoto, findingHistory, listComments } from '../services/finding-activity';
import { getEmailPrefs, setEmailPrefs } from '../services/finding-mail';
import { createFinding, getFinding, listFindings, updateFinding } from '../services/findings';

/** The key the idempotency middleware accepted (it answers 400 for a malformed one before this runs). */
const keyOf = (req: Request) => req.get(IDEMPOTENCY_HEADER)?.trim() || null;

/** One photo in memory (at most PHOTO_MAX_BYTES) in the form field `photo`; multer's refusals become the API's errors. */
const photoUpload = (() => {
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: PHOTO_MAX_BYTES, files: 1, fields: 4, fieldSize: 200, parts: 6 },
  }).single(PHOTO_FIELD);
  return (req: Request, res: Response, next: NextFunction) =>
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError && err.code === 'LIMIT_FILE_SIZE') {
        return next(
          new AppError(413, 'upload/too-large', `The photo is larger than ${PHOTO_MAX_BYTES / 1024 / 1024} MB. Send a smaller one.`, {
            fields: { [PHOTO_FIELD]: 'Too large.' },
          }),
        );
      }
      next(
        new AppError(400, 'request/invalid', `${PHOTO_FIELD}: Send one photo in the form field "${PHOTO_FIELD}".`, {
          fields: { [PHOTO_FIELD]: `Send one photo in the form field "${PHOTO_FIELD}".` },
        }),
      );
    });
})();

/**
 * Findings (PRODUCT.md section 3C). Reading is open to any signed-in member of the finding's
 * program; filing, changing, commenting and photos to the program's working roles (the finer
 * workflow rules are in shared/domain/finding-workflow). Another program's findings answer 404.
 */
export function findingRoutes(_router: Router, deps: Deps, table: RouteTable) {
  const once = idempotent(deps);

  table.add({ method: 'get', path: '/findings', access: 'user' }, async (req, res) => {
    const query = FindingListQuerySchema.parse(req.query);
    res.json(await listFindings(deps, currentUser(req), query));
  });

  table.add({ method: 'post', path: '/findings', access: FINDING_MEMBER_ROLES }, once, async (req, res) => {
    const body = CreateFindingSchema.parse(req.body);
    res.status(201).json(await createFinding(deps, currentUser(req), body, keyOf(req)));
  });

  table.add({ method: 'get', path: '/findings/:id', access: 'user' }, async (req, res) => {
    res.json(await getFinding(deps, currentUser(req), pathId(req.params.id, 'This finding')));
  });

  table.add({ method: 'patch', path: '/findings/:id', access: FINDING_MEMBER_ROLES }, async (req, res) => {
    const id = pathId(req.params.id, 'This finding');
    const body = UpdateFindingSchema.parse(req.body);
    res.json(await updateFinding(deps, currentUser(req), id, body));
  });

  table.add({ method: 'get', path: '/findings/:id/comments', access: 'user' }, async (req, res) => {
    res.json(await listComments(currentUser(req), pathId(req.params.id, 'This finding')));
  });

  table.add({ method: 'post', path: '/findings/:id/comments', access: FINDING_MEMBER_ROLES }, once, async (req, res) => {
    const id = pathId(req.params.id, 'This finding');
    const body = CreateCommentSchema.parse(req.body);
    res.status(201).json(await addComment(deps, currentUser(req), id, body, keyOf(req)));
  });

  table.add({ method: 'post', path: '/findings/:id/photos', access: FINDING_MEMBER_ROLES }, photoUpload, once, async (req, res) => {
    const id = pathId(req.params.id, 'This finding');
    res.status(201).json(await addFindingPhoto(deps, currentUser(req), id, req.file, keyOf(req)));
  });

  table.add({ method: 'get', path: '/findings/:id/history', access: 'user' }, async (req, res) => {
    res.json(await findingHistory(deps, currentUser(req), pathId(req.params.id, 'This finding')));
  });

  table.add({ method: 'get', path: '/me/email-prefs', access: 'user' }, async (req, res) => {
    res.json(await getEmailPrefs(deps, currentUser(req)));
  });

  table.add({ method: 'put', path: '/me/email-prefs', access: 'user' }, async (req, res) => {
    const body = EmailPrefsSchema.parse(req.body);
    res.json(await setEmailPrefs(deps, currentUser(req), body));
  });
}
