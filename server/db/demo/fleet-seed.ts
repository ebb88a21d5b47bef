// Demo fleet of the fictional FW3 program (PRODUCT.md section 8, issue 6): a dozen people who
// drive, with mixed levels, one licence about to expire and one expired; a month of assignments
// of FW3 vehicles around today (returned ones with their kilometres, planned ones ahead, a few
// cancelled), the vehicles out now, two of them overdue, and one booking below the stage's level
// with the coordinator's reason. Everything here is invented. A seeded generator keeps the demo
// the same on every machine (relative to the day it is loaded).
import crypto from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import type { AssetStatus } from '../../../shared/schemas/assets';
import type { AssignmentPurpose, AssignmentStatus } from '../../../shared/schemas/fleet';
import type { Program, User } from '../models';

/** mulberry32: a small seeded generator (common practice, no source needed for a demo). */
function rng(seed: number) {
  let a = seed >>> 0;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return {
    next,
    int: (min: number, max: number) => min + Math.floor(next() * (max - min + 1)),
    pick: <T,>(list: readonly T[]): T => list[Math.floor(next() * list.length)],
  };
}

const DAY = 24 * 3600_000;
const HOUR = 3600_000;

/** Who drives in the demo: [name, level, licence expiry in days from today, HV awareness trained days ago or null]. */
const DRIVERS: Array<[string, number, number, number | null]> = [
  ['Joss Kettleby', 2, 900, 120],
  ['Callum Tarrant-Ives', 3, 1400, 60],
  ['Ines Valbrook', 2, 700, 200],
  // About to expire: the roster flags it, and bookings past that day are refused.
  ['Hollis Grane', 1, 12, null],
  ['Yara Pendlecott', 3, 2100, 30],
  ['Matthias Crewe-Lind', 2, 420, 310],
  ['Sefa Oakhurst', 1, 1100, null],
  ['Keiko Brantwood', 2, 1600, 90],
  ['Priya Semmond', 1, 2500, 400],
  ['Ilkka Varde', 2, 800, 150],
  // Expired: shown as expired on the roster; no bookings after it.
  ['Sunniva Parrack', 1, -20, 250],
  ['Dafydd Quarrie', 1, 1900, 45],
  ['Maren Aldwick', 3, 1300, 500],
];

const NOTES: Record<string, string> = {
  'Callum Tarrant-Ives': 'Lead test driver for ride and handling; instructs level 1 drivers.',
  'Hollis Grane': 'Licence renewal booked; send the new expiry date to the coordinator.',
  'Sunniva Parrack': 'Licence expired: no driving until the renewal is on file.',
  'Yara Pendlecott': 'Climate lab and cold-region routes.',
};

const PURPOSES: Array<{ purpose: AssignmentPurpose; days: [number, number]; hours: [number, number]; kmPerDay: [number, number]; note: string[] }> = [
  { purpose: 'durability-route', days: [1, 3], hours: [0, 0], kmPerDay: [280, 560], note: ['Loop B, rough-road section twice a day.', 'Motorway and hill route, 130 km/h max.', ''] },
  { purpose: 'ride-handling', days: [0, 0], hours: [4, 8], kmPerDay: [60, 180], note: ['Handling track, dry.', 'Steering feel on the test loop.', ''] },
  { purpose: 'climate', days: [0, 0], hours: [5, 9], kmPerDay: [15, 60], note: ['Climate lab, -10 °C soak then drive cycle.', 'Heat soak 40 °C, cabin pull-down.', ''] },
  { purpose: 'demonstration', days: [0, 0], hours: [2, 4], kmPerDay: [8, 30], note: ['Visit of the supplier quality team.', 'Board walk-around and short drive.'] },
  { purpose: 'other', days: [0, 0], hours: [2, 6], kmPerDay: [5, 50], note: ['Transfer to the paint shop and back.', 'Wheel alignment at the workshop.'] },
];

type VehicleRow = { id: string; tag: string; status: AssetStatus; odometer_km: number; min_driver_level: number; stage: string; safety: number };
type Planned = {
  id: string;
  assetId: string;
  driver: User;
  level: number;
  startsAt: number;
  endsAt: number;
  purpose: AssignmentPurpose;
  notes: string;
  status: AssignmentStatus;
  km: number;
  override: string | null;
  cancelReason: string | null;
  createdAt: number;
};

export async function seedFleet(ctx: { transaction: Transaction; now: number }, program: Program, people: User[]) {
  const { transaction, now } = ctx;
  const sequelize = program.sequelize;
  const r = rng(0xf1ee7);
  const today = Math.floor(now / DAY) * DAY;
  const iso = (ms: number) => new Date(ms).toISOString();
  const date = (ms: number) => iso(ms).slice(0, 10);
  const coordinator = people.find((p) => p.role === 'coordinator') ?? people[0];

  // ---- Driver profiles ----
  const drivers = DRIVERS.map(([name, level, licenceDays, hvDays]) => ({ user: people.find((p) => p.name === name), level, licenceDays, hvDays })).filter(
    (d): d is { user: User; level: number; licenceDays: number; hvDays: number | null } => !!d.user,
  );
  const profiles = drivers.map((d) => ({
    user_id: d.user.id,
    driving_level: d.level,
    hv_awareness: d.hvDays !== null,
    hv_awareness_date: d.hvDays !== null ? date(today - d.hvDays * DAY) : null,
    licence_expiry: date(today + d.licenceDays * DAY),
    notes: NOTES[d.user.name] ?? '',
    version: 1,
    created_at: iso(now - 60 * DAY),
    updated_at: iso(now - r.int(1, 50) * DAY),
  }));
  const licenceEnd = new Map(drivers.map((d) => [d.user.id, today + (d.licenceDays + 1) * DAY]));

  // ---- Vehicles ----
  const vehicles = await sequelize.query<VehicleRow>(
    `SELECT v.id, v.tag, v.status, v.odometer_km, s.min_driver_level, s.name AS stage,
            (SELECT count(*)::int FROM findings f WHERE f.asset_id = v.id AND f.severity = 'safety' AND f.status NOT IN ('verified', 'rejected')) AS safety
       FROM assets v JOIN stages s ON s.id = v.stage_id
      WHERE v.program_id = $1 AND v.kind = 'vehicle' AND s.min_driver_level > 0
      ORDER BY v.tag`,
    { bind: [program.id], type: QueryTypes.SELECT, transaction },
  );
  if (!vehicles.length || !drivers.length) return { profiles: 0, assignments: 0 };
  const busy = new Map<string, Array<[number, number]>>();
  const free = (key: string, s: number, e: number) => !(busy.get(key) ?? []).some(([a, b]) => a < e && s < b);
  const hold = (key: string, s: number, e: number) => busy.set(key, [...(busy.get(key) ?? []), [s, e]]);
  const plans: Planned[] = [];
  const book = (p: Omit<Planned, 'id' | 'createdAt'>) => {
    hold(`v:${p.assetId}`, p.startsAt, p.endsAt);
    hold(`d:${p.driver.id}`, p.startsAt, p.endsAt);
    const plan = { ...p, id: crypto.randomUUID(), createdAt: Math.min(now - HOUR, p.startsAt - r.int(1, 6) * DAY) };
    plans.push(plan);
    return plan;
  };
  const canDrive = (d: (typeof drivers)[number], v: VehicleRow, s: number, e: number) =>
    d.level >= v.min_driver_level && (licenceEnd.get(d.user.id) ?? 0) >= e && free(`d:${d.user.id}`, s, e);
  const pickDriver = (v: VehicleRow, s: number, e: number, except: string[] = []) => {
    const ok = drivers.filter((d) => canDrive(d, v, s, e) && !except.includes(d.user.name));
    return ok.length ? r.pick(ok) : null;
  };
  const kmFor = (purpose: AssignmentPurpose, s: number, e: number) => {
    const spec = PURPOSES.find((x) => x.purpose === purpose)!;
    const days = Math.max(1, Math.round((e - s) / DAY));
    return r.int(spec.kmPerDay[0], spec.kmPerDay[1]) * days;
  };

  // The vehicles out now: two overdue (past their end, not checked in), the others within their window.
  const demoDriver = drivers.find((d) => d.user.email.startsWith('driver@')) ?? drivers[0];
  const out = vehicles.filter((v) => v.status === 'assigned');
  out.forEach((v, i) => {
    const overdue = i < 2;
    const startsAt = overdue ? today - (i === 0 ? 3 : 2) * DAY + 8 * HOUR : now - r.int(2, 20) * HOUR;
    const endsAt = overdue ? now - (i === 0 ? 26 : 5) * HOUR : now + r.int(6, 40) * HOUR;
    const d = pickDriver(v, startsAt, endsAt, [demoDriver.user.name, 'Hollis Grane']);
    if (!d) return;
    book({ assetId: v.id, driver: d.user, level: d.level, startsAt, endsAt, purpose: overdue ? 'durability-route' : r.pick(['ride-handling', 'climate'] as const), notes: '', status: 'checked-out', km: 0, override: null, cancelReason: null });
  });

  // The demo driver account has a vehicle waiting to be checked out within the hour, and another next week.
  const ready = vehicles.filter((v) => v.status === 'available' && v.safety === 0 && v.min_driver_level <= demoDriver.level);
  const firstHour = Math.ceil(now / HOUR) * HOUR;
  for (const [startsAt, hours] of [
    [firstHour, 8],
    [today + 6 * DAY + 8 * HOUR, 9],
  ] as const) {
    const v = ready.find((x) => free(`v:${x.id}`, startsAt, startsAt + hours * HOUR));
    if (v && free(`d:${demoDriver.user.id}`, startsAt, startsAt + hours * HOUR)) {
      book({ assetId: v.id, driver: demoDriver.user, level: demoDriver.level, startsAt, endsAt: startsAt + hours * HOUR, purpose: 'ride-handling', notes: 'Steering feel on the test loop.', status: 'planned', km: 0, override: null, cancelReason: null });
    }
  }

  // A level-1 driver booked on a stage that needs level 2, with the coordinator's reason.
  const hollis = drivers.find((d) => d.user.name === 'Hollis Grane');
  const level2 = vehicles.find((v) => v.min_driver_level === 2 && (v.status === 'available' || v.status === 'in-test') && v.safety === 0);
  if (hollis && level2) {
    const s = today + 3 * DAY + 9 * HOUR;
    if (free(`v:${level2.id}`, s, s + 4 * HOUR) && free(`d:${hollis.user.id}`, s, s + 4 * HOUR)) {
      book({
        assetId: level2.id, driver: hollis.user, level: hollis.level, startsAt: s, endsAt: s + 4 * HOUR, purpose: 'demonstration',
        notes: 'Short demonstration loop, 50 km/h max.',
        status: 'planned', km: 0, override: 'Accompanied by Callum Tarrant-Ives (level 3) for the whole drive; test loop only.', cancelReason: null,
      });
    }
  }

  // The month around today: 16 days back, 14 ahead.
  for (let day = -16; day <= 14; day += 1) {
    const dayStart = today + day * DAY;
    const past = day < 0;
    const usable = vehicles.filter((v) => (past ? v.status !== 'in-build' : v.status !== 'down' && v.status !== 'in-build' && v.safety === 0));
    const count = r.int(2, 5);
    for (let k = 0; k < count; k += 1) {
      const v = r.pick(usable);
      const spec = r.pick(PURPOSES);
      const startsAt = dayStart + r.int(7, 10) * HOUR;
      const endsAt = spec.days[1] > 0 ? dayStart + r.int(spec.days[0], spec.days[1]) * DAY + r.int(15, 18) * HOUR : startsAt + r.int(spec.hours[0], spec.hours[1]) * HOUR;
      if (!free(`v:${v.id}`, startsAt, endsAt)) continue;
      if (!past && startsAt < now) continue;
      if (past && endsAt > now) continue;
      const d = pickDriver(v, startsAt, endsAt, ['Hollis Grane']) ?? pickDriver(v, startsAt, endsAt);
      if (!d) continue;
      const cancelled = r.next() < 0.07;
      book({
        assetId: v.id, driver: d.user, level: d.level, startsAt, endsAt, purpose: spec.purpose, notes: r.pick(spec.note),
        status: cancelled ? 'cancelled' : past ? 'returned' : 'planned', km: past && !cancelled ? kmFor(spec.purpose, startsAt, endsAt) : 0,
        override: null, cancelReason: cancelled ? r.pick(['Vehicle needed for a software flash.', 'Driver off sick.', 'Test request withdrawn.']) : null,
      });
    }
  }

  // ---- Odometer readings: each vehicle's returns chain up to its odometer today. ----
  const checks: object[] = [];
  const history: object[] = [];
  const byVehicle = new Map<string, Planned[]>();
  for (const p of plans.filter((x) => x.status === 'returned').sort((a, b) => a.startsAt - b.startsAt)) {
    byVehicle.set(p.assetId, [...(byVehicle.get(p.assetId) ?? []), p]);
  }
  for (const v of vehicles) {
    const list = byVehicle.get(v.id) ?? [];
    const total = list.reduce((n, p) => n + p.km, 0);
    const scale = total > v.odometer_km * 0.9 ? (v.odometer_km * 0.9) / total : 1;
    let reading = Math.round(v.odometer_km - total * scale);
    for (const p of list) {
      const driven = Math.round(p.km * scale);
      const outAt = p.startsAt + r.int(5, 40) * 60_000;
      // Most come back a little early, now and then a little late.
      const inAt = p.endsAt + (r.next() < 0.15 ? r.int(10, 90) : -r.int(5, 45)) * 60_000;
      const charge = r.int(70, 100);
      checks.push({ id: crypto.randomUUID(), program_id: program.id, assignment_id: p.id, kind: 'check-out', odometer_km: reading, charge_percent: charge, notes: '', damage_notes: '', at: iso(outAt), by_user: p.driver.id });
      checks.push({ id: crypto.randomUUID(), program_id: program.id, assignment_id: p.id, kind: 'check-in', odometer_km: reading + driven, charge_percent: Math.max(8, charge - r.int(10, 70)), notes: r.next() < 0.2 ? 'Tyre pressures topped up after the run.' : '', damage_notes: '', at: iso(inAt), by_user: p.driver.id });
      history.push(
        { program_id: program.id, entity_type: 'assignment', entity_id: p.id, action: 'checked-out', actor_id: p.driver.id, at: iso(outAt), before: { status: 'planned' }, after: { status: 'checked-out', odometerKm: reading } },
        { program_id: program.id, entity_type: 'assignment', entity_id: p.id, action: 'checked-in', actor_id: p.driver.id, at: iso(inAt), before: { status: 'checked-out' }, after: { status: 'returned', odometerKm: reading + driven, kmDriven: driven } },
      );
      reading += driven;
    }
  }
  for (const p of plans.filter((x) => x.status === 'checked-out')) {
    const v = vehicles.find((x) => x.id === p.assetId)!;
    const outAt = p.startsAt + r.int(5, 30) * 60_000;
    checks.push({ id: crypto.randomUUID(), program_id: program.id, assignment_id: p.id, kind: 'check-out', odometer_km: v.odometer_km, charge_percent: r.int(80, 100), notes: 'Walk-around done, no marks.', damage_notes: '', at: iso(outAt), by_user: p.driver.id });
    history.push({ program_id: program.id, entity_type: 'assignment', entity_id: p.id, action: 'checked-out', actor_id: p.driver.id, at: iso(outAt), before: { status: 'planned' }, after: { status: 'checked-out', odometerKm: v.odometer_km } });
  }

  const tagOf = new Map(vehicles.map((v) => [v.id, v.tag]));
  const assignments = plans.map((p) => {
    const moves = p.status === 'returned' ? 2 : p.status === 'checked-out' || p.status === 'cancelled' ? 1 : 0;
    history.push({
      program_id: program.id,
      entity_type: 'assignment',
      entity_id: p.id,
      action: 'created',
      actor_id: coordinator.id,
      at: iso(p.createdAt),
      before: null,
      after: { assetId: p.assetId, assetTag: tagOf.get(p.assetId), driver: { id: p.driver.id, name: p.driver.name }, startsAt: iso(p.startsAt), endsAt: iso(p.endsAt), purpose: p.purpose, notes: p.notes, status: 'planned', levelOverrideReason: p.override },
      note: p.override ? `Driving level rule overridden: ${p.override}` : null,
    });
    if (p.status === 'cancelled') {
      history.push({ program_id: program.id, entity_type: 'assignment', entity_id: p.id, action: 'cancelled', actor_id: coordinator.id, at: iso(Math.min(now - HOUR, p.startsAt - HOUR)), before: { status: 'planned' }, after: { status: 'cancelled', cancelReason: p.cancelReason }, note: p.cancelReason });
    }
    return {
      id: p.id,
      program_id: program.id,
      asset_id: p.assetId,
      driver_id: p.driver.id,
      starts_at: iso(p.startsAt),
      ends_at: iso(p.endsAt),
      purpose: p.purpose,
      notes: p.notes,
      status: p.status,
      level_override_reason: p.override,
      cancel_reason: p.cancelReason,
      created_by: coordinator.id,
      version: moves,
      created_at: iso(p.createdAt),
      updated_at: iso(p.createdAt),
    };
  });

  const insert = (table: string, columns: string[], rows: object[]) =>
    rows.length
      ? sequelize.query(
          `INSERT INTO ${table} (${columns.join(', ')}) SELECT ${columns.join(', ')} FROM json_populate_recordset(null::${table}, $1::json)`,
          { bind: [JSON.stringify(rows)], transaction },
        )
      : Promise.resolve();
  await insert('driver_profiles', ['user_id', 'driving_level', 'hv_awareness', 'hv_awareness_date', 'licence_expiry', 'notes', 'version', 'created_at', 'updated_at'], profiles);
  await insert(
    'assignments',
    ['id', 'program_id', 'asset_id', 'driver_id', 'starts_at', 'ends_at', 'purpose', 'notes', 'status', 'level_override_reason', 'cancel_reason', 'created_by', 'version', 'created_at', 'updated_at'],
    assignments,
  );
  await insert('assignment_checks', ['id', 'program_id', 'assignment_id', 'kind', 'odometer_km', 'charge_percent', 'notes', 'damage_notes', 'at', 'by_user'], checks);
  await insert('history_entries', ['program_id', 'entity_type', 'entity_id', 'action', 'actor_id', 'at', 'before', 'after', 'note'], history);
  return { profiles: profiles.length, assignments: assignments.length, checks: checks.length };
}
