import crypto from 'node:crypto';
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import { QueryTypes } from 'sequelize';
import { IDEMPOTENCY_HEADER } from '../../shared/schemas/assets';
import { IdempotencyKeySchema } from '../../shared/schemas/findings';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';

/** A claim whose first request has not answered within this time is taken to be lost (a crashed process). */
export const IDEMPOTENCY_STALE_MS = 60_000;
/** How long a replay waits for a first request that is still running before answering 409. */
const WAIT_FOR_FIRST_MS = 10_000;
const POLL_MS = 100;
/** Answers kept for replay this long; the job loop purges older ones. */
export const IDEMPOTENCY_KEEP_HOURS = 72;

type KeyRow = { id: string; method: string; path: string; request_hash: string; status_code: number | null; response: unknown };

/** Object keys sorted at every level, so the same JSON in another key order hashes the same. */
function canonical(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(canonical);
  if (value && typeof value === 'object' && !Buffer.isBuffer(value)) {
    return Object.fromEntries(
      Object.keys(value as object)
        .sort()
        .map((k) => [k, canonical((value as Record<string, unknown>)[k])]),
    );
  }
  return value ?? null;
}

/** Hash of what the request asks for: method, path, body and (for an upload) the file's bytes. */
export function requestHash(req: Request): string {
  const file = req.file ? { field: req.file.fieldname, sha256: crypto.createHash('sha256').update(req.file.buffer).digest('hex') } : null;
  return crypto
    .createHash('sha256')
    .update(JSON.stringify({ method: req.method, path: req.baseUrl + req.path, body: canonical(req.body), file }))
    .digest('hex');
}

const mismatch = () =>
  new AppError(
    422,
    'request/idempotency-mismatch',
    'This Idempotency-Key was already used for a different request. Send it again with a new key.',
    { fields: { [IDEMPOTENCY_HEADER]: 'Already used for a different request.' } },
  );

async function claim(deps: Deps, userId: string, key: string, method: string, path: string, hash: string): Promise<string | null> {
  const rows = await deps.sequelize.query<{ id: string }>(
    `INSERT INTO idempotency_keys (user_id, key, method, path, request_hash) VALUES ($1, $2, $3, $4, $5)
     ON CONFLICT (user_id, key) DO NOTHING RETURNING id`,
    { bind: [userId, key, method, path, hash], type: QueryTypes.SELECT },
  );
  return rows[0]?.id ?? null;
}

/** Takes over a claim whose first request never answered (same request only). */
async function takeOverStale(deps: Deps, userId: string, key: string, hash: string): Promise<string | null> {
  const rows = await deps.sequelize.query<{ id: string }>(
    `UPDATE idempotency_keys SET created_at = now()
      WHERE user_id = $1 AND key = $2 AND request_hash = $3 AND status_code IS NULL
        AND created_at < now() - make_interval(secs => $4)
      RETURNING id`,
    { bind: [userId, key, hash, IDEMPOTENCY_STALE_MS / 1000], type: QueryTypes.SELECT },
  );
  return rows[0]?.id ?? null;
}

async function read(deps: Deps, userId: string, key: string): Promise<KeyRow | null> {
  const rows = await deps.sequelize.query<KeyRow>(
    `SELECT id, method, path, request_hash, status_code, response FROM idempotency_keys WHERE user_id = $1 AND key = $2`,
    { bind: [userId, key], type: QueryTypes.SELECT },
  );
  return rows[0] ?? null;
}

/**
 * Makes a POST safe to retry: with an `Idempotency-Key` header, the first successful (2xx)
 * answer is stored per user and key; a replay with the same request gets that answer again
 * (`Idempotent-Replayed: true`) and runs nothing; the same key with another request answers 422.
 * A failed first request releases its key, so the client may retry it. Place it after the body
 * is parsed (after multer for an upload) and after the route table's sign-in check.
 */
export function idempotent(deps: Deps): RequestHandler {
  return async (req: Request, res: Response, next: NextFunction) => {
    const raw = req.get(IDEMPOTENCY_HEADER);
    if (raw === undefined || !req.user) return next();
    const parsed = IdempotencyKeySchema.safeParse(raw.trim());
    if (!parsed.success) {
      throw new AppError(400, 'request/invalid', `${IDEMPOTENCY_HEADER}: ${parsed.error.issues[0].message}`, {
        fields: { [IDEMPOTENCY_HEADER]: parsed.error.issues[0].message },
      });
    }
    const key = parsed.data;
    const userId = req.user.id;
    const path = req.baseUrl + req.path;
    const hash = requestHash(req);

    const until = Date.now() + WAIT_FOR_FIRST_MS;
    let claimId = await claim(deps, userId, key, req.method, path, hash);
    while (!claimId) {
      const row = await read(deps, userId, key);
      if (!row) {
        // The first request failed and released the key between our two statements: claim it again.
        claimId = await claim(deps, userId, key, req.method, path, hash);
        continue;
      }
      if (row.request_hash !== hash) throw mismatch();
      if (row.status_code !== null) {
        res.set('Idempotent-Replayed', 'true');
        res.status(row.status_code).json(row.response);
        return;
      }
      claimId = await takeOverStale(deps, userId, key, hash);
      if (claimId) break;
      if (Date.now() > until) {
        res.set('Retry-After', '2');
        throw new AppError(409, 'request/in-progress', 'The first try of this request is still running. Try again in a moment.');
      }
      await new Promise((r) => setTimeout(r, POLL_MS));
    }

    const id = claimId;
    const send = res.json.bind(res);
    let settled = false;
    res.json = ((body: unknown) => {
      if (settled) return send(body);
      settled = true;
      const status = res.statusCode;
      const store =
        status >= 200 && status < 300
          ? deps.sequelize.query(
              `UPDATE idempotency_keys SET status_code = $2, response = $3::jsonb, completed_at = now() WHERE id = $1`,
              { bind: [id, status, JSON.stringify(body ?? null)] },
            )
          : deps.sequelize.query(`DELETE FROM idempotency_keys WHERE id = $1`, { bind: [id] });
      // The answer is stored before it is sent, so a replay that follows it finds it.
      store.catch((err: unknown) => deps.log(err)).finally(() => send(body));
      return res;
    }) as Response['json'];
    next();
  };
}

/** Deletes stored answers older than IDEMPOTENCY_KEEP_HOURS (run by the job loop). */
export async function purgeIdempotencyKeys(deps: Deps, asOf: Date): Promise<number> {
  const [, meta] = (await deps.sequelize.query(`DELETE FROM idempotency_keys WHERE created_at < $1`, {
    bind: [new Date(asOf.getTime() - IDEMPOTENCY_KEEP_HOURS * 3600 * 1000)],
  })) as [unknown, { rowCount?: number }];
  return meta?.rowCount ?? 0;
}
