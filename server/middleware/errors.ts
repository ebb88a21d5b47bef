import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError } from 'zod';
import { BaseError, ConnectionError, UniqueConstraintError, TimeoutError } from 'sequelize';
import { AppError } from '../lib/app-error';

/** Turns zod issues into `{ fields: { 'a.b': message } }` and a sentence that names the fields. */
export function zodToAppError(error: ZodError): AppError {
  const fields: Record<string, string> = {};
  for (const issue of error.issues) {
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) fields[[...issue.path, key].join('.')] = 'This field is not accepted.';
      continue;
    }
    const key = issue.path.length ? issue.path.join('.') : 'body';
    if (!fields[key]) fields[key] = issue.code === 'invalid_type' && issue.input === undefined ? 'This field is required.' : issue.message;
  }
  const message = Object.entries(fields)
    .map(([k, v]) => `${k}: ${v}`)
    .join(' ');
  return new AppError(400, 'request/invalid', message || 'The request is not valid.', { fields });
}

function isDatabaseDown(err: unknown): boolean {
  if (err instanceof ConnectionError || err instanceof TimeoutError) return true;
  const code = (err as { original?: { code?: string }; parent?: { code?: string }; code?: string })?.original?.code ??
    (err as { code?: string })?.code;
  return ['ECONNREFUSED', 'ECONNRESET', '57P01', '57P02', '57P03', '08006', '08001', '08003', 'ETIMEDOUT'].includes(
    String(code),
  ) || /Connection terminated|connect ECONNREFUSED|Connection refused|ConnectionAcquireTimeout/i.test(String((err as Error)?.message));
}

export const notFoundRoute: RequestHandler = (req, _res, next) => {
  next(new AppError(404, 'request/no-route', `There is no API route ${req.method} ${req.path}.`));
};

export function errorHandler(log: (err: unknown) => void): ErrorRequestHandler {
  return (err, _req, res, _next) => {
    let appError: AppError;
    if (err instanceof AppError) appError = err;
    else if (err instanceof ZodError) appError = zodToAppError(err);
    else if (err?.type === 'entity.parse.failed')
      appError = new AppError(400, 'request/malformed-json', 'The request body is not valid JSON.', { fields: { body: 'Not valid JSON.' } });
    else if (err?.type === 'entity.too.large')
      appError = new AppError(413, 'request/too-large', 'The request body is too large.');
    else if (err?.code === 'LIMIT_FILE_SIZE')
      appError = new AppError(413, 'upload/too-large', 'The file is too large.', { fields: { file: 'Too large.' } });
    else if (err instanceof UniqueConstraintError)
      appError = new AppError(409, 'request/duplicate', 'An item with the same unique value already exists.', {
        fields: Object.fromEntries(err.errors.map((e) => [e.path ?? 'value', 'Already in use.'])),
      });
    else if (isDatabaseDown(err))
      appError = new AppError(503, 'service/unavailable', 'Proofyard cannot reach its database right now. Try again in a moment.');
    else {
      if (!(err instanceof BaseError)) log(err);
      else log(err);
      appError = new AppError(500, 'server/internal', 'Something went wrong on our side. Try again.');
    }
    if (appError.status === 503) res.set('Retry-After', '5');
    res.status(appError.status).json({
      error: { code: appError.code, message: appError.message, ...(appError.details ? { details: appError.details } : {}) },
    });
  };
}
