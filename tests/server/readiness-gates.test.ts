import request from 'supertest';
import { addDays } from '../../shared/domain/trend';
import type { Role } from '../../shared/schemas/auth';
import type { GateAction, GateReview, GateReviewSummary, ProgramReadiness } from '../../shared/schemas/readiness';
import { createAsset, makeWorld, type World } from '../helpers/assets';
import { queuedMail } from '../helpers/findings';
import { addFinding, dropGateMail, muteWorld, openReview } from '../helpers/readiness';
import { makeTestApp, uid, waitForMail } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

const today = () => new Date().toISOString().slice(0, 10);

/** A program with two vehicles on the early-prototype stage, one with a blocking finding. */
async function gateWorld() {
  const world = await makeWorld(t);
  await muteWorld(t, world);
  const stage = world.stages[2];
  const a = await createAsset(t, world, { stageId: stage.id, tag: `GT-${uid()}` });
  const b = await createAsset(t, world, { stageId: stage.id, tag: `GT-${uid()}` });
  const blocking = await addFinding(t, world, a.id, 'blocking', 'Rear subframe bolt torque low');
  return { world, stage, assets: [a, b], blocking };
}

const action = (world: World, fields: Partial<{ title: string; ownerId: string; dueDate: string }> = {}) => ({
  title: 'Re-torque all subframe bolts and mark them',
  ownerId: world.users.technician.id,
  dueDate: addDays(today(), 7),
  ...fields,
});

function decide(world: World, id: string, body: object, role: Role = 'lead') {
  return request(t.app).post(`/api/gate-reviews/${id}/decision`).set(world.auth(role)).send(body);
}

async function historyOf(entityId: string) {
  const [rows] = (await t.sequelize.query(`SELECT action, actor_id FROM history_entries WHERE entity_id = $1 ORDER BY id`, { bind: [entityId] })) as [
    Array<{ action: string; actor_id: string }>,
    unknown,
  ];
  return rows;
}

describe('opening a gate review', () => {
  it('when a lead opens a review, then the roll-up and its blockers are frozen as they stood, whatever changes afterwards', async () => {
    const { world, stage, assets, blocking } = await gateWorld();
    const live = (await request(t.app).get(`/api/programs/${world.program.id}/readiness`).set(world.auth('lead'))).body as ProgramReadiness;
    const review = await openReview(t, world, stage.id, { attendees: [world.users.engineer.id, world.users.technician.id, 'Supplier engineer (guest)'], notes: 'First pass.' });
    expect(review).toMatchObject({
      stageId: stage.id,
      stageName: 'Early prototype',
      openedBy: { id: world.users.lead.id },
      decision: null,
      notes: 'First pass.',
      correctsReviewId: null,
      actions: [],
      attendees: [
        { userId: world.users.engineer.id, name: world.users.engineer.name },
        { userId: world.users.technician.id, name: world.users.technician.name },
        { userId: null, name: 'Supplier engineer (guest)' },
      ],
    });
    const stageNow = live.stages.find((s) => s.stageId === stage.id)!;
    expect(review.frozen.stage).toEqual(stageNow);
    expect(review.frozen.stage.blockers).toEqual([
      expect.objectContaining({ kind: 'blocking-findings', count: 1, items: [expect.objectContaining({ id: blocking.id, assetId: assets[0].id })] }),
    ]);
    expect(review.frozen.assets.map((a) => [a.id, a.score, a.result])).toEqual([
      [assets[0].id, 85, 'conditional'],
      [assets[1].id, 100, 'go'],
    ]);

    await addFinding(t, world, assets[1].id, 'safety', 'Seat belt anchor loose');
    const later = (await request(t.app).get(`/api/programs/${world.program.id}/readiness`).set(world.auth('lead'))).body as ProgramReadiness;
    expect(later.stages.find((s) => s.stageId === stage.id)!.notCleared).toBe(1);
    const reread = (await request(t.app).get(`/api/gate-reviews/${review.id}`).set(world.auth('driver'))).body as GateReview;
    expect(reread.frozen).toEqual(review.frozen);
    expect(reread.frozen.stage.notCleared).toBe(0);
    expect(await historyOf(review.id)).toEqual([{ action: 'opened', actor_id: world.users.lead.id }]);
  });

  it('when a review of the stage is already open, then a second one is refused with 409 naming the open one', async () => {
    const { world, stage } = await gateWorld();
    const first = await openReview(t, world, stage.id);
    const res = await request(t.app).post('/api/gate-reviews').set(world.auth('lead')).send({ stageId: stage.id });
    expect(res.status).toBe(409);
    expect(res.body.error).toMatchObject({ code: 'gate/review-open', details: { reviewId: first.id } });
  });

  it('when an attendee id is not a member of the program, then 400 naming it', async () => {
    const { world, stage } = await gateWorld();
    const other = await makeWorld(t);
    const res = await request(t.app).post('/api/gate-reviews').set(world.auth('lead')).send({ stageId: stage.id, attendees: ['Guest', other.users.lead.id] });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['attendees.1']);
  });

  it('when the open review\'s notes change, then its version moves on; a stale version answers 409', async () => {
    const { world, stage } = await gateWorld();
    const review = await openReview(t, world, stage.id);
    const ok = await request(t.app).patch(`/api/gate-reviews/${review.id}`).set(world.auth('lead')).send({ notes: 'Brakes discussed.', attendees: ['Guest'], version: review.version });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ notes: 'Brakes discussed.', attendees: [{ userId: null, name: 'Guest' }], version: review.version + 1 });
    const stale = await request(t.app).patch(`/api/gate-reviews/${review.id}`).set(world.auth('lead')).send({ notes: 'Other', version: review.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.code).toBe('request/conflict');
  });
});

describe('recording the decision', () => {
  it('when a conditional go has no action, then 400; with actions it is recorded once, then every change answers 409', async () => {
    const { world, stage } = await gateWorld();
    const review = await openReview(t, world, stage.id);
    const missing = await decide(world, review.id, { decision: 'conditional', notes: 'Go once the bolts are done.' });
    expect(missing.status).toBe(400);
    expect(Object.keys(missing.body.error.details.fields)).toEqual(['actions']);

    const res = await decide(world, review.id, {
      decision: 'conditional',
      notes: 'Go once the bolts are done.',
      actions: [action(world), action(world, { title: 'Update the torque sheet', ownerId: world.users.engineer.id, dueDate: addDays(today(), 3) })],
    });
    expect(res.status).toBe(200);
    const decided = res.body as GateReview;
    expect(decided).toMatchObject({ decision: 'conditional', decisionNotes: 'Go once the bolts are done.', decidedBy: { id: world.users.lead.id }, version: review.version + 1 });
    expect(decided.decidedAt).not.toBeNull();
    expect(decided.frozen).toEqual(review.frozen);
    expect(decided.actions.map((a) => [a.title, a.owner?.id, a.status, a.overdue])).toEqual([
      ['Re-torque all subframe bolts and mark them', world.users.technician.id, 'open', false],
      ['Update the torque sheet', world.users.engineer.id, 'open', false],
    ]);
    await dropGateMail(t, world);

    const again = await decide(world, review.id, { decision: 'go' });
    expect(again.status).toBe(409);
    expect(again.body.error).toMatchObject({ code: 'gate/decided', details: { current: { id: review.id, decision: 'conditional' } } });
    for (const body of [{ notes: 'Changed my mind', version: decided.version }, { nonsense: 1 }]) {
      const edit = await request(t.app).patch(`/api/gate-reviews/${review.id}`).set(world.auth('lead')).send(body);
      expect(edit.status).toBe(409);
    }
    // The database refuses it too.
    await expect(t.sequelize.query(`UPDATE gate_reviews SET decision = 'go' WHERE id = $1`, { bind: [review.id] })).rejects.toThrow(/decided and cannot be changed/);
    const reread = (await request(t.app).get(`/api/gate-reviews/${review.id}`).set(world.auth('technician'))).body as GateReview;
    expect(reread).toMatchObject({ decision: 'conditional', decisionNotes: 'Go once the bolts are done.' });
    expect((await historyOf(review.id)).map((h) => h.action)).toEqual(['opened', 'decided']);
    expect((await historyOf(decided.actions[0].id)).map((h) => h.action)).toEqual(['created']);
  });

  it('when a decision is corrected, then the correction is a new review pointing at it, and a review is corrected only once', async () => {
    const { world, stage } = await gateWorld();
    const first = await openReview(t, world, stage.id);
    const undecided = await request(t.app).post('/api/gate-reviews').set(world.auth('lead')).send({ stageId: stage.id, correctsReviewId: first.id });
    expect(undecided.status).toBe(400);
    expect(Object.keys(undecided.body.error.details.fields)).toEqual(['correctsReviewId']);
    expect((await decide(world, first.id, { decision: 'go' })).status).toBe(200);
    await dropGateMail(t, world);
    const early = await request(t.app).post('/api/gate-reviews').set(world.auth('lead')).send({ stageId: world.stages[1].id, correctsReviewId: first.id });
    expect(early.status).toBe(400);

    const correction = await openReview(t, world, stage.id, { correctsReviewId: first.id, notes: 'The go was recorded by mistake.' });
    expect(correction.correctsReviewId).toBe(first.id);
    expect((await decide(world, correction.id, { decision: 'no-go', notes: 'Blocking finding open.' })).status).toBe(200);
    await dropGateMail(t, world);
    const original = (await request(t.app).get(`/api/gate-reviews/${first.id}`).set(world.auth('lead'))).body as GateReview;
    expect(original).toMatchObject({ decision: 'go', correctedByReviewId: correction.id });
    const twice = await request(t.app).post('/api/gate-reviews').set(world.auth('lead')).send({ stageId: stage.id, correctsReviewId: first.id });
    expect(twice.status).toBe(409);
    expect(twice.body.error.code).toBe('gate/already-corrected');

    const list = (await request(t.app).get(`/api/gate-reviews?programId=${world.program.id}&stageId=${stage.id}`).set(world.auth('driver'))).body as { items: GateReviewSummary[] };
    expect(list.items.map((r) => [r.id, r.decision])).toEqual([
      [correction.id, 'no-go'],
      [first.id, 'go'],
    ]);
    expect(list.items[0]).toMatchObject({ meanScore: 92.5, counts: { go: 1, conditional: 1, noGo: 0 } });
    expect(list.items[0]).not.toHaveProperty('frozen');
  });

  it('when the decision is recorded, then every member of the program gets an e-mail with a link to the review', async () => {
    const { world, stage } = await gateWorld();
    const review = await openReview(t, world, stage.id, { attendees: [world.users.engineer.id] });
    const res = await decide(world, review.id, { decision: 'conditional', notes: 'Bolts first.', actions: [action(world)] });
    expect(res.status).toBe(200);
    const link = `${t.deps.config.publicUrl}/gates/${review.id}`;
    for (const user of Object.values(world.users)) {
      const mail = await queuedMail(t, user.email, 'gate-decision');
      expect({ to: user.email, n: mail.length }).toEqual({ to: user.email, n: 1 });
      expect(mail[0].subject).toBe(`[${world.program.code}] Gate decision for Early prototype: Conditional go`);
      expect(mail[0].text).toContain(link);
      expect(mail[0].text).toContain(`Re-torque all subframe bolts and mark them (owner: ${world.users.technician.name}, due ${addDays(today(), 7)}, open)`);
      expect(mail[0].text).toContain('one open blocking finding on one asset');
    }
    const delivered = await waitForMail(t.deps, world.users.driver.email, 'Gate decision for Early prototype');
    expect(delivered.text).toContain(link);
  });

  it('when an action owner is not a member or its due date is past, then 400 naming the field and nothing is recorded', async () => {
    const { world, stage } = await gateWorld();
    const other = await makeWorld(t);
    const review = await openReview(t, world, stage.id);
    const stranger = await decide(world, review.id, { decision: 'conditional', actions: [action(world), action(world, { ownerId: other.users.technician.id })] });
    expect(stranger.status).toBe(400);
    expect(Object.keys(stranger.body.error.details.fields)).toEqual(['actions.1.ownerId']);
    const late = await decide(world, review.id, { decision: 'conditional', actions: [action(world, { dueDate: addDays(today(), -2) })] });
    expect(late.status).toBe(400);
    expect(Object.keys(late.body.error.details.fields)).toEqual(['actions.0.dueDate']);
    const reread = (await request(t.app).get(`/api/gate-reviews/${review.id}`).set(world.auth('lead'))).body as GateReview;
    expect(reread).toMatchObject({ decision: null, actions: [] });
    expect(await queuedMail(t, world.users.lead.email, 'gate-decision')).toEqual([]);
  });
});

describe('gate actions', () => {
  it('when the owner or a lead moves an action, then it moves with its version; anyone else gets 403', async () => {
    const { world, stage } = await gateWorld();
    const review = await openReview(t, world, stage.id);
    const decided = (await decide(world, review.id, { decision: 'conditional', actions: [action(world)] })).body as GateReview;
    await dropGateMail(t, world);
    let current = decided.actions[0];
    for (const role of ['coordinator', 'driver', 'engineer'] as const) {
      const res = await request(t.app).patch(`/api/gate-actions/${current.id}`).set(world.auth(role)).send({ status: 'done', version: current.version });
      expect({ role, status: res.status }).toEqual({ role, status: 403 });
    }
    const admin = await request(t.app).patch(`/api/gate-actions/${current.id}`).set(world.auth('admin')).send({ status: 'done', version: current.version });
    expect(admin.status).toBe(403);
    for (const [role, status] of [['technician', 'in-work'], ['lead', 'done'], ['lead', 'open']] as const) {
      const res = await request(t.app).patch(`/api/gate-actions/${current.id}`).set(world.auth(role)).send({ status, version: current.version });
      expect({ role, status: res.status }).toEqual({ role, status: 200 });
      expect(res.body).toMatchObject({ status, version: current.version + 1 });
      current = res.body as GateAction;
    }
    const stale = await request(t.app).patch(`/api/gate-actions/${current.id}`).set(world.auth('lead')).send({ status: 'done', version: current.version - 1 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current).toMatchObject({ id: current.id, status: 'open' });
    expect((await historyOf(current.id)).map((h) => h.action)).toEqual(['created', 'status-changed', 'status-changed', 'status-changed']);

    const mine = (await request(t.app).get(`/api/gate-actions?programId=${world.program.id}&mine=true`).set(world.auth('technician'))).body as { items: GateAction[] };
    expect(mine.items.map((a) => a.id)).toEqual([current.id]);
    const none = (await request(t.app).get(`/api/gate-actions?programId=${world.program.id}&mine=true`).set(world.auth('driver'))).body as { items: GateAction[] };
    expect(none.items).toEqual([]);
  });
});

describe('access rules and scoping', () => {
  it.each(['technician', 'engineer', 'coordinator', 'driver', 'admin'] as const)('when someone with the %s role opens, edits or decides a review, then 403', async (role) => {
    const { world, stage } = await gateWorld();
    const review = await openReview(t, world, stage.id);
    expect((await request(t.app).post('/api/gate-reviews').set(world.auth(role)).send({ stageId: stage.id })).status).toBe(403);
    expect((await request(t.app).patch(`/api/gate-reviews/${review.id}`).set(world.auth(role)).send({ notes: 'x', version: review.version })).status).toBe(403);
    expect((await decide(world, review.id, { decision: 'go' }, role)).status).toBe(403);
    const reread = (await request(t.app).get(`/api/gate-reviews/${review.id}`).set(world.auth(role)).send()).body as GateReview;
    expect(reread).toMatchObject({ decision: null, notes: '' });
  });

  it('when a lead reaches into another program, then every review and action route answers 404 and nothing changes', async () => {
    const mine = await gateWorld();
    const theirs = await gateWorld();
    const review = await openReview(t, theirs.world, theirs.stage.id);
    const decided = (await decide(theirs.world, review.id, { decision: 'conditional', actions: [action(theirs.world)] })).body as GateReview;
    await dropGateMail(t, theirs.world);
    const open = await openReview(t, theirs.world, theirs.world.stages[1].id);
    const lead = mine.world.auth('lead');
    const calls = [
      request(t.app).get(`/api/gate-reviews/${review.id}`).set(lead),
      request(t.app).get(`/api/gate-reviews?programId=${theirs.world.program.id}`).set(lead),
      request(t.app).get(`/api/gate-reviews?programId=${mine.world.program.id}&stageId=${theirs.stage.id}`).set(lead),
      request(t.app).post('/api/gate-reviews').set(lead).send({ stageId: theirs.world.stages[0].id }),
      request(t.app).post('/api/gate-reviews').set(lead).send({ stageId: mine.stage.id, correctsReviewId: review.id }),
      request(t.app).patch(`/api/gate-reviews/${open.id}`).set(lead).send({ notes: 'Mine now', version: open.version }),
      request(t.app).patch(`/api/gate-reviews/${open.id}`).set(lead).send({ bad: true }),
      request(t.app).post(`/api/gate-reviews/${open.id}/decision`).set(lead).send({ decision: 'go' }),
      request(t.app).post(`/api/gate-reviews/${open.id}/decision`).set(lead).send({}),
      request(t.app).patch(`/api/gate-actions/${decided.actions[0].id}`).set(lead).send({ status: 'done', version: 0 }),
      request(t.app).patch(`/api/gate-actions/${decided.actions[0].id}`).set(lead).send({}),
      request(t.app).get(`/api/gate-actions?programId=${theirs.world.program.id}`).set(lead),
    ];
    const statuses = [];
    for (const call of calls) statuses.push((await call).status);
    expect(statuses).toEqual(calls.map(() => 404));
    const reread = (await request(t.app).get(`/api/gate-reviews/${open.id}`).set(theirs.world.auth('lead'))).body as GateReview;
    expect(reread).toMatchObject({ decision: null, notes: '', version: open.version });
    const [actionRow] = (await t.sequelize.query(`SELECT status FROM gate_actions WHERE id = $1`, { bind: [decided.actions[0].id] }))[0] as Array<{ status: string }>;
    expect(actionRow.status).toBe('open');
  });

  it('when nobody is signed in, then every readiness and gate route answers 401', async () => {
    const routes = t.routes.filter((r) => /readiness|trend|target-date|gate-/.test(r.path));
    expect(routes.length).toBe(11);
    for (const route of routes) {
      const url = route.path.replace(/:[A-Za-z]+/g, '00000000-0000-4000-8000-000000000000');
      const res = await request(t.app)[route.method](url).send({});
      expect({ route: `${route.method} ${route.path}`, status: res.status }).toEqual({ route: `${route.method} ${route.path}`, status: 401 });
    }
  });
});
