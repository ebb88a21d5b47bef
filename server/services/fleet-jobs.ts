import { everyMs, type Job } from './jobs';
import { runOverdueReturns } from './fleet-mail';

/** How often the loop looks for overdue returns: a vehicle late by this much is reported (the product's own choice). */
export const OVERDUE_CHECK_MS = 10 * 60_000;

/** Fleet jobs, run by the same job loop as the others (server/index.ts passes them in). */
export const FLEET_JOBS: Job[] = [
  { name: 'fleet-overdue-returns', next: everyMs(OVERDUE_CHECK_MS), run: (deps, asOf, transaction) => runOverdueReturns(deps, asOf, { transaction }) },
];
