import type { AssetStatus } from '../schemas/assets';
import {
  ASSIGNMENT_PURPOSE_LABELS,
  LICENCE_WARNING_DAYS,
  type AssignmentPurpose,
  type AssignmentStatus,
  type RefusalReason,
} from '../schemas/fleet';

// Pure fleet rules (PRODUCT.md section 3E, issue 6). Time is always passed in, never read from
// the clock. Windows are half-open, [start, end): one that ends at 10:00 and one that starts at
// 10:00 do not overlap.

const DAY_MS = 24 * 3600_000;
const HOUR_MS = 3600_000;

export type Instant = Date | string | number;
const ms = (t: Instant) => (t instanceof Date ? t.getTime() : typeof t === 'number' ? t : Date.parse(t));

/** `YYYY-MM-DD 08:00 UTC`: the server does not know the reader's time zone, so it says UTC. */
export function formatUtc(t: Instant): string {
  return new Date(ms(t)).toISOString().slice(0, 16).replace('T', ' ') + ' UTC';
}

export const overlaps = (a: { startsAt: Instant; endsAt: Instant }, b: { startsAt: Instant; endsAt: Instant }) =>
  ms(a.startsAt) < ms(b.endsAt) && ms(b.startsAt) < ms(a.endsAt);

// ---- Licence ------------------------------------------------------------------------------

/** The first instant the licence is no longer valid: it is valid through its expiry day (UTC). */
export const licenceEndsAt = (expiry: string) => Date.parse(`${expiry}T00:00:00Z`) + DAY_MS;

/** `expired`: no longer valid at `asOf` (or no expiry date recorded); `expiresSoon`: valid now, not LICENCE_WARNING_DAYS days from now. */
export function licenceState(expiry: string | null, asOf: Instant): { expired: boolean; expiresSoon: boolean } {
  if (!expiry) return { expired: true, expiresSoon: false };
  const end = licenceEndsAt(expiry);
  const now = ms(asOf);
  const expired = end <= now;
  return { expired, expiresSoon: !expired && end <= now + LICENCE_WARNING_DAYS * DAY_MS };
}

// ---- Overdue returns -----------------------------------------------------------------------

/** Checked out and past the end of its window without a check-in. */
export const isOverdueReturn = (a: { status: AssignmentStatus; endsAt: Instant }, asOf: Instant) =>
  a.status === 'checked-out' && ms(a.endsAt) <= ms(asOf);

// ---- Refusal rules -------------------------------------------------------------------------

export type Booking = { id: string; startsAt: Instant; endsAt: Instant; label: string };

export type RefusalInput = { startsAt: Instant; endsAt: Instant };
export type RefusalContext = {
  vehicle: {
    tag: string;
    status: AssetStatus;
    stage: string;
    minDriverLevel: number;
    /** Titles of the vehicle's open `safety` findings. */
    openSafetyFindings: string[];
  };
  driver: { name: string; drivingLevel: number; licenceExpiry: string | null };
  /** Other live (planned or checked-out) assignments of the same vehicle, and of the same driver. */
  vehicleBookings: Booking[];
  driverBookings: Booking[];
  /** At check-out: another assignment still has the vehicle out (not checked in). */
  vehicleOutWith?: Booking | null;
};

function overlapReason(code: 'vehicle-overlap' | 'driver-overlap', who: string, input: RefusalInput, bookings: Booking[]): RefusalReason | null {
  const clashes = bookings.filter((b) => overlaps(input, b)).sort((a, b) => ms(a.startsAt) - ms(b.startsAt));
  if (!clashes.length) return null;
  const list = clashes.map((b) => `${b.label} (${formatUtc(b.startsAt)} to ${formatUtc(b.endsAt)})`).join('; ');
  return {
    code,
    message: `${who} is already booked in this window: ${list}.`,
    overridable: false,
    assignmentIds: clashes.map((b) => b.id),
  };
}

/**
 * Every reason the assignment of `context.vehicle` to `context.driver` for `input`'s window is
 * refused (issue 6), in a fixed order; an empty list means it may be booked. Only `driver-level`
 * is overridable (by a coordinator or lead with a written reason); the safety rule never is.
 */
export function assignmentRefusals(input: RefusalInput, context: RefusalContext): RefusalReason[] {
  const { vehicle, driver } = context;
  const reasons: RefusalReason[] = [];
  const vehicleClash = overlapReason('vehicle-overlap', vehicle.tag, input, context.vehicleBookings);
  if (vehicleClash) reasons.push(vehicleClash);
  const driverClash = overlapReason('driver-overlap', driver.name, input, context.driverBookings);
  if (driverClash) reasons.push(driverClash);
  if (vehicle.openSafetyFindings.length) {
    const n = vehicle.openSafetyFindings.length;
    reasons.push({
      code: 'vehicle-not-cleared',
      message: `${vehicle.tag} is not cleared: ${n === 1 ? 'an open safety finding' : `${n} open safety findings`} (${vehicle.openSafetyFindings.slice(0, 3).join('; ')}${n > 3 ? '; ...' : ''}). It may not be driven until ${n === 1 ? 'it is' : 'they are'} resolved.`,
      overridable: false,
    });
  }
  if (vehicle.status === 'down' || vehicle.status === 'retired') {
    reasons.push({ code: 'vehicle-unavailable', message: `${vehicle.tag} is ${vehicle.status}.`, overridable: false });
  }
  if (context.vehicleOutWith) {
    reasons.push({
      code: 'vehicle-in-use',
      message: `${vehicle.tag} has not been checked in from ${context.vehicleOutWith.label} yet.`,
      overridable: false,
      assignmentIds: [context.vehicleOutWith.id],
    });
  }
  if (driver.drivingLevel < vehicle.minDriverLevel) {
    reasons.push({
      code: 'driver-level',
      message: `${driver.name} drives at level ${driver.drivingLevel}; the ${vehicle.stage} stage needs level ${vehicle.minDriverLevel}.`,
      overridable: true,
    });
  }
  if (!driver.licenceExpiry) {
    reasons.push({ code: 'licence-unknown', message: `No driving licence expiry date is recorded for ${driver.name}.`, overridable: false });
  } else if (licenceEndsAt(driver.licenceExpiry) < ms(input.endsAt)) {
    const already = licenceEndsAt(driver.licenceExpiry) <= ms(input.startsAt);
    reasons.push({
      code: 'licence-expired',
      message: already
        ? `${driver.name}'s driving licence expired on ${driver.licenceExpiry}.`
        : `${driver.name}'s driving licence expires on ${driver.licenceExpiry}, before the window ends.`,
      overridable: false,
    });
  }
  return reasons;
}

/** The reasons that still stand once a level override with a written reason is taken into account. */
export const standingRefusals = (reasons: RefusalReason[], levelOverride: boolean) =>
  reasons.filter((r) => !(levelOverride && r.overridable));

// ---- Utilisation ---------------------------------------------------------------------------

export type Window = { start: Instant; end: Instant };

/** Windows clipped to `period`, sorted, with overlapping or touching ones merged, in milliseconds. */
export function mergeWindows(windows: Window[], period: Window): Array<{ start: number; end: number }> {
  const from = ms(period.start);
  const to = ms(period.end);
  const clipped = windows
    .map((w) => ({ start: Math.max(ms(w.start), from), end: Math.min(ms(w.end), to) }))
    .filter((w) => w.end > w.start)
    .sort((a, b) => a.start - b.start);
  const merged: Array<{ start: number; end: number }> = [];
  for (const w of clipped) {
    const last = merged[merged.length - 1];
    if (last && w.start <= last.end) last.end = Math.max(last.end, w.end);
    else merged.push({ ...w });
  }
  return merged;
}

/**
 * Hours assigned over hours available in `period`: assigned = the union of the windows clipped to
 * the period (two windows at once count once); available = the period's length less `unavailable`
 * (time the vehicle could not be used, clipped and merged the same way).
 */
export function utilisation(
  windows: Window[],
  period: Window,
  unavailable: Window[] = [],
): { assignedHours: number; availableHours: number; utilisation: number } {
  const span = Math.max(0, ms(period.end) - ms(period.start));
  const sum = (list: Array<{ start: number; end: number }>) => list.reduce((n, w) => n + (w.end - w.start), 0);
  const down = mergeWindows(unavailable, period);
  const availableMs = span - sum(down);
  // Assigned time while the vehicle was unavailable does not count against the available hours.
  const assignedMs = sum(mergeWindows(windows, period)) - overlapMs(mergeWindows(windows, period), down);
  const assignedHours = assignedMs / HOUR_MS;
  const availableHours = availableMs / HOUR_MS;
  return { assignedHours, availableHours, utilisation: availableMs > 0 ? Math.min(1, assignedMs / availableMs) : 0 };
}

function overlapMs(a: Array<{ start: number; end: number }>, b: Array<{ start: number; end: number }>) {
  let total = 0;
  for (const x of a) for (const y of b) total += Math.max(0, Math.min(x.end, y.end) - Math.max(x.start, y.start));
  return total;
}

/**
 * The time an assignment holds its vehicle: a planned one its window; a checked-out one from
 * check-out (or the start, whichever is first) to the end, or to `asOf` while it is overdue; a
 * returned one to its check-in; a cancelled one none.
 */
export function heldWindow(
  a: { status: AssignmentStatus; startsAt: Instant; endsAt: Instant; checkedOutAt?: Instant | null; checkedInAt?: Instant | null },
  asOf: Instant,
): Window | null {
  if (a.status === 'cancelled') return null;
  const start = a.checkedOutAt ? Math.min(ms(a.startsAt), ms(a.checkedOutAt)) : ms(a.startsAt);
  if (a.status === 'planned') return { start: ms(a.startsAt), end: ms(a.endsAt) };
  if (a.status === 'checked-out') return { start, end: Math.max(ms(a.endsAt), ms(asOf)) };
  const end = a.checkedInAt ? ms(a.checkedInAt) : ms(a.endsAt);
  return end > start ? { start, end } : null;
}

// ---- Proposal costs ------------------------------------------------------------------------

/**
 * Suitability costs of a proposal (the product's own weights): lower is better.
 * - level margin: each level a driver has above the stage's minimum costs 3, so the most
 *   qualified drivers stay free for the stages that need them;
 * - kilometres: 1 per 250 km the driver drove in the last 30 days, so the driving is shared;
 * - utilisation balance: 10 x the vehicle's utilisation over the last 30 days (0 to 1), so the
 *   less used vehicles go out first.
 */
export const PROPOSAL_WEIGHTS = { perLevelAbove: 3, kmPerPoint: 250, utilisation: 10 } as const;
export const PROPOSAL_COST_MODEL =
  'Cost = 3 per driving level above the stage minimum + 1 per 250 km the driver drove in the last 30 days + 10 x the vehicle’s utilisation over the last 30 days. Lower is better; the proposal minimises the total (Hungarian method).';

const round2 = (x: number) => Math.round(x * 100) / 100;

export const vehicleCost = (utilisation30d: number) => round2(PROPOSAL_WEIGHTS.utilisation * Math.min(1, Math.max(0, utilisation30d)));
export const driverCost = (levelMargin: number, km30d: number) =>
  round2(PROPOSAL_WEIGHTS.perLevelAbove * Math.max(0, levelMargin) + Math.max(0, km30d) / PROPOSAL_WEIGHTS.kmPerPoint);

/** One proposed pair in words. */
export function explainPair(p: {
  driver: string;
  level: number;
  minLevel: number;
  stage: string;
  km30d: number;
  tag: string;
  utilisation30d: number;
  purpose: AssignmentPurpose;
  cost: number;
}): string {
  const margin = p.level - p.minLevel;
  const levelText =
    margin === 0 ? `exactly the level ${p.stage} needs (${p.minLevel})` : `level ${p.level}, ${margin} above what ${p.stage} needs (${p.minLevel})`;
  return `${p.driver} takes ${p.tag} for ${ASSIGNMENT_PURPOSE_LABELS[p.purpose].toLowerCase()}: ${levelText}; ${Math.round(p.km30d)} km driven in the last 30 days; ${p.tag} was in use ${Math.round(p.utilisation30d * 100)} % of the last 30 days. Cost ${p.cost}.`;
}

// ---- Assignment matrices (the pure parts of the solver) ------------------------------------

/**
 * Squares a cost matrix for a Hungarian-method solver: forbidden cells (null) and the padding of a
 * rectangular matrix get one big cost `big`, larger than any difference the allowed cells can
 * make, so the solver first fills as many rows with allowed columns as it can and then minimises
 * the cost of those. The solver's pairs go through `readAssignment`.
 */
export function squareCostMatrix(costs: (number | null)[][]): { matrix: number[][]; big: number } {
  const rows = costs.length;
  const cols = rows ? costs[0].length : 0;
  const n = Math.max(rows, cols);
  let maxAbs = 0;
  for (const row of costs) for (const c of row) if (c !== null && Math.abs(c) > maxAbs) maxAbs = Math.abs(c);
  // Any two assignments differ by at most 2 x maxAbs per allowed cell, and at most min(rows, cols) cells.
  const big = (Math.min(rows, cols) + 1) * (2 * maxAbs + 1);
  const matrix = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i < rows && j < cols ? (costs[i][j] ?? big) : big)));
  return { matrix, big };
}

/** Keeps the solver's pairs that fall on allowed cells of the original matrix, sorted by row, with their total cost. */
export function readAssignment(costs: (number | null)[][], pairs: Array<[number, number]>): { pairs: Array<[number, number]>; totalCost: number } {
  const kept = pairs
    .filter(([i, j]) => i < costs.length && j < (costs[i]?.length ?? 0) && costs[i][j] !== null)
    .map(([i, j]) => [i, j] as [number, number])
    .sort((a, b) => a[0] - b[0]);
  return { pairs: kept, totalCost: kept.reduce((sum, [i, j]) => sum + (costs[i][j] as number), 0) };
}
