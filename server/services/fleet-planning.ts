import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import {
  PROPOSAL_COST_MODEL,
  assignmentRefusals,
  driverCost,
  explainPair,
  heldWindow,
  overlaps,
  utilisation,
  vehicleCost,
  type Booking,
  type Window,
} from '../../shared/domain/fleet';
import { ASSET_KIND_LABELS, type AssetStatus } from '../../shared/schemas/assets';
import type {
  AcceptProposalSchema,
  Assignment,
  AssignmentStatus,
  CreateProposalSchema,
  Proposal,
  RefusalReason,
  Utilisation,
  UtilisationQuerySchema,
} from '../../shared/schemas/fleet';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { solveAssignment } from './assignment-solver';
import { createAssignment } from './fleet';
import { assertMember } from './stages';

type UtilisationQuery = z.output<typeof UtilisationQuerySchema>;
type CreateProposal = z.output<typeof CreateProposalSchema>;
type AcceptProposal = z.output<typeof AcceptProposalSchema>;

const DAY_MS = 24 * 3600_000;
const round = (x: number, digits = 2) => Math.round(x * 10 ** digits) / 10 ** digits;

type HeldRow = { id: string; asset_id: string; driver_id: string; status: AssignmentStatus; starts_at: Date; ends_at: Date; checked_out_at: Date | null; checked_in_at: Date | null };

/** Assignments of the program whose held time (shared/domain/fleet heldWindow) may touch [from, to). */
async function heldRows(deps: Deps, programId: string, from: Date, to: Date): Promise<HeldRow[]> {
  return deps.sequelize.query<HeldRow>(
    `SELECT a.id, a.asset_id, a.driver_id, a.status, a.starts_at, a.ends_at,
            (SELECT c.at FROM assignment_checks c WHERE c.assignment_id = a.id AND c.kind = 'check-out') AS checked_out_at,
            (SELECT c.at FROM assignment_checks c WHERE c.assignment_id = a.id AND c.kind = 'check-in') AS checked_in_at
       FROM assignments a
      WHERE a.program_id = $1 AND a.status <> 'cancelled'
        AND a.starts_at < $3 AND (a.ends_at > $2 OR a.status IN ('checked-out', 'returned'))`,
    { bind: [programId, from, to], type: QueryTypes.SELECT },
  );
}

const heldOf = (rows: HeldRow[], asOf: Date) =>
  rows
    .map((r) => ({
      row: r,
      window: heldWindow(
        { status: r.status, startsAt: r.starts_at, endsAt: r.ends_at, checkedOutAt: r.checked_out_at, checkedInAt: r.checked_in_at },
        asOf,
      ),
    }))
    .filter((h): h is { row: HeldRow; window: Window } => h.window !== null);

// ---- Utilisation --------------------------------------------------------------------------

/**
 * The definition the report states: hours assigned are the union of the time each vehicle was
 * held by an assignment (planned: its window; checked out: from check-out to the end, or to now
 * while overdue; returned: to its check-in; cancelled: none), clipped to the period. Hours
 * available are the period's whole length: Proofyard does not record when a vehicle was down,
 * so down time is not taken off (a vehicle down today still counts as available). A stage's
 * figure adds up the hours of the vehicles on it now; retired vehicles count only when they were
 * assigned in the period.
 */
export const UTILISATION_DEFINITION =
  'Hours assigned: the time each vehicle was held by an assignment (planned: its window; checked out: from check-out to the end, or until now while overdue; returned: until its check-in), clipped to the period, overlaps counted once. Hours available: the whole period (down time is not recorded, so it is not taken off). A stage adds up the vehicles on it now; retired vehicles count only if assigned in the period.';

export async function fleetUtilisation(deps: Deps, user: SessionUser, q: UtilisationQuery, asOf = new Date()): Promise<Utilisation> {
  assertMember(user, q.programId, 'This program');
  const period = { start: new Date(q.from), end: new Date(q.to) };
  const held = heldOf(await heldRows(deps, q.programId, period.start, period.end), asOf).filter((h) =>
    overlaps({ startsAt: h.window.start, endsAt: h.window.end }, { startsAt: period.start, endsAt: period.end }),
  );
  const vehicles = await deps.sequelize.query<{ id: string; tag: string; status: AssetStatus; stage_id: string; stage: string }>(
    `SELECT v.id, v.tag, v.status, v.stage_id, s.name AS stage FROM assets v JOIN stages s ON s.id = v.stage_id
      WHERE v.program_id = $1 AND v.kind = 'vehicle' AND (v.status <> 'retired' OR v.id = ANY($2::uuid[]))
      ORDER BY s.position, v.tag`,
    { bind: [q.programId, [...new Set(held.map((h) => h.row.asset_id))]], type: QueryTypes.SELECT },
  );
  const perVehicle = vehicles.map((v) => {
    const mine = held.filter((h) => h.row.asset_id === v.id);
    const u = utilisation(mine.map((h) => h.window), period);
    return { assetId: v.id, tag: v.tag, stageId: v.stage_id, stage: v.stage, status: v.status, assignments: mine.length, ...u };
  });
  const figures = (list: Array<{ assignedHours: number; availableHours: number }>) => {
    const assignedHours = list.reduce((n, x) => n + x.assignedHours, 0);
    const availableHours = list.reduce((n, x) => n + x.availableHours, 0);
    return { assignedHours: round(assignedHours), availableHours: round(availableHours), utilisation: availableHours > 0 ? round(assignedHours / availableHours, 4) : 0 };
  };
  const stageIds = [...new Set(vehicles.map((v) => v.stage_id))];
  return {
    from: period.start.toISOString(),
    to: period.end.toISOString(),
    definition: UTILISATION_DEFINITION,
    vehicles: perVehicle.map((v) => ({ ...v, assignedHours: round(v.assignedHours), availableHours: round(v.availableHours), utilisation: round(v.utilisation, 4) })),
    stages: stageIds.map((stageId) => {
      const list = perVehicle.filter((v) => v.stageId === stageId);
      return { stageId, stage: list[0].stage, vehicles: list.length, ...figures(list) };
    }),
    total: figures(perVehicle),
  };
}

// ---- Proposals ----------------------------------------------------------------------------

type Vehicle = { id: string; tag: string; status: AssetStatus; stage_id: string; stage: string; min_driver_level: number; odometer_km: number; safety: string[] };
type Driver = { id: string; name: string; driving_level: number; licence_expiry: string | null };
type Request = CreateProposal['requests'][number] & { index: number; window: { startsAt: Date; endsAt: Date } };

/** Requests whose windows overlap, directly or through a chain, share vehicles and drivers: they are solved together. */
function overlapGroups(requests: Request[]): Request[][] {
  const sorted = [...requests].sort((a, b) => a.window.startsAt.getTime() - b.window.startsAt.getTime());
  const groups: Request[][] = [];
  let end = -Infinity;
  for (const r of sorted) {
    if (groups.length && r.window.startsAt.getTime() < end) groups[groups.length - 1].push(r);
    else groups.push([r]);
    end = Math.max(end, r.window.endsAt.getTime());
  }
  return groups;
}

/**
 * Proposes a vehicle and a driver for each request, by minimum total cost (the Hungarian method,
 * server/services/assignment-solver), in two steps per group of requests that overlap in time:
 * first vehicles to requests (cost: the vehicle's utilisation balance plus the cheapest driver who
 * may take it), then drivers to the chosen vehicles (cost: level margin and kilometres driven).
 * A pair is eligible only when the refusal rules (shared/domain/fleet) find nothing; no override
 * is ever proposed. Requests left without a vehicle or a driver are listed with the reasons.
 */
export async function proposeAssignments(deps: Deps, user: SessionUser, input: CreateProposal, asOf = new Date()): Promise<Proposal> {
  assertMember(user, input.programId, 'This program');
  const requests: Request[] = input.requests.map((r, index) => ({ ...r, index, window: { startsAt: new Date(r.startsAt), endsAt: new Date(r.endsAt) } }));
  const spanFrom = new Date(Math.min(...requests.map((r) => r.window.startsAt.getTime()), asOf.getTime() - 30 * DAY_MS));
  const spanTo = new Date(Math.max(...requests.map((r) => r.window.endsAt.getTime()), asOf.getTime()));

  const vehicleRows = await deps.sequelize.query<Omit<Vehicle, 'safety'> & { safety: string[] | null; kind: string }>(
    `SELECT v.id, v.tag, v.kind, v.status, v.stage_id, s.name AS stage, s.min_driver_level, v.odometer_km,
            (SELECT array_agg(f.title ORDER BY f.created_at) FROM findings f
              WHERE f.asset_id = v.id AND f.severity = 'safety' AND f.status NOT IN ('verified', 'rejected')) AS safety
       FROM assets v JOIN stages s ON s.id = v.stage_id
      WHERE v.program_id = $1 ORDER BY s.position, v.tag`,
    { bind: [input.programId], type: QueryTypes.SELECT },
  );
  const assets = vehicleRows.map((v) => ({ ...v, safety: v.safety ?? [] }));
  const drivers = await deps.sequelize.query<Driver>(
    `SELECT u.id, u.name, coalesce(dp.driving_level, 0) AS driving_level, dp.licence_expiry::text AS licence_expiry
       FROM users u JOIN program_members pm ON pm.user_id = u.id AND pm.program_id = $1
       LEFT JOIN driver_profiles dp ON dp.user_id = u.id
      WHERE u.active AND u.role <> 'admin' AND (u.role = 'driver' OR dp.user_id IS NOT NULL)
      ORDER BY u.name, u.id`,
    { bind: [input.programId], type: QueryTypes.SELECT },
  );
  const live = await deps.sequelize.query<{ id: string; asset_id: string; driver_id: string; starts_at: Date; ends_at: Date; tag: string; driver: string }>(
    `SELECT a.id, a.asset_id, a.driver_id, a.starts_at, a.ends_at, v.tag, d.name AS driver
       FROM assignments a JOIN assets v ON v.id = a.asset_id JOIN users d ON d.id = a.driver_id
      WHERE a.program_id = $1 AND a.status IN ('planned', 'checked-out') AND a.starts_at < $3 AND a.ends_at > $2`,
    { bind: [input.programId, spanFrom, spanTo], type: QueryTypes.SELECT },
  );
  // Balance over the last 30 days: vehicle utilisation and kilometres per driver.
  const last30 = { start: new Date(asOf.getTime() - 30 * DAY_MS), end: asOf };
  const held = heldOf(await heldRows(deps, input.programId, last30.start, last30.end), asOf);
  const util30 = new Map(assets.map((v) => [v.id, utilisation(held.filter((h) => h.row.asset_id === v.id).map((h) => h.window), last30).utilisation]));
  const kmRows = await deps.sequelize.query<{ driver_id: string; km: number }>(
    `SELECT a.driver_id, sum(ci.odometer_km - co.odometer_km) AS km
       FROM assignments a
       JOIN assignment_checks co ON co.assignment_id = a.id AND co.kind = 'check-out'
       JOIN assignment_checks ci ON ci.assignment_id = a.id AND ci.kind = 'check-in'
      WHERE a.program_id = $1 AND ci.at >= $2 AND ci.at <= $3
      GROUP BY a.driver_id`,
    { bind: [input.programId, last30.start, asOf], type: QueryTypes.SELECT },
  );
  const km30 = new Map(kmRows.map((r) => [r.driver_id, Number(r.km)]));

  const vehicleBookings = (id: string): Booking[] =>
    live.filter((b) => b.asset_id === id).map((b) => ({ id: b.id, startsAt: b.starts_at, endsAt: b.ends_at, label: `with ${b.driver}` }));
  const driverBookings = (id: string): Booking[] =>
    live.filter((b) => b.driver_id === id).map((b) => ({ id: b.id, startsAt: b.starts_at, endsAt: b.ends_at, label: `with ${b.tag}` }));
  const reasonsFor = (r: Request, v: Vehicle, d: Driver): RefusalReason[] =>
    assignmentRefusals(r.window, {
      vehicle: { tag: v.tag, status: v.status, stage: v.stage, minDriverLevel: v.min_driver_level, openSafetyFindings: v.safety },
      driver: { name: d.name, drivingLevel: d.driving_level, licenceExpiry: d.licence_expiry },
      vehicleBookings: vehicleBookings(v.id),
      driverBookings: driverBookings(d.id),
    });
  const VEHICLE_CODES = new Set(['vehicle-overlap', 'vehicle-not-cleared', 'vehicle-unavailable']);
  const costOfDriver = (v: Vehicle, d: Driver) => driverCost(d.driving_level - v.min_driver_level, km30.get(d.id) ?? 0);

  const pairs: Proposal['pairs'] = [];
  const unfilled: Proposal['unfilled'] = [];
  for (const group of overlapGroups(requests)) {
    // Candidates per request: matching vehicles, each with its eligible drivers.
    const candidates = new Map<number, Array<{ v: Vehicle; drivers: Driver[] }>>();
    for (const r of group) {
      const why: string[] = [];
      let matching: Vehicle[];
      if (r.assetKind && r.assetKind !== 'vehicle') {
        why.push(`Only vehicles are assigned to drivers, not a ${ASSET_KIND_LABELS[r.assetKind].toLowerCase()}.`);
        matching = [];
      } else {
        matching = assets.filter(
          (v) => v.kind === 'vehicle' && (!r.assetId || v.id === r.assetId.toLowerCase()) && (!r.stageId || v.stage_id === r.stageId.toLowerCase()),
        );
        if (!matching.length) why.push(r.assetId ? 'That asset is not a vehicle of this program.' : 'No vehicle of this program matches the request.');
      }
      const list: Array<{ v: Vehicle; drivers: Driver[] }> = [];
      for (const v of matching) {
        const byDriver = drivers.map((d) => ({ d, reasons: reasonsFor(r, v, d) }));
        const vehicleReasons = (byDriver[0]?.reasons ?? []).filter((x) => VEHICLE_CODES.has(x.code));
        if (vehicleReasons.length) {
          why.push(...vehicleReasons.map((x) => x.message));
          continue;
        }
        const eligible = byDriver.filter((x) => x.reasons.length === 0).map((x) => x.d);
        if (!eligible.length) {
          const sample = byDriver.slice(0, 4).map((x) => x.reasons.find((y) => !VEHICLE_CODES.has(y.code))?.message).filter(Boolean);
          why.push(`No driver may take ${v.tag}${drivers.length ? `: ${sample.join(' ')}${byDriver.length > 4 ? ' ...' : ''}` : ' (the roster is empty)'}`);
          continue;
        }
        list.push({ v, drivers: eligible });
      }
      if (!list.length) unfilled.push({ request: r.index, reasons: why.length ? [...new Set(why)].slice(0, 8) : ['No vehicle matches.'] });
      candidates.set(r.index, list);
    }
    const open = group.filter((r) => candidates.get(r.index)!.length);
    if (!open.length) continue;

    // Step 1: vehicles to requests.
    const vehicleCols = [...new Map(open.flatMap((r) => candidates.get(r.index)!.map((c) => [c.v.id, c.v] as const))).values()];
    const step1 = solveAssignment(
      open.map((r) =>
        vehicleCols.map((v) => {
          const c = candidates.get(r.index)!.find((x) => x.v.id === v.id);
          return c ? Math.round(100 * (vehicleCost(util30.get(v.id) ?? 0) + Math.min(...c.drivers.map((d) => costOfDriver(v, d))))) : null;
        }),
      ),
    );
    const chosen = new Map(step1.pairs.map(([i, j]) => [open[i].index, vehicleCols[j]]));
    for (const r of open) {
      if (!chosen.has(r.index)) unfilled.push({ request: r.index, reasons: ['Every vehicle that suits this request goes to another request at the same time.'] });
    }

    // Step 2: drivers to the chosen vehicles.
    const filled = open.filter((r) => chosen.has(r.index));
    const driverCols = [...new Map(filled.flatMap((r) => candidates.get(r.index)!.find((c) => c.v.id === chosen.get(r.index)!.id)!.drivers.map((d) => [d.id, d] as const))).values()];
    const step2 = solveAssignment(
      filled.map((r) => {
        const v = chosen.get(r.index)!;
        const eligible = new Set(candidates.get(r.index)!.find((c) => c.v.id === v.id)!.drivers.map((d) => d.id));
        return driverCols.map((d) => (eligible.has(d.id) ? Math.round(100 * costOfDriver(v, d)) : null));
      }),
    );
    const driverOf = new Map(step2.pairs.map(([i, j]) => [filled[i].index, driverCols[j]]));
    for (const r of filled) {
      const v = chosen.get(r.index)!;
      const d = driverOf.get(r.index);
      if (!d) {
        unfilled.push({ request: r.index, reasons: [`Every driver who may take ${v.tag} goes to another request at the same time.`] });
        continue;
      }
      const u = util30.get(v.id) ?? 0;
      const km = km30.get(d.id) ?? 0;
      const cost = round(vehicleCost(u) + costOfDriver(v, d));
      pairs.push({
        request: r.index,
        assetId: v.id,
        assetTag: v.tag,
        driver: { id: d.id, name: d.name },
        purpose: r.purpose,
        startsAt: r.window.startsAt.toISOString(),
        endsAt: r.window.endsAt.toISOString(),
        notes: r.notes ?? '',
        cost,
        explanation: explainPair({ driver: d.name, level: d.driving_level, minLevel: v.min_driver_level, stage: v.stage, km30d: km, tag: v.tag, utilisation30d: u, purpose: r.purpose, cost }),
      });
    }
  }
  pairs.sort((a, b) => a.request - b.request);
  unfilled.sort((a, b) => a.request - b.request);
  return { programId: input.programId, pairs, unfilled, totalCost: round(pairs.reduce((n, p) => n + p.cost, 0)), costModel: PROPOSAL_COST_MODEL };
}

/** Books the pairs the coordinator accepted, each on its own (the rules are checked again); answers what was booked and what was refused. */
export async function acceptProposal(deps: Deps, user: SessionUser, input: AcceptProposal, asOf = new Date()) {
  assertMember(user, input.programId, 'This program');
  const created: Assignment[] = [];
  const refusedPairs: Array<{ pair: number; error: { code: string; message: string; details?: unknown } }> = [];
  for (const [pair, p] of input.pairs.entries()) {
    try {
      created.push(await createAssignment(deps, user, { programId: input.programId, ...p }, asOf));
    } catch (err) {
      if (!(err instanceof AppError) || err.status >= 500) throw err;
      refusedPairs.push({ pair, error: { code: err.code, message: err.message, ...(err.details ? { details: err.details } : {}) } });
    }
  }
  return { created, refused: refusedPairs };
}
