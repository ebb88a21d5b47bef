// Progress of a test campaign (PRODUCT.md section 3F): a climate-chamber run counts hours, a
// durability route counts kilometres. Time is passed in (`asOf`), never read from the clock.

export type CampaignKind = 'climate' | 'durability';
export type CampaignUnit = 'hours' | 'km';

export type ProgressStep = {
  id: string;
  name: string;
  durationHours: number | null;
  distanceKm: number | null;
  doneHours: number;
  doneKm: number;
};

export type CampaignProgress = {
  unit: CampaignUnit;
  /** Hours or km done, each step counted up to its plan (running over does not pull the rest forward). */
  done: number;
  planned: number;
  /** done / planned, 0 to 1 (1 for a campaign with nothing planned). */
  fraction: number;
  complete: boolean;
};

export type CurrentStep = { id: string; name: string; index: number } | null;

export const unitOf = (kind: CampaignKind): CampaignUnit => (kind === 'climate' ? 'hours' : 'km');

const plannedOf = (s: ProgressStep, unit: CampaignUnit) => (unit === 'hours' ? s.durationHours : s.distanceKm) ?? 0;
const doneOf = (s: ProgressStep, unit: CampaignUnit) => (unit === 'hours' ? s.doneHours : s.doneKm);

/** Rounds away float dust (0.1 + 0.2) in what is shown; hours and km keep three decimals. */
const tidy = (v: number) => Math.round(v * 1000) / 1000;

export function campaignProgress(kind: CampaignKind, steps: readonly ProgressStep[]): CampaignProgress {
  const unit = unitOf(kind);
  let done = 0;
  let planned = 0;
  for (const s of steps) {
    const plan = plannedOf(s, unit);
    planned += plan;
    done += Math.min(Math.max(doneOf(s, unit), 0), plan);
  }
  const fraction = planned > 0 ? Math.min(1, done / planned) : 1;
  return { unit, done: tidy(done), planned: tidy(planned), fraction: tidy(fraction), complete: planned > 0 ? done >= planned : true };
}

/** The step now running: the first, in order, whose plan is not yet done; null when all are done. */
export function currentStep(kind: CampaignKind, steps: readonly ProgressStep[]): CurrentStep {
  const unit = unitOf(kind);
  const index = steps.findIndex((s) => doneOf(s, unit) < plannedOf(s, unit));
  return index < 0 ? null : { id: steps[index].id, name: steps[index].name, index };
}

/**
 * When the campaign ends if it goes on at its rate so far: done per hour of wall-clock time since
 * it started, applied to what is left. Null before it has started or before anything is done, and
 * once it is complete (nothing left to project).
 */
export function projectedFinish(
  progress: Pick<CampaignProgress, 'done' | 'planned' | 'complete'>,
  startedAt: Date | string | null,
  asOf: Date,
): string | null {
  if (!startedAt || progress.complete || progress.done <= 0) return null;
  const start = new Date(startedAt).getTime();
  const elapsedHours = (asOf.getTime() - start) / 3_600_000;
  if (!(elapsedHours > 0)) return null;
  const ratePerHour = progress.done / elapsedHours;
  const remainingHours = (progress.planned - progress.done) / ratePerHour;
  const finish = asOf.getTime() + remainingHours * 3_600_000;
  // Beyond year 9999 a Date has no ISO form; such a rate means "not in any useful time".
  if (!Number.isFinite(finish) || finish > 253402300799000) return null;
  return new Date(Math.round(finish)).toISOString();
}
