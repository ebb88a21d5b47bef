import sharp from 'sharp';
import request from 'supertest';
import { AssetDetailSchema } from '../../shared/schemas/assets';
import { AssignmentListSchema, AssignmentRefusalSchema, AssignmentSchema, DriverListSchema, DriverProfileSchema, type Assignment } from '../../shared/schemas/fleet';
import { fileFinding } from '../helpers/findings';
import { addDriver, book, booked, dayIn, inHours, makeFleetWorld, reasonCodes, type FleetWorld } from '../helpers/fleet';
import { makeTestApp } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

let world: FleetWorld;
let other: FleetWorld;
beforeAll(async () => {
  world = await makeFleetWorld(t, { vehicles: 4 });
  other = await makeFleetWorld(t, { vehicles: 1 });
});

const historyOf = async (entityType: string, id: string) =>
  (
    (await t.sequelize.query(`SELECT action, before, after, note FROM history_entries WHERE entity_type = $1 AND entity_id = $2 ORDER BY id`, {
      bind: [entityType, id],
    })) as [Array<{ action: string; before: Record<string, unknown> | null; after: Record<string, unknown> | null; note: string | null }>, unknown]
  )[0];

/** A fresh vehicle of its own, so each test's bookings cannot meet another's. */
const freshVehicle = async (fields: Record<string, unknown> = {}) => {
  const res = await request(t.app)
    .post('/api/assets')
    .set(world.auth('lead'))
    .send({ programId: world.program.id, tag: `FV-${Math.random().toString(36).slice(2, 8).toUpperCase()}`, kind: 'vehicle', stageId: world.stages[2].id, status: 'available', odometerKm: 500, ...fields });
  expect(res.status).toBe(201);
  return AssetDetailSchema.parse(res.body);
};

describe('the driver roster', () => {
  it('when a coordinator lists the drivers, then people with the driver role or a profile come with their qualifications and licence flags', async () => {
    const soon = await addDriver(t, world, { drivingLevel: 1, licenceExpiry: dayIn(10) });
    const gone = await addDriver(t, world, { drivingLevel: 3, licenceExpiry: dayIn(-3) });
    const res = await request(t.app).get(`/api/drivers?programId=${world.program.id}`).set(world.auth('technician'));
    expect(res.status).toBe(200);
    const { items } = DriverListSchema.parse(res.body);
    expect(items.find((d) => d.userId === world.users.driver.id)).toMatchObject({ drivingLevel: 2, licenceExpiresSoon: false, licenceExpired: false, hasProfile: true });
    expect(items.find((d) => d.userId === soon.user.id)).toMatchObject({ drivingLevel: 1, licenceExpiresSoon: true, licenceExpired: false });
    expect(items.find((d) => d.userId === gone.user.id)).toMatchObject({ licenceExpiresSoon: false, licenceExpired: true });
    expect(items.some((d) => d.userId === world.users.technician.id)).toBe(false);
    const all = DriverListSchema.parse((await request(t.app).get(`/api/drivers?programId=${world.program.id}&all=true`).set(world.auth('lead'))).body);
    expect(all.items.find((d) => d.userId === world.users.technician.id)).toMatchObject({ hasProfile: false, drivingLevel: 0, version: 0 });
    expect(all.items.some((d) => d.userId === world.users.admin.id)).toBe(false);
  });

  it('when a coordinator fills in a profile, then it is saved with its version, written to the history, and a stale version answers 409', async () => {
    const engineer = world.users.engineer;
    const put = (body: object, role: 'coordinator' | 'lead' | 'technician' = 'coordinator') =>
      request(t.app).put(`/api/drivers/${engineer.id}`).set(world.auth(role)).send(body);
    const body = { drivingLevel: 1, hvAwareness: true, hvAwarenessDate: dayIn(-40), licenceExpiry: dayIn(400), notes: 'Drives the integration cars to the climate lab.', version: 0 };
    const created = await put(body);
    expect(created.status).toBe(200);
    expect(DriverProfileSchema.parse(created.body)).toMatchObject({ userId: engineer.id, drivingLevel: 1, hvAwareness: true, hasProfile: true, version: 1 });
    expect((await put({ ...body, drivingLevel: 2 })).status).toBe(409);
    const updated = await put({ ...body, drivingLevel: 2, version: 1 }, 'lead');
    expect(updated.body).toMatchObject({ drivingLevel: 2, version: 2 });
    const history = await historyOf('driver-profile', engineer.id);
    expect(history.map((h) => h.action)).toEqual(['created', 'updated']);
    expect(history[1]).toMatchObject({ before: { drivingLevel: 1 }, after: { drivingLevel: 2 } });
  });

  it('when the profile is bad, sent by a technician, or names a person of another program, then 400, 403 and 404', async () => {
    const id = world.users.lead.id;
    const base = { drivingLevel: 1, hvAwareness: false, licenceExpiry: dayIn(400), version: 0 };
    const noDate = await request(t.app).put(`/api/drivers/${id}`).set(world.auth('coordinator')).send({ ...base, hvAwareness: true });
    expect(noDate.status).toBe(400);
    expect(noDate.body.error.details.fields).toHaveProperty('hvAwarenessDate');
    expect((await request(t.app).put(`/api/drivers/${id}`).set(world.auth('coordinator')).send({ ...base, drivingLevel: 4 })).status).toBe(400);
    expect((await request(t.app).put(`/api/drivers/${id}`).set(world.auth('technician')).send(base)).status).toBe(403);
    expect((await request(t.app).put(`/api/drivers/${other.users.driver.id}`).set(world.auth('coordinator')).send(base)).status).toBe(404);
    expect((await request(t.app).get(`/api/drivers?programId=${other.program.id}`).set(world.auth('coordinator'))).status).toBe(404);
  });
});

describe('booking a vehicle', () => {
  it('when a coordinator books a vehicle for a driver, then 201 with the assignment in the shared schema and a history entry', async () => {
    const res = await book(t, world, { startsAt: inHours(24), endsAt: inHours(30), notes: 'Steering feel on the loop.' });
    expect(res.status).toBe(201);
    const a = AssignmentSchema.parse(res.body);
    expect(a).toMatchObject({
      programId: world.program.id,
      assetId: world.vehicles[0].id,
      assetTag: world.vehicles[0].tag,
      driver: { id: world.users.driver.id, name: world.users.driver.name },
      purpose: 'ride-handling',
      status: 'planned',
      levelOverrideReason: null,
      overdueReturn: false,
      checkout: null,
      checkin: null,
      version: 0,
      vehicle: { stage: 'Early prototype', minDriverLevel: 2, cleared: true, status: 'available' },
    });
    expect((await historyOf('assignment', a.id)).map((h) => h.action)).toEqual(['created']);
  });

  it('when a lead books, then 201; a technician, an engineer or a driver cannot book (403)', async () => {
    expect((await book(t, world, { assetId: world.vehicles[1].id, startsAt: inHours(300), endsAt: inHours(302) }, 'lead')).status).toBe(201);
    for (const role of ['technician', 'engineer', 'driver'] as const) {
      expect((await book(t, world, { assetId: world.vehicles[1].id, startsAt: inHours(400), endsAt: inHours(402) }, role)).status).toBe(403);
    }
  });

  it.each([
    ['the window ends before it starts', { startsAt: inHours(30), endsAt: inHours(29) }, 'endsAt'],
    ['the window is longer than 31 days', { startsAt: inHours(30), endsAt: inHours(30 + 32 * 24) }, 'endsAt'],
    ['the window has already ended', { startsAt: inHours(-5), endsAt: inHours(-1) }, 'endsAt'],
    ['the vehicle is unknown', { assetId: '00000000-0000-4000-8000-00000000abcd' }, 'assetId'],
    ['the driver is unknown', { driverId: '00000000-0000-4000-8000-00000000abcd' }, 'driverId'],
    ['the purpose is not one of the list', { purpose: 'joyride' }, 'purpose'],
    ['the time has no offset', { startsAt: '2026-12-10T08:00:00' }, 'startsAt'],
  ] as Array<[string, Record<string, unknown>, string]>)('when %s, then 400 naming the field', async (_label, fields, field) => {
    const res = await book(t, world, { startsAt: inHours(500), endsAt: inHours(505), ...fields });
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields).toHaveProperty(field);
  });

  it('when the asset is a bench rig or a vehicle of another program, or the driver belongs to another program, then 400', async () => {
    const rig = await freshVehicle({ kind: 'bench-rig', stageId: world.stages[0].id });
    expect((await book(t, world, { assetId: rig.id, startsAt: inHours(510), endsAt: inHours(512) })).body.error.details.fields).toHaveProperty('assetId');
    expect((await book(t, world, { assetId: other.vehicles[0].id, startsAt: inHours(510), endsAt: inHours(512) })).status).toBe(400);
    expect((await book(t, world, { driverId: other.users.driver.id, startsAt: inHours(510), endsAt: inHours(512) })).status).toBe(400);
  });
});

describe('refusals (every reason listed)', () => {
  it('when the window overlaps another booking of the same vehicle, then 422 vehicle-overlap naming it', async () => {
    const vehicle = await freshVehicle();
    const first = await booked(t, world, { assetId: vehicle.id, startsAt: inHours(100), endsAt: inHours(108) });
    const second = await addDriver(t, world);
    const res = await book(t, world, { assetId: vehicle.id, driverId: second.user.id, startsAt: inHours(106), endsAt: inHours(110) });
    expect(res.status).toBe(422);
    const body = AssignmentRefusalSchema.parse(res.body);
    expect(body.error.details.reasons).toEqual([expect.objectContaining({ code: 'vehicle-overlap', overridable: false, assignmentIds: [first.id] })]);
    // Back to back is fine: windows are half-open.
    expect((await book(t, world, { assetId: vehicle.id, driverId: second.user.id, startsAt: inHours(108), endsAt: inHours(110) })).status).toBe(201);
  });

  it('when the driver is already booked then, then 422 driver-overlap', async () => {
    const driver = await addDriver(t, world);
    const [v1, v2] = [await freshVehicle(), await freshVehicle()];
    await booked(t, world, { assetId: v1.id, driverId: driver.user.id, startsAt: inHours(120), endsAt: inHours(128) });
    const res = await book(t, world, { assetId: v2.id, driverId: driver.user.id, startsAt: inHours(127), endsAt: inHours(130) });
    expect(res.status).toBe(422);
    expect(reasonCodes(res.body)).toEqual(['driver-overlap']);
  });

  it('when the vehicle has an open safety finding, then 422 vehicle-not-cleared, and no override lifts it', async () => {
    const vehicle = await freshVehicle();
    await fileFinding(t, { ...world, asset: vehicle }, { title: 'Parking brake does not hold on the ramp', severity: 'safety' });
    const res = await book(t, world, { assetId: vehicle.id, startsAt: inHours(140), endsAt: inHours(142) });
    expect(res.status).toBe(422);
    expect(reasonCodes(res.body)).toEqual(['vehicle-not-cleared']);
    expect(res.body.error.message).toContain('Parking brake does not hold on the ramp');
    const low = await addDriver(t, world, { drivingLevel: 1 });
    const override = await book(t, world, { assetId: vehicle.id, driverId: low.user.id, startsAt: inHours(140), endsAt: inHours(142), levelOverrideReason: 'Accompanied by a level 3 driver.' });
    expect(override.status).toBe(422);
    expect(reasonCodes(override.body)).toEqual(['vehicle-not-cleared']);
  });

  it('when the vehicle is down or retired, then 422 vehicle-unavailable', async () => {
    for (const status of ['down', 'retired']) {
      const vehicle = await freshVehicle({ status });
      const res = await book(t, world, { assetId: vehicle.id, startsAt: inHours(150), endsAt: inHours(152) });
      expect(res.status).toBe(422);
      expect(reasonCodes(res.body)).toEqual(['vehicle-unavailable']);
    }
  });

  it('when the licence expires before the window ends, or none is recorded, then 422 licence-expired or licence-unknown', async () => {
    const expiring = await addDriver(t, world, { licenceExpiry: dayIn(2) });
    const res = await book(t, world, { assetId: world.vehicles[2].id, driverId: expiring.user.id, startsAt: inHours(24 * 3 + 1), endsAt: inHours(24 * 3 + 3) });
    expect(res.status).toBe(422);
    expect(reasonCodes(res.body)).toEqual(['licence-expired']);
    const none = await addDriver(t, world, { licenceExpiry: null });
    expect(reasonCodes((await book(t, world, { assetId: world.vehicles[2].id, driverId: none.user.id, startsAt: inHours(160), endsAt: inHours(162) })).body)).toEqual(['licence-unknown']);
  });

  it('when the driver is below the stage minimum, then 422 driver-level marked overridable', async () => {
    const low = await addDriver(t, world, { drivingLevel: 1 });
    const res = await book(t, world, { assetId: world.vehicles[2].id, driverId: low.user.id, startsAt: inHours(170), endsAt: inHours(172) });
    expect(res.status).toBe(422);
    expect(res.body.error.details.reasons).toEqual([expect.objectContaining({ code: 'driver-level', overridable: true })]);
  });

  it('when several rules fail at once, then every reason is listed in one answer', async () => {
    const vehicle = await freshVehicle();
    const driver = await addDriver(t, world, { drivingLevel: 1, licenceExpiry: dayIn(1) });
    await booked(t, world, { assetId: vehicle.id, startsAt: inHours(72), endsAt: inHours(80) });
    await booked(t, world, { assetId: world.vehicles[3].id, driverId: driver.user.id, startsAt: inHours(20), endsAt: inHours(22), levelOverrideReason: 'With an instructor on board.' });
    await fileFinding(t, { ...world, asset: vehicle }, { title: 'HV interlock loop open', severity: 'safety' });
    const res = await book(t, world, { assetId: vehicle.id, driverId: driver.user.id, startsAt: inHours(21), endsAt: inHours(75) });
    expect(res.status).toBe(422);
    expect(reasonCodes(res.body)).toEqual(['vehicle-overlap', 'driver-overlap', 'vehicle-not-cleared', 'driver-level', 'licence-expired']);
  });
});

describe('the level override', () => {
  it('when a coordinator books a driver below the level with a written reason, then 201, and the reason is kept on the assignment and in the history', async () => {
    const low = await addDriver(t, world, { drivingLevel: 1 });
    const reason = 'Accompanied by a level 3 driver for the whole drive; test loop only.';
    const res = await book(t, world, { assetId: world.vehicles[2].id, driverId: low.user.id, startsAt: inHours(180), endsAt: inHours(184), levelOverrideReason: reason });
    expect(res.status).toBe(201);
    expect(res.body.levelOverrideReason).toBe(reason);
    const [created] = await historyOf('assignment', res.body.id);
    expect(created.note).toBe(`Driving level rule overridden: ${reason}`);
    expect(created.after).toMatchObject({ levelOverrideReason: reason });
    // The override stays while driver and vehicle stay: the window moves without a new reason.
    const moved = await request(t.app).patch(`/api/assignments/${res.body.id}`).set(world.auth('coordinator')).send({ version: 0, endsAt: inHours(186) });
    expect(moved.status).toBe(200);
    expect(moved.body.levelOverrideReason).toBe(reason);
  });

  it('when the override reason is blank or a word, then 400 (an override needs a written reason)', async () => {
    const low = await addDriver(t, world, { drivingLevel: 1 });
    for (const levelOverrideReason of ['', '   ', 'ok']) {
      const res = await book(t, world, { assetId: world.vehicles[2].id, driverId: low.user.id, startsAt: inHours(190), endsAt: inHours(192), levelOverrideReason });
      expect(res.status).toBe(400);
      expect(res.body.error.details.fields).toHaveProperty('levelOverrideReason');
    }
  });

  it('when an override reason comes with a driver at the level, then nothing is overridden and none is stored', async () => {
    const res = await book(t, world, { assetId: world.vehicles[2].id, startsAt: inHours(194), endsAt: inHours(196), levelOverrideReason: 'Not needed at all here.' });
    expect(res.status).toBe(201);
    expect(res.body.levelOverrideReason).toBeNull();
  });
});

describe('changing and cancelling', () => {
  it('when the window moves with the current version, then 200 and the history keeps before and after; a stale version answers 409', async () => {
    const a = await booked(t, world, { assetId: world.vehicles[3].id, startsAt: inHours(200), endsAt: inHours(204) });
    const res = await request(t.app).patch(`/api/assignments/${a.id}`).set(world.auth('coordinator')).send({ version: a.version, startsAt: inHours(201), purpose: 'climate' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ purpose: 'climate', version: a.version + 1 });
    const [, updated] = await historyOf('assignment', a.id);
    expect(updated).toMatchObject({ action: 'updated', before: { purpose: 'ride-handling' }, after: { purpose: 'climate' } });
    const stale = await request(t.app).patch(`/api/assignments/${a.id}`).set(world.auth('coordinator')).send({ version: a.version, notes: 'x' });
    expect(stale.status).toBe(409);
    expect(AssignmentSchema.parse(stale.body.error.details.current).version).toBe(a.version + 1);
  });

  it('when a change would overlap another booking or put the end before the start, then 422 or 400: the rules are checked again', async () => {
    const vehicle = await freshVehicle();
    const driver = await addDriver(t, world);
    await booked(t, world, { assetId: vehicle.id, startsAt: inHours(210), endsAt: inHours(214) });
    const a = await booked(t, world, { assetId: vehicle.id, driverId: driver.user.id, startsAt: inHours(220), endsAt: inHours(224) });
    const clash = await request(t.app).patch(`/api/assignments/${a.id}`).set(world.auth('coordinator')).send({ version: 0, startsAt: inHours(212) });
    expect(clash.status).toBe(422);
    expect(reasonCodes(clash.body)).toEqual(['vehicle-overlap']);
    const backwards = await request(t.app).patch(`/api/assignments/${a.id}`).set(world.auth('coordinator')).send({ version: 0, endsAt: inHours(219) });
    expect(backwards.status).toBe(400);
    const low = await addDriver(t, world, { drivingLevel: 0 });
    const lower = await request(t.app).patch(`/api/assignments/${a.id}`).set(world.auth('lead')).send({ version: 0, driverId: low.user.id });
    expect(reasonCodes(lower.body)).toEqual(['driver-level']);
  });

  it('when a planned assignment is cancelled, then it is cancelled with its reason and cannot be cancelled or changed again (409)', async () => {
    const a = await booked(t, world, { assetId: world.vehicles[3].id, startsAt: inHours(230), endsAt: inHours(232) });
    const res = await request(t.app).post(`/api/assignments/${a.id}/cancel`).set(world.auth('coordinator')).send({ version: 0, reason: 'Test request withdrawn.' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'cancelled', cancelReason: 'Test request withdrawn.' });
    expect((await request(t.app).post(`/api/assignments/${a.id}/cancel`).set(world.auth('coordinator')).send({ version: 1 })).status).toBe(409);
    expect((await request(t.app).patch(`/api/assignments/${a.id}`).set(world.auth('coordinator')).send({ version: 1, notes: 'x' })).body.error.code).toBe('assignment/closed');
    // The slot is free again.
    expect((await book(t, world, { assetId: world.vehicles[3].id, startsAt: inHours(230), endsAt: inHours(232) })).status).toBe(201);
  });
});

describe('check-out and check-in', () => {
  const checkOut = (a: Assignment, body: object, auth: Record<string, string>) => request(t.app).post(`/api/assignments/${a.id}/check-out`).set(auth).send(body);
  const checkIn = (a: Assignment, body: object, auth: Record<string, string>) => request(t.app).post(`/api/assignments/${a.id}/check-in`).set(auth).send(body);
  const asset = async (id: string) => (await request(t.app).get(`/api/assets/${id}`).set(world.auth('lead'))).body as { status: string; odometerKm: number };

  it('when the assigned driver checks out and in with damage, then the vehicle is assigned, then available with the kilometres added, and the damage is a major finding on it', async () => {
    const vehicle = await freshVehicle({ odometerKm: 1200 });
    const d = await addDriver(t, world);
    const a = await booked(t, world, { assetId: vehicle.id, driverId: d.user.id, startsAt: inHours(1), endsAt: inHours(6) });
    const out = await checkOut(a, { odometerKm: 1210, chargePercent: 92, notes: 'Walk-around clean.' }, d.auth);
    expect(out.status).toBe(200);
    expect(AssignmentSchema.parse(out.body)).toMatchObject({ status: 'checked-out', checkout: { odometerKm: 1210, chargePercent: 92, notes: 'Walk-around clean.', by: { id: d.user.id } } });
    expect(await asset(vehicle.id)).toMatchObject({ status: 'assigned', odometerKm: 1210 });

    const back = await checkIn(a, { odometerKm: 1347.5, chargePercent: 41, damageNotes: 'Scrape on the rear left bumper corner.\nFrom a kerb at the loop exit.' }, d.auth);
    expect(back.status).toBe(200);
    const done = AssignmentSchema.parse(back.body);
    expect(done).toMatchObject({ status: 'returned', checkin: { odometerKm: 1347.5, chargePercent: 41 } });
    expect(await asset(vehicle.id)).toMatchObject({ status: 'available', odometerKm: 1347.5 });
    const finding = (await request(t.app).get(`/api/findings/${done.checkin!.findingId}`).set(world.auth('lead'))).body;
    expect(finding).toMatchObject({ assetId: vehicle.id, severity: 'major', status: 'open', title: 'Damage at check-in: Scrape on the rear left bumper corner.' });
    expect(finding.description).toContain('From a kerb at the loop exit.');
    const actions = (await historyOf('assignment', a.id)).map((h) => h.action);
    expect(actions).toEqual(['created', 'checked-out', 'checked-in', 'damage-reported']);
    expect((await historyOf('asset', vehicle.id)).map((h) => h.action)).toEqual(expect.arrayContaining(['checked-out', 'checked-in']));
  });

  it('when damage is reported as safety, then the finding is a safety one and the vehicle is not cleared for the next booking', async () => {
    const vehicle = await freshVehicle();
    const d = await addDriver(t, world);
    const a = await booked(t, world, { assetId: vehicle.id, driverId: d.user.id, startsAt: inHours(2), endsAt: inHours(4) });
    await checkOut(a, { odometerKm: 500, chargePercent: 80 }, world.auth('coordinator'));
    const back = await checkIn(a, { odometerKm: 530, chargePercent: 60, damageNotes: 'Brake pedal goes long after the hard stops.', damageSeverity: 'safety' }, world.auth('coordinator'));
    expect(back.body.vehicle.cleared).toBe(false);
    expect(reasonCodes((await book(t, world, { assetId: vehicle.id, startsAt: inHours(30), endsAt: inHours(32) })).body)).toEqual(['vehicle-not-cleared']);
  });

  it('when the odometer goes down at check-in, or reads below the vehicle at check-out, then 400 on odometerKm', async () => {
    const vehicle = await freshVehicle({ odometerKm: 800 });
    const d = await addDriver(t, world);
    const a = await booked(t, world, { assetId: vehicle.id, driverId: d.user.id, startsAt: inHours(1), endsAt: inHours(3) });
    expect((await checkOut(a, { odometerKm: 799, chargePercent: 90 }, d.auth)).body.error.details.fields).toHaveProperty('odometerKm');
    expect((await checkOut(a, { odometerKm: 805, chargePercent: 90 }, d.auth)).status).toBe(200);
    const down = await checkIn(a, { odometerKm: 804.9, chargePercent: 50 }, d.auth);
    expect(down.status).toBe(400);
    expect(down.body.error.details.fields).toHaveProperty('odometerKm');
    expect(await asset(vehicle.id)).toMatchObject({ status: 'assigned', odometerKm: 805 });
  });

  it('when someone other than the driver, a coordinator or a lead checks out, or the state is wrong, then 403 or 409', async () => {
    const d = await addDriver(t, world);
    const a = await booked(t, world, { assetId: (await freshVehicle()).id, driverId: d.user.id, startsAt: inHours(1), endsAt: inHours(3) });
    const stranger = await addDriver(t, world);
    expect((await checkOut(a, { odometerKm: 600, chargePercent: 90 }, stranger.auth)).status).toBe(403);
    expect((await checkOut(a, { odometerKm: 600, chargePercent: 90 }, world.auth('technician'))).status).toBe(403);
    expect((await checkIn(a, { odometerKm: 600, chargePercent: 90 }, d.auth)).body.error.code).toBe('assignment/not-checked-out');
    const later = await booked(t, world, { assetId: world.vehicles[1].id, driverId: d.user.id, startsAt: inHours(60), endsAt: inHours(62) });
    expect((await checkOut(later, { odometerKm: 2000, chargePercent: 90 }, d.auth)).body.error.code).toBe('assignment/too-early');
  });

  it('when photos of the vehicle were uploaded first, then the check links them; a photo of another vehicle is refused', async () => {
    const jpeg = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#889' } }).jpeg().toBuffer();
    const vehicle = await freshVehicle();
    const d = await addDriver(t, world);
    const a = await booked(t, world, { assetId: vehicle.id, driverId: d.user.id, startsAt: inHours(1), endsAt: inHours(3) });
    const upload = async (assetId: string) =>
      (await request(t.app).post(`/api/assets/${assetId}/photos`).set(d.auth).attach('photo', jpeg, 'walk.jpg')).body.id as string;
    const foreign = await upload(world.vehicles[0].id);
    expect((await checkOut(a, { odometerKm: 500, chargePercent: 90, photoIds: [foreign] }, d.auth)).status).toBe(400);
    const mine = await upload(vehicle.id);
    const out = await checkOut(a, { odometerKm: 500, chargePercent: 90, photoIds: [mine] }, d.auth);
    expect(out.status).toBe(200);
    expect(out.body.checkout.photos.map((p: { id: string }) => p.id)).toEqual([mine]);
  });
});

describe('reading and scoping', () => {
  it('when a member lists a period, then the assignments overlapping it come back; a driver can ask for their own only', async () => {
    const a = await booked(t, world, { assetId: world.vehicles[1].id, startsAt: inHours(600), endsAt: inHours(604) });
    const q = `programId=${world.program.id}&from=${encodeURIComponent(inHours(590))}&to=${encodeURIComponent(inHours(610))}`;
    const all = AssignmentListSchema.parse((await request(t.app).get(`/api/assignments?${q}`).set(world.auth('technician'))).body);
    expect(all.items.map((x) => x.id)).toContain(a.id);
    const mine = AssignmentListSchema.parse((await request(t.app).get(`/api/assignments?${q}&mine=true`).set(world.auth('driver'))).body);
    expect(mine.items.every((x) => x.driver.id === world.users.driver.id)).toBe(true);
    const filtered = AssignmentListSchema.parse((await request(t.app).get(`/api/assignments?${q}&purpose=climate&stageId=${world.stages[2].id}`).set(world.auth('lead'))).body);
    expect(filtered.items.map((x) => x.id)).not.toContain(a.id);
    expect((await request(t.app).get(`/api/assignments/${a.id}`).set(world.auth('driver'))).status).toBe(200);
    expect((await request(t.app).get(`/api/assignments?programId=${world.program.id}&from=${encodeURIComponent(inHours(10))}&to=${encodeURIComponent(inHours(5))}`).set(world.auth('lead'))).status).toBe(400);
  });

  it('when someone of another program names an assignment or the program, then 404', async () => {
    const a = await booked(t, world, { assetId: world.vehicles[1].id, startsAt: inHours(620), endsAt: inHours(622) });
    const stranger = other.auth('coordinator');
    expect((await request(t.app).get(`/api/assignments/${a.id}`).set(stranger)).status).toBe(404);
    expect((await request(t.app).patch(`/api/assignments/${a.id}`).set(stranger).send({ version: 0, notes: 'x' })).status).toBe(404);
    expect((await request(t.app).post(`/api/assignments/${a.id}/cancel`).set(stranger).send({ version: 0 })).status).toBe(404);
    expect((await request(t.app).post(`/api/assignments/${a.id}/check-out`).set(stranger).send({ odometerKm: 1, chargePercent: 1 })).status).toBe(404);
    expect((await request(t.app).get(`/api/assignments/${a.id}/history`).set(stranger)).status).toBe(404);
    expect((await request(t.app).get(`/api/assignments?programId=${world.program.id}`).set(stranger)).status).toBe(404);
    expect((await book(t, world, { programId: other.program.id }, 'coordinator')).status).toBe(404);
  });

  it('when the history of an assignment is read, then it lists its changes newest first', async () => {
    const a = await booked(t, world, { assetId: world.vehicles[1].id, startsAt: inHours(640), endsAt: inHours(642) });
    await request(t.app).post(`/api/assignments/${a.id}/cancel`).set(world.auth('lead')).send({ version: 0 });
    const res = await request(t.app).get(`/api/assignments/${a.id}/history`).set(world.auth('driver'));
    expect(res.body.entries.map((e: { action: string }) => e.action)).toEqual(['cancelled', 'created']);
  });
});

describe('program scoping of the fleet routes', () => {
  const fleetRoutes = () => t.routes.filter((r) => /^\/api\/(drivers|assignments|fleet|calc\/assignment)/.test(r.path));
  const M = '["coordinator","lead"]';
  const W = '["technician","engineer","coordinator","driver","lead"]';

  it('when the route table is read, then every fleet route is in it with its access rule', () => {
    expect(fleetRoutes().map((r) => `${r.method} ${r.path} ${JSON.stringify(r.access)}`)).toEqual([
      'get /api/drivers "user"',
      `put /api/drivers/:id ${M}`,
      'get /api/assignments "user"',
      `post /api/assignments ${M}`,
      'get /api/assignments/:id "user"',
      `patch /api/assignments/:id ${M}`,
      `post /api/assignments/:id/cancel ${M}`,
      `post /api/assignments/:id/check-out ${W}`,
      `post /api/assignments/:id/check-in ${W}`,
      'get /api/assignments/:id/history "user"',
      'get /api/fleet/utilisation "user"',
      `post /api/fleet/proposals ${M}`,
      `post /api/fleet/proposals/accept ${M}`,
      'post /api/calc/assignment "user"',
    ]);
  });

  it('when a lead calls every fleet route naming another program or its objects, then 404 (never 403) and nothing changes', async () => {
    const foreign = await booked(t, other, { startsAt: inHours(700), endsAt: inHours(702) });
    const P = other.program.id;
    const later = { startsAt: inHours(710), endsAt: inHours(712) };
    const calls: Record<string, { path: string; query?: object; body?: object }> = {
      'get /api/drivers': { path: '/api/drivers', query: { programId: P } },
      'put /api/drivers/:id': { path: `/api/drivers/${other.users.driver.id}`, body: { drivingLevel: 3, hvAwareness: false, licenceExpiry: dayIn(99), version: 1 } },
      'get /api/assignments': { path: '/api/assignments', query: { programId: P } },
      'post /api/assignments': { path: '/api/assignments', body: { programId: P, assetId: other.vehicles[0].id, driverId: other.users.driver.id, purpose: 'other', ...later } },
      'get /api/assignments/:id': { path: `/api/assignments/${foreign.id}` },
      'patch /api/assignments/:id': { path: `/api/assignments/${foreign.id}`, body: { version: 0, notes: 'Taken over' } },
      'post /api/assignments/:id/cancel': { path: `/api/assignments/${foreign.id}/cancel`, body: { version: 0 } },
      'post /api/assignments/:id/check-out': { path: `/api/assignments/${foreign.id}/check-out`, body: { odometerKm: 9999, chargePercent: 50 } },
      'post /api/assignments/:id/check-in': { path: `/api/assignments/${foreign.id}/check-in`, body: { odometerKm: 9999, chargePercent: 50 } },
      'get /api/assignments/:id/history': { path: `/api/assignments/${foreign.id}/history` },
      'get /api/fleet/utilisation': { path: '/api/fleet/utilisation', query: { programId: P, ...{ from: inHours(0), to: inHours(10) } } },
      'post /api/fleet/proposals': { path: '/api/fleet/proposals', body: { programId: P, requests: [{ purpose: 'other', ...later }] } },
      'post /api/fleet/proposals/accept': { path: '/api/fleet/proposals/accept', body: { programId: P, pairs: [{ assetId: other.vehicles[0].id, driverId: other.users.driver.id, purpose: 'other', ...later }] } },
    };
    for (const route of fleetRoutes().filter((r) => r.path !== '/api/calc/assignment')) {
      const key = `${route.method} ${route.path}`;
      const call = calls[key];
      expect({ key, known: !!call }).toEqual({ key, known: true });
      let req = request(t.app)[route.method](call.path).set(world.auth('lead'));
      if (call.query) req = req.query(call.query);
      if (call.body) req = req.send(call.body);
      const res = await req;
      expect({ key, status: res.status }).toEqual({ key, status: 404 });
    }
    const after = await request(t.app).get(`/api/assignments/${foreign.id}`).set(other.auth('lead'));
    expect(after.body).toMatchObject({ status: 'planned', notes: '', version: 0 });
  });

  it('when nobody is signed in, then every fleet route answers 401; a path id that is not a uuid answers 404', async () => {
    for (const route of fleetRoutes()) {
      const res = await request(t.app)[route.method](route.path.replace(':id', world.vehicles[0].id)).send({});
      expect({ route: `${route.method} ${route.path}`, status: res.status }).toEqual({ route: `${route.method} ${route.path}`, status: 401 });
    }
    for (const path of ['/api/assignments/nope', '/api/assignments/nope/history']) {
      expect((await request(t.app).get(path).set(world.auth('lead'))).status).toBe(404);
    }
  });
});
