export class AppError extends Error {
  constructor(
    public readonly status: number,
    public readonly code: string,
    message: string,
    public readonly details?: unknown,
  ) {
    super(message);
  }
}

export const notFound = (what = 'This item') =>
  new AppError(404, 'request/not-found', `${what} does not exist or is not in your programs.`);
export const forbidden = () => new AppError(403, 'auth/forbidden', 'Your role does not allow this.');
export const conflict = (message: string, current: unknown) =>
  new AppError(409, 'request/conflict', message, { current });
/** A refusal that names the one field at fault (`details.fields`), so a form shows it beside that field. */
export const fieldError = (field: string, message: string, code = 'request/invalid', status = 400) =>
  new AppError(status, code, `${field}: ${message}`, { fields: { [field]: message } });
