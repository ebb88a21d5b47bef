import { nextDailyAt, type Job } from './jobs';
import { takeSnapshot } from './readiness-snapshots';

/** The daily readiness snapshot is taken at 23:00 UTC: the close of the garage's day in Europe (the product's own choice). */
export const SNAPSHOT_HOUR_UTC = 23;

/** Readiness jobs, run by the same job loop as the others (server/index.ts passes them in). */
export const READINESS_JOBS: Job[] = [
  { name: 'readiness-snapshot', next: nextDailyAt(SNAPSHOT_HOUR_UTC), run: (deps, asOf, transaction) => takeSnapshot(deps, asOf, transaction) },
];
