import { QueryTypes, type Transaction } from 'sequelize';
import type { Deps } from '../deps';
import { purgeIdempotencyKeys } from '../middleware/idempotency';
import { runOverdueDigest } from './finding-mail';

/**
 * A recurring job. `next(after)` gives the first run time strictly after `after`. `run` gets
 * the loop's transaction, which holds the job's row lock: what the job writes and the next
 * run time commit together, or neither does.
 */
export type Job = {
  name: string;
  next: (after: Date) => Date;
  run: (deps: Deps, asOf: Date, transaction: Transaction) => Promise<unknown>;
};

/** The digest goes out at 06:00 UTC: before the garage's day in Europe (the product's own choice). */
export const DIGEST_HOUR_UTC = 6;
/** A failed run is tried again after this delay rather than at once. */
export const RETRY_MS = 5 * 60_000;

export function nextDailyAt(hourUtc: number) {
  return (after: Date) => {
    const next = new Date(Date.UTC(after.getUTCFullYear(), after.getUTCMonth(), after.getUTCDate(), hourUtc));
    if (next.getTime() <= after.getTime()) next.setUTCDate(next.getUTCDate() + 1);
    return next;
  };
}

export const everyMs = (ms: number) => (after: Date) => new Date(after.getTime() + ms);

export const JOBS: Job[] = [
  { name: 'overdue-digest', next: nextDailyAt(DIGEST_HOUR_UTC), run: (deps, asOf, transaction) => runOverdueDigest(deps, asOf, { transaction }) },
  { name: 'idempotency-purge', next: everyMs(3600_000), run: (deps, asOf) => purgeIdempotencyKeys(deps, asOf) },
];

/** Adds a schedule row for each job that has none (a restart keeps the persisted next run). */
export async function registerJobs(deps: Deps, jobs: Job[] = JOBS, now = new Date()) {
  for (const job of jobs) {
    await deps.sequelize.query(`INSERT INTO scheduled_jobs (name, next_run_at) VALUES ($1, $2) ON CONFLICT (name) DO NOTHING`, {
      bind: [job.name, job.next(now)],
    });
  }
}

/**
 * Runs each job whose next run time has come, once, on whichever instance takes its row first
 * (SELECT ... FOR UPDATE SKIP LOCKED: the others skip it). A job missed while every instance was
 * down runs once at the next tick, not once per missed day. Returns the names of the jobs run.
 */
export async function runDueJobs(deps: Deps, jobs: Job[] = JOBS, now = new Date()): Promise<string[]> {
  const ran: string[] = [];
  for (const job of jobs) {
    try {
      const done = await deps.sequelize.transaction(async (transaction) => {
        const [row] = await deps.sequelize.query<{ name: string }>(
          `SELECT name FROM scheduled_jobs WHERE name = $1 AND next_run_at <= $2 FOR UPDATE SKIP LOCKED`,
          { bind: [job.name, now], type: QueryTypes.SELECT, transaction },
        );
        if (!row) return false;
        await job.run(deps, now, transaction);
        await deps.sequelize.query(
          `UPDATE scheduled_jobs SET next_run_at = $2, last_run_at = $3, last_error = NULL, run_count = run_count + 1, updated_at = now()
            WHERE name = $1`,
          { bind: [job.name, job.next(now), now], transaction },
        );
        return true;
      });
      if (done) ran.push(job.name);
    } catch (err) {
      deps.log(err);
      await deps.sequelize
        .query(`UPDATE scheduled_jobs SET next_run_at = $2, last_error = $3, updated_at = now() WHERE name = $1`, {
          bind: [job.name, new Date(now.getTime() + RETRY_MS), String((err as Error)?.message ?? err).slice(0, 1000)],
        })
        .catch(() => undefined);
    }
  }
  return ran;
}

/** Registers the jobs, then checks for due ones every `intervalMs`; returns a stop function. */
export function startJobLoop(deps: Deps, intervalMs = 30_000, jobs: Job[] = JOBS): () => void {
  let running = false;
  let registered = false;
  const tick = async () => {
    if (running) return;
    running = true;
    try {
      if (!registered) {
        await registerJobs(deps, jobs);
        registered = true;
      }
      await runDueJobs(deps, jobs);
    } catch {
      // The database may be down; the next tick tries again.
    } finally {
      running = false;
    }
  };
  const timer = setInterval(() => void tick(), intervalMs);
  timer.unref();
  void tick();
  return () => clearInterval(timer);
}
