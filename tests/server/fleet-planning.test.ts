import request from 'supertest';
import { runOverdueReturns } from '../../server/services/fleet-mail';
import { FLEET_JOBS } from '../../server/services/fleet-jobs';
import { AssignmentListSchema, AssignmentSolutionSchema, ProposalSchema, UtilisationSchema } from '../../shared/schemas/fleet';
import { createAsset } from '../helpers/assets';
import { queuedMail } from '../helpers/findings';
import { addDriver, book, booked, inHours, makeFleetWorld, type FleetWorld } from '../helpers/fleet';
import { makeTestApp, waitForMail } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

const HOUR = 3600_000;
/** A whole hour well ahead, so windows built from it are exact. */
const base = Math.ceil((Date.now() + 300 * HOUR) / HOUR) * HOUR;
const at = (hours: number) => new Date(base + hours * HOUR).toISOString();

describe('e-mails to the driver', () => {
  let world: FleetWorld;
  beforeAll(async () => {
    world = await makeFleetWorld(t, { mail: true, vehicles: 1 });
  });

  it('when a vehicle is booked, changed and cancelled, then the driver gets an e-mail each time with the vehicle, the window and a link; the coordinator who acted gets none', async () => {
    const a = await booked(t, world, { startsAt: at(0), endsAt: at(8), notes: 'Loop B twice.' });
    const created = await waitForMail(t.deps, world.users.driver.email, `Vehicle assigned to you: ${world.vehicles[0].tag}`);
    expect(created.subject).toBe(`[${world.program.code}] Vehicle assigned to you: ${world.vehicles[0].tag}, ${at(0).slice(0, 16).replace('T', ' ')} UTC`);
    expect(created.text).toContain(`${world.users.coordinator.name} assigned a vehicle to you:`);
    expect(created.text).toContain('Purpose: Ride and handling');
    expect(created.text).toContain('Notes: Loop B twice.');
    expect(created.text).toContain(`${process.env.PUBLIC_URL}/fleet/assignments/${a.id}`);
    expect(created.text).toContain('permits and plates');

    const moved = await request(t.app).patch(`/api/assignments/${a.id}`).set(world.auth('coordinator')).send({ version: 0, endsAt: at(9) });
    expect(moved.status).toBe(200);
    const changed = await waitForMail(t.deps, world.users.driver.email, 'Your assignment changed');
    expect(changed.text).toContain(`To: ${at(8).slice(0, 16).replace('T', ' ')} UTC -> ${at(9).slice(0, 16).replace('T', ' ')} UTC`);

    await request(t.app).post(`/api/assignments/${a.id}/cancel`).set(world.auth('coordinator')).send({ version: 1, reason: 'Vehicle needed for a flash.' });
    const cancelled = await waitForMail(t.deps, world.users.driver.email, 'Assignment cancelled');
    expect(cancelled.text).toContain('Reason: Vehicle needed for a flash.');
    expect(await queuedMail(t, world.users.coordinator.email)).toEqual([]);
  });

  it('when the driver changes, then the old driver hears they no longer have it and the new one that it is theirs', async () => {
    const next = await addDriver(t, world, {}, false);
    const a = await booked(t, world, { startsAt: at(20), endsAt: at(22) });
    await request(t.app).patch(`/api/assignments/${a.id}`).set(world.auth('lead')).send({ version: 0, driverId: next.user.id });
    expect((await queuedMail(t, world.users.driver.email, 'assignment-unassigned')).length).toBe(1);
    expect((await queuedMail(t, next.user.email, 'assignment-created')).length).toBe(1);
  });
});

describe('overdue returns', () => {
  let world: FleetWorld;
  beforeAll(async () => {
    world = await makeFleetWorld(t, { vehicles: 1 });
    // The coordinator is the one who must hear about it.
    await t.sequelize.query(`UPDATE users SET email_prefs = '{}' WHERE id = $1`, { bind: [world.users.coordinator.id] });
  });

  it('when a checked-out vehicle passes its end, then it is flagged, and the coordinators are e-mailed once', async () => {
    const a = await booked(t, world, { startsAt: inHours(-1), endsAt: inHours(1) });
    expect((await request(t.app).post(`/api/assignments/${a.id}/check-out`).set(world.auth('driver')).send({ odometerKm: 2000, chargePercent: 88 })).status).toBe(200);
    await t.sequelize.query(`UPDATE assignments SET ends_at = now() - interval '30 minutes' WHERE id = $1`, { bind: [a.id] });

    const list = AssignmentListSchema.parse((await request(t.app).get(`/api/assignments?programId=${world.program.id}&overdue=true`).set(world.auth('coordinator'))).body);
    expect(list.items.map((x) => [x.id, x.overdueReturn])).toEqual([[a.id, true]]);

    expect(FLEET_JOBS.map((j) => j.name)).toContain('fleet-overdue-returns');
    expect(await runOverdueReturns(t.deps, new Date(), { programIds: [world.program.id] })).toEqual({ assignments: 1, recipients: 1 });
    expect(await runOverdueReturns(t.deps, new Date(), { programIds: [world.program.id] })).toEqual({ assignments: 0, recipients: 0 });
    const mail = await queuedMail(t, world.users.coordinator.email, 'assignment-overdue');
    expect(mail).toHaveLength(1);
    expect(mail[0].subject).toBe(`[${world.program.code}] 1 vehicle not returned on time`);
    expect(mail[0].text).toContain(`${world.vehicles[0].tag} with ${world.users.driver.name}`);

    // A new end that passes is reported again.
    const current = (await request(t.app).get(`/api/assignments/${a.id}`).set(world.auth('coordinator'))).body;
    expect((await request(t.app).patch(`/api/assignments/${a.id}`).set(world.auth('coordinator')).send({ version: current.version, endsAt: inHours(2) })).status).toBe(200);
    await t.sequelize.query(`UPDATE assignments SET ends_at = now() - interval '1 minute' WHERE id = $1`, { bind: [a.id] });
    expect((await runOverdueReturns(t.deps, new Date(), { programIds: [world.program.id] })).assignments).toBe(1);
  });
});

describe('utilisation', () => {
  it('when the windows of a period are known, then each vehicle and the stage report hours assigned over hours available', async () => {
    const world = await makeFleetWorld(t, { vehicles: 2 });
    await booked(t, world, { startsAt: at(10), endsAt: at(20) });
    await booked(t, world, { startsAt: at(30), endsAt: at(35) });
    const dropped = await booked(t, world, { assetId: world.vehicles[1].id, startsAt: at(50), endsAt: at(60) });
    await request(t.app).post(`/api/assignments/${dropped.id}/cancel`).set(world.auth('coordinator')).send({ version: 0 });
    // Half of this one falls outside the period.
    await booked(t, world, { assetId: world.vehicles[1].id, startsAt: at(95), endsAt: at(105) });
    const res = await request(t.app)
      .get(`/api/fleet/utilisation?programId=${world.program.id}&from=${encodeURIComponent(at(0))}&to=${encodeURIComponent(at(100))}`)
      .set(world.auth('technician'));
    expect(res.status).toBe(200);
    const u = UtilisationSchema.parse(res.body);
    const figures = (id: string) => u.vehicles.filter((v) => v.assetId === id).map((v) => [v.assignedHours, v.availableHours, v.utilisation, v.assignments]);
    expect(u.vehicles).toHaveLength(2);
    expect(figures(world.vehicles[0].id)).toEqual([[15, 100, 0.15, 2]]);
    // The cancelled booking holds nothing; the one across the end counts its 5 hours inside.
    expect(figures(world.vehicles[1].id)).toEqual([[5, 100, 0.05, 1]]);
    expect(u.stages).toEqual([{ stageId: world.stages[2].id, stage: 'Early prototype', vehicles: 2, assignedHours: 20, availableHours: 200, utilisation: 0.1 }]);
    expect(u.total).toEqual({ assignedHours: 20, availableHours: 200, utilisation: 0.1 });
    expect(u.definition).toContain('down time is not recorded');
    const bad = await request(t.app).get(`/api/fleet/utilisation?programId=${world.program.id}&from=${encodeURIComponent(at(10))}&to=${encodeURIComponent(at(0))}`).set(world.auth('lead'));
    expect(bad.status).toBe(400);
  });
});

describe('proposals', () => {
  let world: FleetWorld;
  let icVehicle: { id: string; tag: string };
  let senior: Awaited<ReturnType<typeof addDriver>>;
  let junior: Awaited<ReturnType<typeof addDriver>>;
  beforeAll(async () => {
    world = await makeFleetWorld(t, { vehicles: 2 });
    icVehicle = await createAsset(t, world, { stageId: world.stages[1].id, status: 'available', tag: `IC-${Date.now() % 100000}` });
    senior = await addDriver(t, world, { drivingLevel: 3 });
    junior = await addDriver(t, world, { drivingLevel: 1 });
  });

  const propose = (requests: object[]) =>
    request(t.app).post('/api/fleet/proposals').set(world.auth('coordinator')).send({ programId: world.program.id, requests });

  it('when three requests share a window, then each gets a vehicle and a driver at the least total cost, each pair explained; a request for a bench rig is listed as unfilled with the reason', async () => {
    const w = { startsAt: at(200), endsAt: at(208) };
    const res = await propose([
      { purpose: 'durability-route', ...w, stageId: world.stages[2].id },
      { purpose: 'ride-handling', ...w, stageId: world.stages[2].id },
      { purpose: 'climate', ...w, stageId: world.stages[1].id },
      { purpose: 'other', ...w, assetKind: 'bench-rig' },
    ]);
    expect(res.status).toBe(200);
    const p = ProposalSchema.parse(res.body);
    expect(p.pairs.map((x) => x.request)).toEqual([0, 1, 2]);
    // Level margins: the level-2 and level-3 drivers take the early prototypes (margins 0 and 1), the level-1 driver the integration car.
    expect(p.totalCost).toBe(3);
    expect(p.pairs.find((x) => x.request === 2)).toMatchObject({ assetId: icVehicle.id, driver: { id: junior.user.id } });
    expect(new Set(p.pairs.slice(0, 2).map((x) => x.driver.id))).toEqual(new Set([world.users.driver.id, senior.user.id]));
    expect(new Set(p.pairs.slice(0, 2).map((x) => x.assetId))).toEqual(new Set(world.vehicles.map((v) => v.id)));
    expect(p.pairs[2].explanation).toContain(`${junior.user.name} takes ${icVehicle.tag} for climate: exactly the level Integration car needs (1)`);
    expect(p.unfilled).toEqual([{ request: 3, reasons: ['Only vehicles are assigned to drivers, not a bench rig.'] }]);

    const accepted = await request(t.app)
      .post('/api/fleet/proposals/accept')
      .set(world.auth('coordinator'))
      .send({ programId: world.program.id, pairs: p.pairs.map((x) => ({ assetId: x.assetId, driverId: x.driver.id, startsAt: x.startsAt, endsAt: x.endsAt, purpose: x.purpose })) });
    expect(accepted.status).toBe(201);
    expect(accepted.body.created).toHaveLength(3);
    expect(accepted.body.refused).toEqual([]);

    // Asked again, nothing is free in that window any more.
    const again = ProposalSchema.parse((await propose([{ purpose: 'climate', ...w, stageId: world.stages[2].id }])).body);
    expect(again.pairs).toEqual([]);
    expect(again.unfilled[0].reasons.join(' ')).toContain('already booked in this window');
  });

  it('when more requests than vehicles overlap, then the extra one is unfilled because the vehicles go to the others; an accepted pair that meanwhile clashes is refused with the reasons', async () => {
    const w = { startsAt: at(300), endsAt: at(304) };
    const p = ProposalSchema.parse((await propose([1, 2, 3].map(() => ({ purpose: 'ride-handling', ...w, stageId: world.stages[2].id })))).body);
    expect(p.pairs).toHaveLength(2);
    expect(p.unfilled).toHaveLength(1);
    expect(p.unfilled[0].reasons).toEqual(['Every vehicle that suits this request goes to another request at the same time.']);
    await book(t, world, { assetId: p.pairs[0].assetId, driverId: junior.user.id, ...w, levelOverrideReason: 'Instructor on board for the whole drive.' });
    const accepted = await request(t.app)
      .post('/api/fleet/proposals/accept')
      .set(world.auth('lead'))
      .send({ programId: world.program.id, pairs: p.pairs.map((x) => ({ assetId: x.assetId, driverId: x.driver.id, startsAt: x.startsAt, endsAt: x.endsAt, purpose: x.purpose })) });
    expect(accepted.status).toBe(201);
    expect(accepted.body.created).toHaveLength(1);
    expect(accepted.body.refused).toEqual([{ pair: 0, error: expect.objectContaining({ code: 'assignment/refused' }) }]);
  });

  it('when a technician asks for a proposal, then 403; for another program, then 404', async () => {
    const body = { programId: world.program.id, requests: [{ purpose: 'other', startsAt: at(400), endsAt: at(401) }] };
    expect((await request(t.app).post('/api/fleet/proposals').set(world.auth('technician')).send(body)).status).toBe(403);
    const stranger = await makeFleetWorld(t, { vehicles: 0 });
    expect((await request(t.app).post('/api/fleet/proposals').set(stranger.auth('coordinator')).send(body)).status).toBe(404);
  });
});

describe('POST /api/calc/assignment', () => {
  let world: FleetWorld;
  beforeAll(async () => {
    world = await makeFleetWorld(t, { vehicles: 0 });
  });
  const solve = (body: unknown, role: 'technician' | 'driver' = 'technician') => request(t.app).post('/api/calc/assignment').set(world.auth(role)).send(body as object);

  it('when any signed-in user sends the worked example (Wikipedia, "Hungarian algorithm", section Example), then the pairs with total 15', async () => {
    const res = await solve({ costs: [[8, 4, 7], [5, 2, 3], [9, 4, 8]] });
    expect(res.status).toBe(200);
    expect(AssignmentSolutionSchema.parse(res.body)).toEqual({ pairs: [[0, 0], [1, 2], [2, 1]], totalCost: 15 });
  });

  it('when the matrix is rectangular with forbidden pairs, then rows without an allowed column are left out', async () => {
    const res = await solve({ costs: [[null, 3], [null, 1], [4, null]] }, 'driver');
    expect(res.body).toEqual({ pairs: [[1, 1], [2, 0]], totalCost: 5 });
  });

  it.each([
    ['a non-numeric cost', { costs: [[1, 'two']] }],
    ['ragged rows', { costs: [[1, 2], [3]] }],
    ['a matrix over 200 x 200', { costs: Array.from({ length: 201 }, () => [1]) }],
    ['no costs at all', {}],
    ['a matrix that is not an array of rows', { costs: [1, 2, 3] }],
  ])('when it gets %s, then 400 with the reason', async (_label, body) => {
    const res = await solve(body);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('request/invalid');
    expect(res.body.error.message).toMatch(/costs/);
  });

  it('when nobody is signed in, then 401', async () => {
    expect((await request(t.app).post('/api/calc/assignment').send({ costs: [[1]] })).status).toBe(401);
  });
});
