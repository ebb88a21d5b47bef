import { QueryTypes, type Transaction } from 'sequelize';
import { z } from 'zod';
import {
  assignmentRefusals,
  formatUtc,
  isOverdueReturn,
  licenceState,
  standingRefusals,
  type Booking,
  type RefusalContext,
} from '../../shared/domain/fleet';
import type { AssetStatus } from '../../shared/schemas/assets';
import type { Role } from '../../shared/schemas/auth';
import {
  ASSIGNMENT_LIST_MAX,
  ASSIGNMENT_LIST_MAX_DAYS,
  ASSIGNMENT_PURPOSE_LABELS,
  windowProblem,
  type Assignment,
  type AssignmentListQuerySchema,
  type AssignmentPurpose,
  type AssignmentStatus,
  type CancelAssignmentSchema,
  type CheckInSchema,
  type CheckOutSchema,
  type CreateAssignmentSchema,
  type DriverListQuerySchema,
  type DriverProfile,
  type RefusalReason,
  type UpdateAssignmentSchema,
  type UpdateDriverProfileSchema,
} from '../../shared/schemas/fleet';
import { Photo } from '../db/models';
import type { Deps } from '../deps';
import { AppError, conflict, fieldError, notFound } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { createFinding } from './findings';
import { notifyDriver } from './fleet-mail';
import { historyOf, recordHistory } from './history';
import { photoDtos } from './photos';
import { assertMember } from './stages';

type CreateInput = z.output<typeof CreateAssignmentSchema>;
type UpdateInput = z.output<typeof UpdateAssignmentSchema>;
type CancelInput = z.output<typeof CancelAssignmentSchema>;
type CheckOutInput = z.output<typeof CheckOutSchema>;
type CheckInInput = z.output<typeof CheckInSchema>;
type ListQuery = z.output<typeof AssignmentListQuerySchema>;
type DriverQuery = z.output<typeof DriverListQuerySchema>;
type DriverInput = z.output<typeof UpdateDriverProfileSchema>;

/** Who books, changes and cancels assignments, keeps the roster, and may check any vehicle out or in. */
export const FLEET_MANAGERS = ['coordinator', 'lead'] as const satisfies readonly Role[];
/** A check-out may come this long before the window starts (the product's own choice). */
export const EARLY_CHECKOUT_HOURS = 12;

const DAY_MS = 24 * 3600_000;

export function refused(reasons: RefusalReason[]): AppError {
  return new AppError(422, 'assignment/refused', `This assignment cannot be booked. ${reasons.map((r) => r.message).join(' ')}`, { reasons });
}

const isManager = (user: SessionUser) => (FLEET_MANAGERS as readonly Role[]).includes(user.role);

// ---- Locks --------------------------------------------------------------------------------

/**
 * Serialises bookings of the same vehicles and drivers: transaction-level advisory locks taken in
 * one sorted order (so two bookings never wait on each other in a circle). The exclusion
 * constraints of migration 0005 are the backstop.
 */
async function lockBookings(deps: Deps, transaction: Transaction, assetIds: string[], driverIds: string[]) {
  const keys = [...new Set([...assetIds.map((id) => `fleet-asset:${id.toLowerCase()}`), ...driverIds.map((id) => `fleet-driver:${id.toLowerCase()}`)])].sort();
  for (const key of keys) {
    await deps.sequelize.query(`SELECT pg_advisory_xact_lock(hashtextextended($1, 0))`, { bind: [key], transaction });
  }
}

/** A booking that raced past the locks (another instance) and hit the exclusion constraint: refused like an overlap. */
async function guardOverlap<T>(work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (err) {
    const code = (err as { original?: { code?: string }; parent?: { code?: string } })?.original?.code ?? (err as { parent?: { code?: string } })?.parent?.code;
    if (code === '23P01') {
      throw refused([
        { code: 'vehicle-overlap', message: 'Another booking of this vehicle or driver for this window was saved at the same moment. Reload to see it.', overridable: false },
      ]);
    }
    throw err;
  }
}

// ---- Reading assignments --------------------------------------------------------------------

type Row = {
  id: string;
  program_id: string;
  asset_id: string;
  asset_tag: string;
  asset_status: AssetStatus;
  asset_odometer_km: number;
  stage_id: string;
  stage_name: string;
  min_driver_level: number;
  blocker: string | null;
  driver_id: string;
  driver_name: string;
  starts_at: Date;
  ends_at: Date;
  purpose: AssignmentPurpose;
  notes: string;
  status: AssignmentStatus;
  level_override_reason: string | null;
  cancel_reason: string | null;
  created_by: string | null;
  created_by_name: string | null;
  created_at: Date;
  updated_at: Date;
  version: number;
};

const SELECT_ROWS = `
  SELECT a.id, a.program_id, a.asset_id, v.tag AS asset_tag, v.status AS asset_status, v.odometer_km AS asset_odometer_km,
         v.stage_id, s.name AS stage_name, s.min_driver_level, b.title AS blocker,
         a.driver_id, d.name AS driver_name, a.starts_at, a.ends_at, a.purpose, a.notes, a.status,
         a.level_override_reason, a.cancel_reason, a.created_by, c.name AS created_by_name, a.created_at, a.updated_at, a.version
    FROM assignments a
    JOIN assets v ON v.id = a.asset_id
    JOIN stages s ON s.id = v.stage_id
    JOIN users d ON d.id = a.driver_id
    LEFT JOIN users c ON c.id = a.created_by
    LEFT JOIN LATERAL (
      SELECT f.title FROM findings f
       WHERE f.asset_id = a.asset_id AND f.severity = 'safety' AND f.status NOT IN ('verified', 'rejected')
       ORDER BY f.created_at, f.id LIMIT 1
    ) b ON true`;

type CheckRow = {
  id: string;
  assignment_id: string;
  kind: 'check-out' | 'check-in';
  odometer_km: number;
  charge_percent: number;
  notes: string;
  damage_notes: string;
  finding_id: string | null;
  at: Date;
  by_user: string | null;
  by_name: string | null;
};

/** The API shape of assignments, in the order of `ids`, with their checks and photos (each set in one query). */
export async function assignmentDtos(deps: Deps, ids: string[], transaction?: Transaction, asOf = new Date()): Promise<Assignment[]> {
  if (!ids.length) return [];
  const rows = await deps.sequelize.query<Row>(`${SELECT_ROWS} WHERE a.id = ANY($1::uuid[])`, {
    bind: [ids],
    type: QueryTypes.SELECT,
    transaction,
  });
  return toDtos(deps, rows, ids, transaction, asOf);
}

async function toDtos(deps: Deps, rows: Row[], order: string[], transaction: Transaction | undefined, asOf: Date): Promise<Assignment[]> {
  if (!rows.length) return [];
  const ids = rows.map((r) => r.id);
  const checks = await deps.sequelize.query<CheckRow>(
    `SELECT c.id, c.assignment_id, c.kind, c.odometer_km, c.charge_percent, c.notes, c.damage_notes, c.finding_id, c.at, c.by_user, u.name AS by_name
       FROM assignment_checks c LEFT JOIN users u ON u.id = c.by_user
      WHERE c.assignment_id = ANY($1::uuid[])`,
    { bind: [ids], type: QueryTypes.SELECT, transaction },
  );
  const photoLinks = checks.length
    ? await deps.sequelize.query<{ id: string; assignment_check_id: string }>(
        `SELECT id, assignment_check_id FROM photos WHERE assignment_check_id = ANY($1::uuid[]) ORDER BY created_at, id`,
        { bind: [checks.map((c) => c.id)], type: QueryTypes.SELECT, transaction },
      )
    : [];
  const photoRows = photoLinks.length ? await Photo.findAll({ where: { id: photoLinks.map((p) => p.id) }, transaction }) : [];
  const photoById = new Map((await photoDtos(deps, photoRows)).map((p) => [p.id, p]));
  const photosOf = (checkId: string) =>
    photoLinks.filter((p) => p.assignment_check_id === checkId).map((p) => photoById.get(p.id)).filter((p): p is NonNullable<typeof p> => !!p);
  const checkDto = (c: CheckRow) => ({
    odometerKm: c.odometer_km,
    chargePercent: c.charge_percent,
    at: c.at.toISOString(),
    by: c.by_user ? { id: c.by_user, name: c.by_name ?? '' } : null,
    notes: c.notes,
    photos: photosOf(c.id),
  });
  const byId = new Map(
    rows.map((r): [string, Assignment] => {
      const out = checks.find((c) => c.assignment_id === r.id && c.kind === 'check-out');
      const back = checks.find((c) => c.assignment_id === r.id && c.kind === 'check-in');
      return [
        r.id,
        {
          id: r.id,
          programId: r.program_id,
          assetId: r.asset_id,
          assetTag: r.asset_tag,
          vehicle: {
            status: r.asset_status,
            stageId: r.stage_id,
            stage: r.stage_name,
            minDriverLevel: r.min_driver_level,
            odometerKm: r.asset_odometer_km,
            cleared: r.blocker === null,
            notClearedReason: r.blocker,
          },
          driver: { id: r.driver_id, name: r.driver_name },
          startsAt: r.starts_at.toISOString(),
          endsAt: r.ends_at.toISOString(),
          purpose: r.purpose,
          notes: r.notes,
          status: r.status,
          levelOverrideReason: r.level_override_reason,
          cancelReason: r.cancel_reason,
          overdueReturn: isOverdueReturn({ status: r.status, endsAt: r.ends_at }, asOf),
          checkout: out ? checkDto(out) : null,
          checkin: back ? { ...checkDto(back), damageNotes: back.damage_notes, findingId: back.finding_id } : null,
          createdBy: r.created_by ? { id: r.created_by, name: r.created_by_name ?? '' } : null,
          createdAt: r.created_at.toISOString(),
          updatedAt: r.updated_at.toISOString(),
          version: r.version,
        },
      ];
    }),
  );
  return order.map((id) => byId.get(id)).filter((a): a is Assignment => !!a);
}

type Plain = { id: string; program_id: string; asset_id: string; driver_id: string; starts_at: Date; ends_at: Date; status: AssignmentStatus; version: number; level_override_reason: string | null };

/** The assignment row when the user belongs to its program; otherwise 404, never 403. */
async function visibleAssignment(deps: Deps, user: SessionUser, id: string, transaction?: Transaction, lock = false): Promise<Plain> {
  const [row] = await deps.sequelize.query<Plain>(
    `SELECT id, program_id, asset_id, driver_id, starts_at, ends_at, status, version, level_override_reason
       FROM assignments WHERE id = $1 ${lock ? 'FOR UPDATE' : ''}`,
    { bind: [id], type: QueryTypes.SELECT, transaction },
  );
  if (!row || !user.programIds.includes(row.program_id)) throw notFound('This assignment');
  return row;
}

export async function getAssignment(deps: Deps, user: SessionUser, id: string, asOf = new Date()) {
  const row = await visibleAssignment(deps, user, id);
  return (await assignmentDtos(deps, [row.id], undefined, asOf))[0];
}

export async function listAssignments(deps: Deps, user: SessionUser, q: ListQuery, asOf = new Date()) {
  assertMember(user, q.programId, 'This program');
  const from = q.from ? Date.parse(q.from) : asOf.getTime() - 30 * DAY_MS;
  const to = q.to ? Date.parse(q.to) : asOf.getTime() + 60 * DAY_MS;
  if (to <= from) throw fieldError('to', 'The period must end after it starts.');
  if (to - from > ASSIGNMENT_LIST_MAX_DAYS * DAY_MS) throw fieldError('to', `A period covers at most ${ASSIGNMENT_LIST_MAX_DAYS} days.`);
  const bind: unknown[] = [];
  const p = (v: unknown) => `$${bind.push(v)}`;
  // Windows that overlap the period; an overdue return stays in view until it comes back.
  const where = [
    `a.program_id = ${p(q.programId)}`,
    `a.starts_at < ${p(new Date(to))}`,
    `(a.ends_at > ${p(new Date(from))} OR (a.status = 'checked-out' AND ${p(asOf)} > ${p(new Date(from))}))`,
  ];
  if (q.assetId) where.push(`a.asset_id = ${p(q.assetId)}`);
  if (q.driverId) where.push(`a.driver_id = ${p(q.driverId)}`);
  if (q.mine) where.push(`a.driver_id = ${p(user.id)}`);
  if (q.stageId) where.push(`v.stage_id = ${p(q.stageId)}`);
  if (q.purpose) where.push(`a.purpose = ${p(q.purpose)}`);
  if (q.status) where.push(`a.status = ${p(q.status)}`);
  if (q.overdue !== undefined) {
    const late = `(a.status = 'checked-out' AND a.ends_at <= ${p(asOf)})`;
    where.push(q.overdue ? late : `NOT ${late}`);
  }
  const rows = await deps.sequelize.query<Row>(
    `${SELECT_ROWS} WHERE ${where.join(' AND ')} ORDER BY a.starts_at, v.tag, a.id LIMIT ${p(ASSIGNMENT_LIST_MAX + 1)}`,
    { bind, type: QueryTypes.SELECT },
  );
  const truncated = rows.length > ASSIGNMENT_LIST_MAX;
  const page = truncated ? rows.slice(0, ASSIGNMENT_LIST_MAX) : rows;
  return { items: await toDtos(deps, page, page.map((r) => r.id), undefined, asOf), truncated };
}

// ---- Rules --------------------------------------------------------------------------------

type VehicleRow = { id: string; program_id: string; tag: string; kind: string; status: AssetStatus; odometer_km: number; stage: string; min_driver_level: number };
type DriverRow = { id: string; name: string; email: string; role: Role; driving_level: number | null; licence_expiry: string | null };

async function loadVehicle(deps: Deps, programId: string, assetId: string, transaction: Transaction): Promise<VehicleRow> {
  const [row] = await deps.sequelize.query<VehicleRow>(
    `SELECT v.id, v.program_id, v.tag, v.kind, v.status, v.odometer_km, s.name AS stage, s.min_driver_level
       FROM assets v JOIN stages s ON s.id = v.stage_id WHERE v.id = $1`,
    { bind: [assetId], type: QueryTypes.SELECT, transaction },
  );
  if (!row || row.program_id !== programId) throw fieldError('assetId', 'Choose a vehicle of this program.');
  if (row.kind !== 'vehicle') throw fieldError('assetId', `${row.tag} is not a vehicle; only vehicles are assigned to drivers.`);
  return row;
}

async function loadDriver(deps: Deps, programId: string, driverId: string, transaction?: Transaction): Promise<DriverRow> {
  const [row] = await deps.sequelize.query<DriverRow>(
    `SELECT u.id, u.name, u.email, u.role, dp.driving_level, dp.licence_expiry::text AS licence_expiry
       FROM users u
       JOIN program_members pm ON pm.user_id = u.id AND pm.program_id = $2
       LEFT JOIN driver_profiles dp ON dp.user_id = u.id
      WHERE u.id = $1 AND u.active AND u.role <> 'admin'`,
    { bind: [driverId, programId], type: QueryTypes.SELECT, transaction },
  );
  if (!row) throw fieldError('driverId', 'Choose a driver who works in this program.');
  return row;
}

async function safetyFindings(deps: Deps, assetId: string, transaction?: Transaction): Promise<string[]> {
  const rows = await deps.sequelize.query<{ title: string }>(
    `SELECT title FROM findings WHERE asset_id = $1 AND severity = 'safety' AND status NOT IN ('verified', 'rejected') ORDER BY created_at, id`,
    { bind: [assetId], type: QueryTypes.SELECT, transaction },
  );
  return rows.map((r) => r.title);
}

/** Live (planned or checked-out) bookings of a vehicle or a driver that overlap the window, except `exceptId`. */
async function bookings(
  deps: Deps,
  by: 'asset' | 'driver',
  id: string,
  window: { startsAt: Date; endsAt: Date },
  exceptId: string | null,
  transaction?: Transaction,
): Promise<Booking[]> {
  const rows = await deps.sequelize.query<{ id: string; starts_at: Date; ends_at: Date; tag: string; driver: string }>(
    `SELECT a.id, a.starts_at, a.ends_at, v.tag, d.name AS driver
       FROM assignments a JOIN assets v ON v.id = a.asset_id JOIN users d ON d.id = a.driver_id
      WHERE a.${by === 'asset' ? 'asset_id' : 'driver_id'} = $1 AND a.status IN ('planned', 'checked-out')
        AND a.starts_at < $3 AND a.ends_at > $2 AND ($4::uuid IS NULL OR a.id <> $4::uuid)
      ORDER BY a.starts_at`,
    { bind: [id, window.startsAt, window.endsAt, exceptId], type: QueryTypes.SELECT, transaction },
  );
  return rows.map((r) => ({ id: r.id, startsAt: r.starts_at, endsAt: r.ends_at, label: by === 'asset' ? `with ${r.driver}` : `with ${r.tag}` }));
}

async function ruleContext(
  deps: Deps,
  vehicle: VehicleRow,
  driver: DriverRow,
  window: { startsAt: Date; endsAt: Date },
  exceptId: string | null,
  transaction: Transaction,
): Promise<RefusalContext> {
  return {
    vehicle: {
      tag: vehicle.tag,
      status: vehicle.status,
      stage: vehicle.stage,
      minDriverLevel: vehicle.min_driver_level,
      openSafetyFindings: await safetyFindings(deps, vehicle.id, transaction),
    },
    driver: { name: driver.name, drivingLevel: driver.driving_level ?? 0, licenceExpiry: driver.licence_expiry },
    vehicleBookings: await bookings(deps, 'asset', vehicle.id, window, exceptId, transaction),
    driverBookings: await bookings(deps, 'driver', driver.id, window, exceptId, transaction),
  };
}

/** What the history keeps of an assignment. */
const snapshot = (a: Assignment) => ({
  assetId: a.assetId,
  assetTag: a.assetTag,
  driver: a.driver,
  startsAt: a.startsAt,
  endsAt: a.endsAt,
  purpose: a.purpose,
  notes: a.notes,
  status: a.status,
  levelOverrideReason: a.levelOverrideReason,
});

// ---- Booking ------------------------------------------------------------------------------

/**
 * Books a vehicle for a driver. Every refusal rule is checked (shared/domain/fleet) under
 * advisory locks on the vehicle and the driver, and all the reasons that stand are answered at
 * once (422). A level override with a written reason is kept on the assignment and in the history.
 */
export async function createAssignment(deps: Deps, user: SessionUser, input: CreateInput, asOf = new Date()): Promise<Assignment> {
  assertMember(user, input.programId, 'This program');
  const window = { startsAt: new Date(input.startsAt), endsAt: new Date(input.endsAt) };
  if (window.endsAt.getTime() <= asOf.getTime()) throw fieldError('endsAt', 'This window has already ended.');
  return guardOverlap(() =>
    deps.sequelize.transaction(async (transaction) => {
      await lockBookings(deps, transaction, [input.assetId], [input.driverId]);
      const vehicle = await loadVehicle(deps, input.programId, input.assetId, transaction);
      const driver = await loadDriver(deps, input.programId, input.driverId, transaction);
      const reasons = assignmentRefusals(window, await ruleContext(deps, vehicle, driver, window, null, transaction));
      const standing = standingRefusals(reasons, !!input.levelOverrideReason);
      if (standing.length) throw refused(standing);
      const override = reasons.some((r) => r.code === 'driver-level') ? (input.levelOverrideReason ?? null) : null;
      const [row] = await deps.sequelize.query<{ id: string }>(
        `INSERT INTO assignments (program_id, asset_id, driver_id, starts_at, ends_at, purpose, notes, level_override_reason, created_by)
         VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9) RETURNING id`,
        {
          bind: [input.programId, vehicle.id, driver.id, window.startsAt, window.endsAt, input.purpose, input.notes, override, user.id],
          type: QueryTypes.SELECT,
          transaction,
        },
      );
      const dto = (await assignmentDtos(deps, [row.id], transaction, asOf))[0];
      await recordHistory(
        {
          programId: dto.programId,
          entityType: 'assignment',
          entityId: dto.id,
          action: 'created',
          actorId: user.id,
          after: snapshot(dto),
          note: override ? `Driving level rule overridden: ${override}` : null,
        },
        transaction,
      );
      await notifyDriver(deps, 'created', dto, user, transaction);
      return dto;
    }),
  );
}

const CLOSED: AssignmentStatus[] = ['returned', 'cancelled'];
const closedError = () => new AppError(409, 'assignment/closed', 'This assignment is returned or cancelled; it can no longer change.');

/**
 * Changes the window, the driver, the vehicle, the purpose or the notes (with the version read).
 * The rules are checked again against the new values; a level override stays while the driver
 * and the vehicle stay the same. Once checked out, only the end, the purpose and the notes change.
 */
export async function updateAssignment(deps: Deps, user: SessionUser, id: string, input: UpdateInput, asOf = new Date()): Promise<Assignment> {
  const first = await visibleAssignment(deps, user, id);
  return guardOverlap(() =>
    deps.sequelize.transaction(async (transaction) => {
      await lockBookings(
        deps,
        transaction,
        [first.asset_id, ...(input.assetId ? [input.assetId] : [])],
        [first.driver_id, ...(input.driverId ? [input.driverId] : [])],
      );
      const current = await visibleAssignment(deps, user, id, transaction, true);
      const before = (await assignmentDtos(deps, [current.id], transaction, asOf))[0];
      if (CLOSED.includes(current.status)) throw closedError();
      if (current.version !== input.version) throw conflict('Someone else changed this assignment first.', before);
      const next = {
        assetId: input.assetId ?? current.asset_id,
        driverId: input.driverId ?? current.driver_id,
        startsAt: input.startsAt ? new Date(input.startsAt) : current.starts_at,
        endsAt: input.endsAt ? new Date(input.endsAt) : current.ends_at,
        purpose: input.purpose ?? before.purpose,
        notes: input.notes ?? before.notes,
      };
      const moved = {
        asset: next.assetId !== current.asset_id,
        driver: next.driverId !== current.driver_id,
        start: next.startsAt.getTime() !== current.starts_at.getTime(),
        end: next.endsAt.getTime() !== current.ends_at.getTime(),
      };
      if (current.status === 'checked-out' && (moved.asset || moved.driver || moved.start)) {
        throw new AppError(409, 'assignment/checked-out', 'The vehicle is checked out: only the end of the window, the purpose and the notes can still change.');
      }
      const problem = windowProblem(next.startsAt.toISOString(), next.endsAt.toISOString());
      if (problem) throw fieldError('endsAt', problem);
      if (moved.end && next.endsAt.getTime() <= asOf.getTime()) throw fieldError('endsAt', 'This window has already ended.');
      const changed = moved.asset || moved.driver || moved.start || moved.end || next.purpose !== before.purpose || next.notes !== before.notes || !!input.levelOverrideReason;
      if (!changed) return before;

      const vehicle = await loadVehicle(deps, current.program_id, next.assetId, transaction);
      const driver = await loadDriver(deps, current.program_id, next.driverId, transaction);
      const window = { startsAt: next.startsAt, endsAt: next.endsAt };
      const reasons = assignmentRefusals(window, await ruleContext(deps, vehicle, driver, window, current.id, transaction));
      const keptOverride = !moved.asset && !moved.driver ? current.level_override_reason : null;
      const overrideGiven = input.levelOverrideReason ?? keptOverride;
      const standing = standingRefusals(reasons, !!overrideGiven);
      if (standing.length) throw refused(standing);
      const override = reasons.some((r) => r.code === 'driver-level') ? overrideGiven : null;
      await deps.sequelize.query(
        `UPDATE assignments SET asset_id = $2, driver_id = $3, starts_at = $4, ends_at = $5, purpose = $6, notes = $7,
                level_override_reason = $8, overdue_notified_at = CASE WHEN $9 THEN NULL ELSE overdue_notified_at END,
                version = version + 1, updated_at = now()
          WHERE id = $1`,
        { bind: [current.id, next.assetId, next.driverId, next.startsAt, next.endsAt, next.purpose, next.notes, override ?? null, moved.end], transaction },
      );
      const after = (await assignmentDtos(deps, [current.id], transaction, asOf))[0];
      const b = snapshot(before);
      const a = snapshot(after);
      const keys = (Object.keys(a) as Array<keyof typeof a>).filter((k) => JSON.stringify(b[k]) !== JSON.stringify(a[k]));
      await recordHistory(
        {
          programId: after.programId,
          entityType: 'assignment',
          entityId: after.id,
          action: 'updated',
          actorId: user.id,
          before: Object.fromEntries(keys.map((k) => [k, b[k]])),
          after: Object.fromEntries(keys.map((k) => [k, a[k]])),
          note: override && override !== current.level_override_reason ? `Driving level rule overridden: ${override}` : null,
        },
        transaction,
      );
      const changes = describeChanges(before, after);
      if (moved.driver) {
        await notifyDriver(deps, 'unassigned', after, user, transaction, { to: before.driver.id });
        await notifyDriver(deps, 'created', after, user, transaction);
      } else if (changes.length) {
        await notifyDriver(deps, 'changed', after, user, transaction, { changes });
      }
      return after;
    }),
  );
}

function describeChanges(before: Assignment, after: Assignment): string[] {
  const out: string[] = [];
  if (before.assetTag !== after.assetTag) out.push(`Vehicle: ${before.assetTag} -> ${after.assetTag}`);
  if (before.startsAt !== after.startsAt) out.push(`From: ${formatUtc(before.startsAt)} -> ${formatUtc(after.startsAt)}`);
  if (before.endsAt !== after.endsAt) out.push(`To: ${formatUtc(before.endsAt)} -> ${formatUtc(after.endsAt)}`);
  if (before.purpose !== after.purpose) out.push(`Purpose: ${ASSIGNMENT_PURPOSE_LABELS[before.purpose]} -> ${ASSIGNMENT_PURPOSE_LABELS[after.purpose]}`);
  if (before.notes !== after.notes) out.push('Notes changed');
  return out;
}

/** Cancels a planned assignment (a checked-out vehicle is checked in instead). */
export async function cancelAssignment(deps: Deps, user: SessionUser, id: string, input: CancelInput, asOf = new Date()): Promise<Assignment> {
  return deps.sequelize.transaction(async (transaction) => {
    const current = await visibleAssignment(deps, user, id, transaction, true);
    const before = (await assignmentDtos(deps, [current.id], transaction, asOf))[0];
    if (current.version !== input.version) throw conflict('Someone else changed this assignment first.', before);
    if (current.status !== 'planned') {
      throw new AppError(
        409,
        'assignment/not-planned',
        current.status === 'checked-out' ? 'The vehicle is checked out: check it in instead of cancelling.' : 'This assignment is already returned or cancelled.',
      );
    }
    await deps.sequelize.query(
      `UPDATE assignments SET status = 'cancelled', cancel_reason = $2, version = version + 1, updated_at = now() WHERE id = $1`,
      { bind: [current.id, input.reason || null], transaction },
    );
    const after = (await assignmentDtos(deps, [current.id], transaction, asOf))[0];
    await recordHistory(
      {
        programId: after.programId,
        entityType: 'assignment',
        entityId: after.id,
        action: 'cancelled',
        actorId: user.id,
        before: { status: before.status },
        after: { status: after.status, cancelReason: after.cancelReason },
        note: input.reason || null,
      },
      transaction,
    );
    await notifyDriver(deps, 'cancelled', after, user, transaction, { reason: input.reason || null });
    return after;
  });
}

// ---- Check-out and check-in -----------------------------------------------------------------

function assertMayHandle(user: SessionUser, a: Plain) {
  if (a.driver_id !== user.id && !isManager(user)) {
    throw new AppError(403, 'assignment/not-yours', 'Only the assigned driver, a coordinator or a lead can check this vehicle out or in.');
  }
}

/** Checks that each photo is one of this vehicle's, not yet linked to a check; answers their ids. */
async function assertPhotos(deps: Deps, assetId: string, photoIds: string[], transaction: Transaction) {
  const ids = [...new Set(photoIds.map((p) => p.toLowerCase()))];
  if (!ids.length) return ids;
  const rows = await deps.sequelize.query<{ id: string }>(
    `SELECT id FROM photos WHERE id = ANY($1::uuid[]) AND asset_id = $2 AND assignment_check_id IS NULL FOR UPDATE`,
    { bind: [ids, assetId], type: QueryTypes.SELECT, transaction },
  );
  if (rows.length !== ids.length) {
    throw fieldError('photoIds', 'Upload the photos to this vehicle first (each photo goes with one check only).');
  }
  return ids;
}

async function recordCheck(
  deps: Deps,
  transaction: Transaction,
  a: Plain,
  user: SessionUser,
  kind: 'check-out' | 'check-in',
  input: { odometerKm: number; chargePercent: number; notes: string; damageNotes?: string },
  photoIds: string[],
  asOf: Date,
) {
  const [check] = await deps.sequelize.query<{ id: string }>(
    `INSERT INTO assignment_checks (program_id, assignment_id, kind, odometer_km, charge_percent, notes, damage_notes, at, by_user)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9) RETURNING id`,
    {
      bind: [a.program_id, a.id, kind, input.odometerKm, input.chargePercent, input.notes, input.damageNotes ?? '', asOf, user.id],
      type: QueryTypes.SELECT,
      transaction,
    },
  );
  if (photoIds.length) {
    await deps.sequelize.query(`UPDATE photos SET assignment_check_id = $2 WHERE id = ANY($1::uuid[])`, { bind: [photoIds, check.id], transaction });
  }
  return check.id;
}

/**
 * The driver (or a coordinator or lead) takes the vehicle: odometer, charge, notes and the
 * walk-around photos. The rules that can change after booking are checked again (cleared, not
 * down, licence, level with its override, and the vehicle back from its previous use). The
 * vehicle becomes `assigned` and its odometer takes the reading, which may not be below it.
 */
export async function checkOut(deps: Deps, user: SessionUser, id: string, input: CheckOutInput, asOf = new Date()): Promise<Assignment> {
  const first = await visibleAssignment(deps, user, id);
  assertMayHandle(user, first);
  return deps.sequelize.transaction(async (transaction) => {
    await lockBookings(deps, transaction, [first.asset_id], [first.driver_id]);
    const a = await visibleAssignment(deps, user, id, transaction, true);
    assertMayHandle(user, a);
    if (a.status !== 'planned') {
      throw new AppError(409, 'assignment/not-planned', a.status === 'checked-out' ? 'This vehicle is already checked out.' : 'This assignment is returned or cancelled.');
    }
    if (asOf.getTime() < a.starts_at.getTime() - EARLY_CHECKOUT_HOURS * 3600_000) {
      throw new AppError(409, 'assignment/too-early', `The window starts ${formatUtc(a.starts_at)}; check out at most ${EARLY_CHECKOUT_HOURS} hours before.`);
    }
    if (asOf.getTime() >= a.ends_at.getTime()) {
      throw new AppError(409, 'assignment/window-passed', 'The window of this assignment has passed; ask the coordinator to change it.');
    }
    const vehicle = await loadVehicle(deps, a.program_id, a.asset_id, transaction);
    const driver = await loadDriver(deps, a.program_id, a.driver_id, transaction).catch(() => {
      throw new AppError(409, 'assignment/driver-gone', 'The assigned driver no longer works in this program; ask the coordinator to change the assignment.');
    });
    const [out] = await deps.sequelize.query<{ id: string; tag: string; driver: string; starts_at: Date; ends_at: Date }>(
      `SELECT a.id, v.tag, d.name AS driver, a.starts_at, a.ends_at FROM assignments a JOIN assets v ON v.id = a.asset_id JOIN users d ON d.id = a.driver_id
        WHERE a.asset_id = $1 AND a.status = 'checked-out' AND a.id <> $2 LIMIT 1`,
      { bind: [a.asset_id, a.id], type: QueryTypes.SELECT, transaction },
    );
    const window = { startsAt: asOf < a.starts_at ? asOf : a.starts_at, endsAt: a.ends_at };
    const context = await ruleContext(deps, vehicle, driver, window, a.id, transaction);
    // The window was checked for overlaps when it was booked; the exclusion constraint keeps it so.
    context.vehicleBookings = [];
    context.driverBookings = [];
    context.vehicleOutWith = out ? { id: out.id, startsAt: out.starts_at, endsAt: out.ends_at, label: `${out.driver}'s assignment` } : null;
    const standing = standingRefusals(assignmentRefusals(window, context), !!a.level_override_reason);
    if (standing.length) throw refused(standing);
    if (input.odometerKm < vehicle.odometer_km) {
      throw fieldError('odometerKm', `${vehicle.tag}'s odometer stands at ${vehicle.odometer_km} km; a reading cannot go down.`);
    }
    const photoIds = await assertPhotos(deps, a.asset_id, input.photoIds, transaction);
    await recordCheck(deps, transaction, a, user, 'check-out', input, photoIds, asOf);
    await deps.sequelize.query(`UPDATE assignments SET status = 'checked-out', version = version + 1, updated_at = now() WHERE id = $1`, {
      bind: [a.id],
      transaction,
    });
    await deps.sequelize.query(
      `UPDATE assets SET status = 'assigned', odometer_km = $2, version = version + 1, updated_at = now() WHERE id = $1`,
      { bind: [a.asset_id, input.odometerKm], transaction },
    );
    await recordHistory(
      {
        programId: a.program_id,
        entityType: 'asset',
        entityId: a.asset_id,
        action: 'checked-out',
        actorId: user.id,
        before: { status: vehicle.status, odometerKm: vehicle.odometer_km },
        after: { status: 'assigned', odometerKm: input.odometerKm },
        note: `Assignment ${a.id}`,
      },
      transaction,
    );
    await recordHistory(
      {
        programId: a.program_id,
        entityType: 'assignment',
        entityId: a.id,
        action: 'checked-out',
        actorId: user.id,
        before: { status: 'planned' },
        after: { status: 'checked-out', odometerKm: input.odometerKm, chargePercent: input.chargePercent, notes: input.notes, photoIds },
      },
      transaction,
    );
    return (await assignmentDtos(deps, [a.id], transaction, asOf))[0];
  });
}

/**
 * The vehicle comes back: odometer (not below the check-out reading), charge, notes, photos and
 * damage notes. The kilometres driven accrue to the vehicle's odometer and an `assigned` vehicle
 * becomes `available`. Damage notes become a finding on the vehicle, filed through the findings
 * service after the check-in commits (its own transaction), then linked to the check-in and its
 * photos: the check-in, with the notes, is never lost to a failure of the finding.
 */
export async function checkIn(deps: Deps, user: SessionUser, id: string, input: CheckInInput, asOf = new Date()): Promise<Assignment> {
  const first = await visibleAssignment(deps, user, id);
  assertMayHandle(user, first);
  const done = await deps.sequelize.transaction(async (transaction) => {
    await lockBookings(deps, transaction, [first.asset_id], []);
    const a = await visibleAssignment(deps, user, id, transaction, true);
    if (a.status !== 'checked-out') {
      throw new AppError(
        409,
        'assignment/not-checked-out',
        a.status === 'planned' ? 'This vehicle has not been checked out yet.' : 'This assignment is already returned or cancelled.',
      );
    }
    const [out] = await deps.sequelize.query<{ odometer_km: number }>(
      `SELECT odometer_km FROM assignment_checks WHERE assignment_id = $1 AND kind = 'check-out'`,
      { bind: [a.id], type: QueryTypes.SELECT, transaction },
    );
    if (input.odometerKm < out.odometer_km) {
      throw fieldError('odometerKm', `The odometer read ${out.odometer_km} km at check-out; it cannot go down.`);
    }
    const driven = input.odometerKm - out.odometer_km;
    const photoIds = await assertPhotos(deps, a.asset_id, input.photoIds, transaction);
    const checkId = await recordCheck(deps, transaction, a, user, 'check-in', input, photoIds, asOf);
    await deps.sequelize.query(`UPDATE assignments SET status = 'returned', version = version + 1, updated_at = now() WHERE id = $1`, {
      bind: [a.id],
      transaction,
    });
    const [asset] = await deps.sequelize.query<{ status: AssetStatus; odometer_km: number }>(
      `SELECT status, odometer_km FROM assets WHERE id = $1 FOR UPDATE`,
      { bind: [a.asset_id], type: QueryTypes.SELECT, transaction },
    );
    const status: AssetStatus = asset.status === 'assigned' ? 'available' : asset.status;
    await deps.sequelize.query(
      `UPDATE assets SET status = $2, odometer_km = odometer_km + $3, version = version + 1, updated_at = now() WHERE id = $1`,
      { bind: [a.asset_id, status, driven], transaction },
    );
    await recordHistory(
      {
        programId: a.program_id,
        entityType: 'asset',
        entityId: a.asset_id,
        action: 'checked-in',
        actorId: user.id,
        before: { status: asset.status, odometerKm: asset.odometer_km },
        after: { status, odometerKm: asset.odometer_km + driven },
        note: `Assignment ${a.id}: ${driven} km driven`,
      },
      transaction,
    );
    await recordHistory(
      {
        programId: a.program_id,
        entityType: 'assignment',
        entityId: a.id,
        action: 'checked-in',
        actorId: user.id,
        before: { status: 'checked-out' },
        after: { status: 'returned', odometerKm: input.odometerKm, kmDriven: driven, chargePercent: input.chargePercent, notes: input.notes, damageNotes: input.damageNotes, photoIds },
      },
      transaction,
    );
    return { a, checkId, photoIds };
  });

  if (input.damageNotes) {
    const [tag] = await deps.sequelize.query<{ tag: string }>(`SELECT tag FROM assets WHERE id = $1`, { bind: [done.a.asset_id], type: QueryTypes.SELECT });
    const firstLine = input.damageNotes.split('\n')[0].trim();
    const finding = await createFinding(
      deps,
      user,
      {
        assetId: done.a.asset_id,
        title: `Damage at check-in: ${firstLine}`.slice(0, 160),
        severity: input.damageSeverity ?? 'major',
        description: `${input.damageNotes}\n\nReported by ${user.name} at the check-in of ${tag?.tag ?? 'the vehicle'} on ${formatUtc(asOf)} (odometer ${input.odometerKm} km).`.slice(0, 4000),
        system: null,
      },
      null,
      asOf,
    );
    await deps.sequelize.transaction(async (transaction) => {
      await deps.sequelize.query(`UPDATE assignment_checks SET finding_id = $2 WHERE id = $1`, { bind: [done.checkId, finding.id], transaction });
      if (done.photoIds.length) {
        await deps.sequelize.query(`UPDATE photos SET finding_id = $2 WHERE id = ANY($1::uuid[]) AND finding_id IS NULL`, {
          bind: [done.photoIds, finding.id],
          transaction,
        });
      }
      await recordHistory(
        { programId: done.a.program_id, entityType: 'assignment', entityId: done.a.id, action: 'damage-reported', actorId: user.id, after: { findingId: finding.id, severity: finding.severity } },
        transaction,
      );
    });
  }
  return (await assignmentDtos(deps, [done.a.id], undefined, asOf))[0];
}

export async function assignmentHistory(deps: Deps, user: SessionUser, id: string) {
  const a = await visibleAssignment(deps, user, id);
  return historyOf(deps, 'assignment', a.id, { programId: a.program_id });
}

// ---- Drivers ------------------------------------------------------------------------------

type ProfileRow = {
  id: string;
  name: string;
  email: string;
  role: Role;
  driving_level: number | null;
  hv_awareness: boolean | null;
  hv_awareness_date: string | null;
  licence_expiry: string | null;
  notes: string | null;
  version: number | null;
  has_profile: boolean;
};

const PROFILE_COLUMNS = `u.id, u.name, u.email, u.role, dp.driving_level, dp.hv_awareness, dp.hv_awareness_date::text AS hv_awareness_date,
  dp.licence_expiry::text AS licence_expiry, dp.notes, dp.version, (dp.user_id IS NOT NULL) AS has_profile`;

function toProfile(r: ProfileRow, asOf: Date): DriverProfile {
  const licence = licenceState(r.licence_expiry, asOf);
  return {
    userId: r.id,
    name: r.name,
    email: r.email,
    role: r.role,
    drivingLevel: r.driving_level ?? 0,
    hvAwareness: r.hv_awareness ?? false,
    hvAwarenessDate: r.hv_awareness_date,
    licenceExpiry: r.licence_expiry,
    notes: r.notes ?? '',
    licenceExpiresSoon: licence.expiresSoon,
    licenceExpired: licence.expired,
    hasProfile: r.has_profile,
    version: r.version ?? 0,
  };
}

/** The program's drivers: members with the driver role and anyone else with a driver profile (`all`: every working member). */
export async function listDrivers(deps: Deps, user: SessionUser, q: DriverQuery, asOf = new Date()) {
  assertMember(user, q.programId, 'This program');
  const rows = await deps.sequelize.query<ProfileRow>(
    `SELECT ${PROFILE_COLUMNS}
       FROM users u
       JOIN program_members pm ON pm.user_id = u.id AND pm.program_id = $1
       LEFT JOIN driver_profiles dp ON dp.user_id = u.id
      WHERE u.active AND u.role <> 'admin' AND ($2 OR u.role = 'driver' OR dp.user_id IS NOT NULL)
      ORDER BY u.name, u.id`,
    { bind: [q.programId, q.all ?? false], type: QueryTypes.SELECT },
  );
  return { items: rows.map((r) => toProfile(r, asOf)) };
}

async function profileOf(deps: Deps, userId: string, transaction?: Transaction): Promise<ProfileRow | undefined> {
  const [row] = await deps.sequelize.query<ProfileRow>(
    `SELECT ${PROFILE_COLUMNS} FROM users u LEFT JOIN driver_profiles dp ON dp.user_id = u.id WHERE u.id = $1`,
    { bind: [userId], type: QueryTypes.SELECT, transaction },
  );
  return row;
}

/**
 * Creates or changes a person's driver profile (version 0 while there is none). The person must
 * work in one of the caller's programs (404 otherwise). One profile per person, whatever the program.
 */
export async function updateDriverProfile(deps: Deps, user: SessionUser, userId: string, input: DriverInput, asOf = new Date()): Promise<DriverProfile> {
  const [member] = await deps.sequelize.query<{ id: string }>(
    `SELECT u.id FROM users u WHERE u.id = $1 AND u.active AND u.role <> 'admin'
        AND EXISTS (SELECT 1 FROM program_members pm WHERE pm.user_id = u.id AND pm.program_id = ANY($2::uuid[]))`,
    { bind: [userId, user.programIds], type: QueryTypes.SELECT },
  );
  if (!member) throw notFound('This person');
  return deps.sequelize.transaction(async (transaction) => {
    const [inserted] = await deps.sequelize.query<{ user_id: string }>(
      `INSERT INTO driver_profiles (user_id) VALUES ($1) ON CONFLICT (user_id) DO NOTHING RETURNING user_id`,
      { bind: [userId], type: QueryTypes.SELECT, transaction },
    );
    await deps.sequelize.query(`SELECT user_id FROM driver_profiles WHERE user_id = $1 FOR UPDATE`, { bind: [userId], transaction });
    const beforeRow = (await profileOf(deps, userId, transaction))!;
    const before = toProfile({ ...beforeRow, has_profile: !inserted }, asOf);
    if (beforeRow.version !== input.version) throw conflict('Someone else changed this driver profile first.', before);
    await deps.sequelize.query(
      `UPDATE driver_profiles SET driving_level = $2, hv_awareness = $3, hv_awareness_date = $4, licence_expiry = $5, notes = $6,
              version = version + 1, updated_at = now()
        WHERE user_id = $1`,
      {
        bind: [userId, input.drivingLevel, input.hvAwareness, input.hvAwareness ? (input.hvAwarenessDate ?? null) : null, input.licenceExpiry, input.notes],
        transaction,
      },
    );
    const after = toProfile((await profileOf(deps, userId, transaction))!, asOf);
    const fields = ['drivingLevel', 'hvAwareness', 'hvAwarenessDate', 'licenceExpiry', 'notes'] as const;
    const keys = fields.filter((k) => before[k] !== after[k]);
    await recordHistory(
      {
        programId: null,
        entityType: 'driver-profile',
        entityId: userId,
        action: inserted ? 'created' : 'updated',
        actorId: user.id,
        before: inserted ? null : Object.fromEntries(keys.map((k) => [k, before[k]])),
        after: inserted ? Object.fromEntries(fields.map((k) => [k, after[k]])) : Object.fromEntries(keys.map((k) => [k, after[k]])),
      },
      transaction,
    );
    return after;
  });
}
