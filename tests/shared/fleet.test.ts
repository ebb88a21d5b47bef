import { munkres } from 'munkres';
import {
  assignmentRefusals,
  heldWindow,
  isOverdueReturn,
  licenceState,
  mergeWindows,
  readAssignment,
  squareCostMatrix,
  standingRefusals,
  utilisation,
  type RefusalContext,
} from '../../shared/domain/fleet';
import { CreateAssignmentSchema, SolveAssignmentSchema, windowProblem } from '../../shared/schemas/fleet';
import { solveAssignment } from '../../server/services/assignment-solver';

type Costs = (number | null)[][];

/** Independent check: the minimum over every way to give each row a distinct column (rows <= columns), null cells skipped. */
function bruteForce(costs: Costs): { filled: number; total: number } {
  const rows = costs.length;
  const cols = costs[0].length;
  let best = { filled: -1, total: Infinity };
  const used = new Array(cols).fill(false);
  const walk = (i: number, filled: number, total: number) => {
    if (i === rows) {
      if (filled > best.filled || (filled === best.filled && total < best.total)) best = { filled, total };
      return;
    }
    walk(i + 1, filled, total); // row i left without a column
    for (let j = 0; j < cols; j += 1) {
      const c = costs[i][j];
      if (used[j] || c === null) continue;
      used[j] = true;
      walk(i + 1, filled + 1, total + c);
      used[j] = false;
    }
  };
  walk(0, 0, 0);
  return best;
}

/** A small seeded generator (mulberry32, common practice, no source): the random cases are the same on every run. */
function rng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
const random = rng(20261202);
const matrix = (rows: number, cols: number, forbidden = 0): Costs =>
  Array.from({ length: rows }, () => Array.from({ length: cols }, () => (random() < forbidden ? null : Math.floor(random() * 100))));

function expectValid(costs: Costs, pairs: Array<[number, number]>) {
  expect(new Set(pairs.map(([i]) => i)).size).toBe(pairs.length);
  expect(new Set(pairs.map(([, j]) => j)).size).toBe(pairs.length);
  for (const [i, j] of pairs) expect(costs[i][j]).not.toBeNull();
}

describe('solveAssignment (the Hungarian method through munkres-js)', () => {
  it('when given the published worked example, then the minimum total is 15 (Wikipedia, "Hungarian algorithm", section Example: Alice, Bob and Carol)', () => {
    const costs = [
      [8, 4, 7],
      [5, 2, 3],
      [9, 4, 8],
    ];
    const result = solveAssignment(costs);
    expect(result.totalCost).toBe(15);
    // The example's unique optimum: Alice cleans the bathroom (8), Bob washes the windows (3), Carol sweeps the floors (4).
    expect(result.pairs).toEqual([
      [0, 0],
      [1, 2],
      [2, 1],
    ]);
  });

  it.each([
    [3, 3],
    [5, 5],
    [8, 8],
    [4, 7],
    [7, 4],
    [1, 6],
    [6, 1],
  ])('when a random %i x %i matrix is solved, then the total equals that of the `munkres` package (an independent implementation from the registry)', (rows, cols) => {
    for (let k = 0; k < 15; k += 1) {
      const costs = matrix(rows, cols) as number[][];
      const ours = solveAssignment(costs);
      const theirs = munkres(costs).reduce((sum, [i, j]) => sum + costs[i][j], 0);
      expect(ours.totalCost).toBe(theirs);
      expect(ours.pairs).toHaveLength(Math.min(rows, cols));
      expectValid(costs, ours.pairs);
    }
  });

  it.each([
    [3, 3],
    [4, 6],
    [6, 4],
    [5, 5],
  ])('when a random %i x %i matrix has forbidden pairs, then as many rows as possible are filled at the least total (brute force over every assignment, an independent check)', (rows, cols) => {
    for (let k = 0; k < 25; k += 1) {
      const costs = matrix(rows, cols, 0.4);
      const ours = solveAssignment(costs);
      // Brute force walks rows; with more rows than columns, walk the transposed matrix.
      const best = rows <= cols ? bruteForce(costs) : bruteForce(costs[0].map((_, j) => costs.map((row) => row[j])));
      expectValid(costs, ours.pairs);
      expect({ filled: ours.pairs.length, total: ours.totalCost }).toEqual(best);
    }
  });

  it('when rows outnumber columns, then each column gets one row and the other rows none; and the reverse', () => {
    expect(solveAssignment([[1, 2], [3, 4], [0, 9]])).toEqual({ pairs: [[0, 1], [2, 0]], totalCost: 2 });
    expect(solveAssignment([[5, 1, 9]])).toEqual({ pairs: [[0, 1]], totalCost: 1 });
  });

  it('when a cheap pair would leave another row with only forbidden cells, then the solver fills both rows instead', () => {
    // Row 1 may only take column 0; giving it to row 0 (cost 1) would leave row 1 empty.
    expect(solveAssignment([[1, 50], [2, null]])).toEqual({ pairs: [[0, 1], [1, 0]], totalCost: 52 });
  });

  it('when every cell is forbidden, or a row has none allowed, then those rows get no pair', () => {
    expect(solveAssignment([[null, null], [null, null]])).toEqual({ pairs: [], totalCost: 0 });
    expect(solveAssignment([[null, 4], [null, 3]])).toEqual({ pairs: [[1, 1]], totalCost: 3 });
  });

  it('when costs are negative or fractional, then the total is still the minimum', () => {
    expect(solveAssignment([[-5, 0], [0, -5]]).totalCost).toBe(-10);
    expect(solveAssignment([[0.5, 0.25], [0.75, 0.5]]).totalCost).toBe(1);
  });

  it('when the matrix is squared, then padding and forbidden cells share one cost bigger than any difference the allowed cells make', () => {
    const { matrix: square, big } = squareCostMatrix([[1, null, 3]]);
    expect(square).toEqual([
      [1, big, 3],
      [big, big, big],
      [big, big, big],
    ]);
    expect(big).toBeGreaterThan(2 * 3);
    expect(readAssignment([[1, null, 3]], [[0, 1], [1, 0], [2, 2]])).toEqual({ pairs: [], totalCost: 0 });
  });
});

describe('the solver input', () => {
  it.each([
    ['a non-numeric cost', { costs: [[1, 'x']] }],
    ['ragged rows', { costs: [[1, 2], [3]] }],
    ['no rows', { costs: [] }],
    ['an empty row', { costs: [[]] }],
    ['too many rows', { costs: Array.from({ length: 201 }, () => [1]) }],
    ['too many columns', { costs: [Array.from({ length: 201 }, () => 1)] }],
    ['a cost beyond the bound', { costs: [[1e12]] }],
  ])('when it has %s, then it is refused', (_label, body) => {
    expect(SolveAssignmentSchema.safeParse(body).success).toBe(false);
  });

  it('when it is a 200 x 200 matrix with nulls, then it is accepted', () => {
    expect(SolveAssignmentSchema.safeParse({ costs: matrix(200, 200, 0.2) }).success).toBe(true);
  });
});

// ---- Refusal rules --------------------------------------------------------------------------

const T = (hours: number) => new Date(Date.UTC(2026, 11, 10, 8) + hours * 3600_000);
const window = { startsAt: T(0), endsAt: T(8) };
const clean = (): RefusalContext => ({
  vehicle: { tag: 'FW3-EP-006', status: 'available', stage: 'Early prototype', minDriverLevel: 2, openSafetyFindings: [] },
  driver: { name: 'Ines Valbrook', drivingLevel: 2, licenceExpiry: '2028-01-31' },
  vehicleBookings: [],
  driverBookings: [],
});
const codes = (ctx: RefusalContext, w = window) => assignmentRefusals(w, ctx).map((r) => r.code);

describe('assignmentRefusals (issue 6)', () => {
  it('when nothing stands in the way, then there is no reason', () => {
    expect(assignmentRefusals(window, clean())).toEqual([]);
  });

  it.each([
    ['overlaps another booking of the vehicle', (c: RefusalContext) => c.vehicleBookings.push({ id: 'a1', startsAt: T(6), endsAt: T(10), label: 'with Hollis Grane' }), 'vehicle-overlap'],
    ['overlaps another booking of the driver', (c: RefusalContext) => c.driverBookings.push({ id: 'a2', startsAt: T(-2), endsAt: T(1), label: 'with FW3-IC-002' }), 'driver-overlap'],
    ['has an open safety finding on the vehicle', (c: RefusalContext) => c.vehicle.openSafetyFindings.push('Long brake pedal travel after bleed'), 'vehicle-not-cleared'],
    ['takes a vehicle that is down', (c: RefusalContext) => (c.vehicle.status = 'down'), 'vehicle-unavailable'],
    ['takes a vehicle that is retired', (c: RefusalContext) => (c.vehicle.status = 'retired'), 'vehicle-unavailable'],
    ['gives the stage to a driver below its level', (c: RefusalContext) => (c.driver.drivingLevel = 1), 'driver-level'],
    ['ends after the licence expired', (c: RefusalContext) => (c.driver.licenceExpiry = '2026-12-09'), 'licence-expired'],
    ['has no licence expiry on record', (c: RefusalContext) => (c.driver.licenceExpiry = null), 'licence-unknown'],
    ['finds the vehicle still out with someone else', (c: RefusalContext) => (c.vehicleOutWith = { id: 'a3', startsAt: T(-30), endsAt: T(-6), label: 'Yara Pendlecott' }), 'vehicle-in-use'],
  ])('when the assignment %s, then that reason is given', (_label, change, code) => {
    const ctx = clean();
    change(ctx);
    expect(codes(ctx)).toEqual([code]);
  });

  it('when a booking ends exactly as the window starts, then it does not overlap (windows are half-open)', () => {
    const ctx = clean();
    ctx.vehicleBookings.push({ id: 'a', startsAt: T(-4), endsAt: T(0), label: 'x' });
    ctx.driverBookings.push({ id: 'b', startsAt: T(8), endsAt: T(10), label: 'y' });
    expect(codes(ctx)).toEqual([]);
  });

  it('when the licence is valid through the last day of the window, then it passes; when it expires that day and the window runs past midnight, then it is refused', () => {
    const ctx = clean();
    ctx.driver.licenceExpiry = '2026-12-10';
    expect(codes(ctx)).toEqual([]);
    expect(codes(ctx, { startsAt: T(0), endsAt: T(20) })).toEqual(['licence-expired']);
  });

  it('when several rules fail at once, then every reason is listed, with the overlapping assignments named', () => {
    const ctx = clean();
    ctx.vehicleBookings.push({ id: 'a1', startsAt: T(1), endsAt: T(2), label: 'with Hollis Grane' });
    ctx.driverBookings.push({ id: 'a2', startsAt: T(3), endsAt: T(4), label: 'with FW3-IC-002' });
    ctx.vehicle.openSafetyFindings.push('HV interlock loop open');
    ctx.vehicle.status = 'down';
    ctx.driver.drivingLevel = 0;
    ctx.driver.licenceExpiry = '2025-01-01';
    const reasons = assignmentRefusals(window, ctx);
    expect(reasons.map((r) => r.code)).toEqual(['vehicle-overlap', 'driver-overlap', 'vehicle-not-cleared', 'vehicle-unavailable', 'driver-level', 'licence-expired']);
    expect(reasons[0].assignmentIds).toEqual(['a1']);
    expect(reasons[2].message).toContain('HV interlock loop open');
    expect(reasons.filter((r) => r.overridable).map((r) => r.code)).toEqual(['driver-level']);
  });

  it('when a level override is given, then only the level reason goes; the safety reason never does', () => {
    const ctx = clean();
    ctx.driver.drivingLevel = 1;
    ctx.vehicle.openSafetyFindings.push('Parking brake does not hold');
    const reasons = assignmentRefusals(window, ctx);
    expect(standingRefusals(reasons, true).map((r) => r.code)).toEqual(['vehicle-not-cleared']);
    expect(standingRefusals(reasons, false).map((r) => r.code)).toEqual(['vehicle-not-cleared', 'driver-level']);
  });
});

describe('windows, licences and overdue returns', () => {
  it.each([
    ['2026-12-10T08:00:00Z', '2026-12-10T07:00:00Z', 'The window must end after it starts.'],
    ['2026-12-10T08:00:00Z', '2026-12-10T08:00:00Z', 'The window must end after it starts.'],
    ['2026-12-10T08:00:00Z', '2026-12-10T08:10:00Z', 'A window lasts at least 15 minutes.'],
    ['2026-12-01T08:00:00Z', '2027-01-01T08:00:01Z', 'A window lasts at most 31 days; book a longer use as several.'],
    ['2026-12-01T08:00:00Z', '2027-01-01T08:00:00Z', null],
    ['2026-12-10T09:00:00+01:00', '2026-12-10T08:30:00Z', null],
  ])('when a window runs from %s to %s, then the problem is %p', (from, to, problem) => {
    expect(windowProblem(from, to)).toBe(problem);
  });

  it('when a create request has its window backwards, then the schema refuses it on endsAt', () => {
    const parsed = CreateAssignmentSchema.safeParse({
      programId: '00000000-0000-4000-8000-000000000000',
      assetId: '00000000-0000-4000-8000-000000000001',
      driverId: '00000000-0000-4000-8000-000000000002',
      startsAt: '2026-12-10T10:00:00Z',
      endsAt: '2026-12-10T09:00:00Z',
      purpose: 'climate',
    });
    expect(parsed.success).toBe(false);
    expect(parsed.error?.issues[0].path).toEqual(['endsAt']);
  });

  it.each([
    ['2026-12-31', { expired: false, expiresSoon: false }],
    ['2026-12-30', { expired: false, expiresSoon: true }],
    ['2026-12-01', { expired: false, expiresSoon: true }],
    ['2026-11-30', { expired: true, expiresSoon: false }],
    [null, { expired: true, expiresSoon: false }],
  ])('when the licence expires on %p and today is 2026-12-01 (30-day warning), then it is %p', (expiry, state) => {
    expect(licenceState(expiry, '2026-12-01T10:00:00Z')).toEqual(state);
  });

  it('when an assignment is checked out past its end, then it is an overdue return; planned or returned ones never are', () => {
    const asOf = T(9);
    expect(isOverdueReturn({ status: 'checked-out', endsAt: T(8) }, asOf)).toBe(true);
    expect(isOverdueReturn({ status: 'checked-out', endsAt: T(10) }, asOf)).toBe(false);
    expect(isOverdueReturn({ status: 'planned', endsAt: T(8) }, asOf)).toBe(false);
    expect(isOverdueReturn({ status: 'returned', endsAt: T(8) }, asOf)).toBe(false);
  });
});

describe('utilisation (hours assigned / hours available)', () => {
  const period = { start: T(0), end: T(100) };

  it('when windows overlap or touch, then they merge, and windows outside the period are clipped away', () => {
    expect(
      mergeWindows(
        [
          { start: T(-10), end: T(5) },
          { start: T(4), end: T(10) },
          { start: T(10), end: T(12) },
          { start: T(50), end: T(60) },
          { start: T(95), end: T(130) },
          { start: T(200), end: T(210) },
        ],
        period,
      ).map((w) => [(w.start - T(0).getTime()) / 3600_000, (w.end - T(0).getTime()) / 3600_000]),
    ).toEqual([
      [0, 12],
      [50, 60],
      [95, 100],
    ]);
  });

  it.each([
    { label: 'no assignment', windows: [], assigned: 0, available: 100, ratio: 0 },
    { label: 'one 25-hour window inside', windows: [[10, 35]], assigned: 25, available: 100, ratio: 0.25 },
    { label: 'two overlapping windows (counted once)', windows: [[10, 30], [20, 40]], assigned: 30, available: 100, ratio: 0.3 },
    { label: 'a window that starts before the period', windows: [[-50, 10]], assigned: 10, available: 100, ratio: 0.1 },
    { label: 'a window that covers the whole period and more', windows: [[-5, 500]], assigned: 100, available: 100, ratio: 1 },
  ] as Array<{ label: string; windows: Array<[number, number]>; assigned: number; available: number; ratio: number }>)(
    'when the vehicle had $label in a 100-hour period, then $assigned h assigned of $available h available',
    ({ windows, assigned, available, ratio }) => {
      const u = utilisation(windows.map(([s, e]) => ({ start: T(s), end: T(e) })), period);
      expect(u).toEqual({ assignedHours: assigned, availableHours: available, utilisation: ratio });
    },
  );

  it('when unavailable time is given, then it comes off the hours available and assigned time inside it does not count', () => {
    const u = utilisation([{ start: T(0), end: T(30) }], period, [{ start: T(20), end: T(40) }]);
    expect(u).toEqual({ assignedHours: 20, availableHours: 80, utilisation: 0.25 });
  });

  it('when the held time of each status is read, then planned holds its window, checked-out holds to now while overdue, returned to its check-in, cancelled nothing', () => {
    const base = { startsAt: T(0), endsAt: T(8) };
    expect(heldWindow({ ...base, status: 'planned' }, T(50))).toEqual({ start: T(0).getTime(), end: T(8).getTime() });
    expect(heldWindow({ ...base, status: 'checked-out', checkedOutAt: T(-1) }, T(12))).toEqual({ start: T(-1).getTime(), end: T(12).getTime() });
    expect(heldWindow({ ...base, status: 'returned', checkedOutAt: T(0.5), checkedInAt: T(6) }, T(50))).toEqual({ start: T(0).getTime(), end: T(6).getTime() });
    expect(heldWindow({ ...base, status: 'cancelled' }, T(50))).toBeNull();
  });
});
