// Small helpers shared by the benchmark's parts.

export const QUICK = process.env.BENCH_QUICK === '1' || process.env.BENCH_QUICK === 'true';

export function median(values: number[]): number {
  if (!values.length) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  const mid = Math.floor(sorted.length / 2);
  return sorted.length % 2 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
}

/** Milliseconds of `work`, from a monotonic clock. */
export async function timed<T>(work: () => Promise<T>): Promise<{ ms: number; value: T }> {
  const start = process.hrtime.bigint();
  const value = await work();
  return { ms: Number(process.hrtime.bigint() - start) / 1e6, value };
}

/**
 * Runs `work` `runs` times after `warmup` unmeasured runs, and stops early once `budgetMs` has
 * passed (at least three measured runs are kept). Returns each run's milliseconds.
 */
export async function repeat(work: () => Promise<unknown>, opts: { runs: number; warmup: number; budgetMs: number }): Promise<number[]> {
  for (let i = 0; i < opts.warmup; i += 1) await work();
  const until = Date.now() + opts.budgetMs;
  const times: number[] = [];
  for (let i = 0; i < opts.runs; i += 1) {
    times.push((await timed(work)).ms);
    if (times.length >= 3 && Date.now() > until) break;
  }
  return times;
}

/** Rejects when `promise` has not settled within `ms`. */
export function withTimeout<T>(promise: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  return Promise.race([
    promise.finally(() => clearTimeout(timer)),
    new Promise<T>((_, reject) => {
      timer = setTimeout(() => reject(new Error(`${what} did not finish within ${Math.round(ms / 1000)} s`)), ms);
    }),
  ]);
}

export const kib = (bytes: number) => `${(bytes / 1024).toFixed(1)} KiB`;
export const ms = (value: number) => (Number.isFinite(value) ? `${value < 10 ? value.toFixed(2) : value.toFixed(1)} ms` : 'n/a');
export const ratio = (value: number) => (Number.isFinite(value) ? `${value.toFixed(2)}x` : 'n/a');

export function log(message: string) {
  console.log(`bench: ${message}`);
}
