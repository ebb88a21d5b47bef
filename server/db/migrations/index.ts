import type { QueryInterface } from 'sequelize';
import * as foundation from './20261202-0001-foundation';

type Step = { up: (p: { context: QueryInterface }) => Promise<void>; down: (p: { context: QueryInterface }) => Promise<void> };

/** Every migration in order. A new migration is a new timestamped file added to this list. */
export const MIGRATIONS: Array<{ name: string } & Step> = [{ name: '20261202-0001-foundation', ...foundation }];
