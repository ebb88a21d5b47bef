import type { QueryInterface } from 'sequelize';
import * as foundation from './20261202-0001-foundation';
import * as assets from './20261202-0002-assets';
import * as findings from './20261202-0003-findings';
import * as software from './20261202-0004-software';
import * as fleet from './20261202-0005-fleet';
import * as validation from './20261202-0006-validation';
import * as readiness from './20261202-0007-readiness';
import * as gateActionNotes from './20261203-0008-gate-action-notes';

type Step = { up: (p: { context: QueryInterface }) => Promise<void>; down: (p: { context: QueryInterface }) => Promise<void> };

/** Every migration in order. A new migration is a new timestamped file added to this list. */
export const MIGRATIONS: Array<{ name: string } & Step> = [
  { name: '20261202-0001-foundation', ...foundation },
  { name: '20261202-0002-assets', ...assets },
  { name: '20261202-0003-findings', ...findings },
  { name: '20261202-0004-software', ...software },
  { name: '20261202-0005-fleet', ...fleet },
  { name: '20261202-0006-validation', ...validation },
  { name: '20261202-0007-readiness', ...readiness },
  { name: '20261203-0008-gate-action-notes', ...gateActionNotes },
];
