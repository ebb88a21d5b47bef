import { notFound } from './app-error';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export const isUuid = (value: unknown): value is string => typeof value === 'string' && UUID.test(value);

/** An id from the path: anything that is not a uuid cannot name a row, so it answers 404 like a missing one. */
export function pathId(value: unknown, what: string): string {
  if (!isUuid(value)) throw notFound(what);
  return value.toLowerCase();
}
