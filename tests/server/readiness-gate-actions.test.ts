import request from 'supertest';
import { addDays } from '../../shared/domain/trend';
import type { ProgramMember } from '../../shared/schemas/admin';
import type { GateAction, GateReview } from '../../shared/schemas/readiness';
import { createAsset, makeWorld, type World } from '../helpers/assets';
import { dropGateMail, muteWorld, openReview } from '../helpers/readiness';
import { makeTestApp, makeUser, uid } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

const today = () => new Date().toISOString().slice(0, 10);
const ROLES_IN_A_PROGRAM = ['technician', 'engineer', 'coordinator', 'driver', 'lead', 'admin'] as const;

/** A program with a decided conditional go on its early-prototype stage: two actions for the technician, one for the engineer. */
async function actionWorld() {
  const world = await makeWorld(t);
  await muteWorld(t, world);
  const stage = world.stages[2];
  await createAsset(t, world, { stageId: stage.id, tag: `GA-${uid()}` });
  const review = await openReview(t, world, stage.id);
  const res = await request(t.app)
    .post(`/api/gate-reviews/${review.id}/decision`)
    .set(world.auth('lead'))
    .send({
      decision: 'conditional',
      notes: 'Go once the actions are closed.',
      actions: [
        { title: 'Re-torque the rear subframe bolts', ownerId: world.users.technician.id, dueDate: addDays(today(), 10) },
        { title: 'Update the restbus files', ownerId: world.users.engineer.id, dueDate: addDays(today(), 3) },
        { title: 'Re-run the isolation measurement', ownerId: world.users.technician.id, dueDate: addDays(today(), 2) },
      ],
    });
  if (res.status !== 200) throw new Error(`decision failed: ${res.status} ${JSON.stringify(res.body)}`);
  await dropGateMail(t, world);
  const decided = res.body as GateReview;
  return { world, stage, review: decided, actions: decided.actions };
}

function move(world: World, role: (typeof ROLES_IN_A_PROGRAM)[number], action: Pick<GateAction, 'id' | 'version'>, body: object) {
  return request(t.app).patch(`/api/gate-actions/${action.id}`).set(world.auth(role)).send({ version: action.version, ...body });
}

async function mine(world: World, role: (typeof ROLES_IN_A_PROGRAM)[number]) {
  const res = await request(t.app).get(`/api/gate-actions?programId=${world.program.id}&mine=true`).set(world.auth(role));
  expect(res.status).toBe(200);
  return (res.body as { items: GateAction[] }).items;
}

async function historyOf(entityId: string) {
  const [rows] = (await t.sequelize.query(`SELECT action, actor_id, before, after FROM history_entries WHERE entity_id = $1 ORDER BY id`, { bind: [entityId] })) as [
    Array<{ action: string; actor_id: string; before: unknown; after: unknown }>,
    unknown,
  ];
  return rows;
}

describe('the members of a program', () => {
  it.each(ROLES_IN_A_PROGRAM)('when a %s asks for the members, then every active member comes back with id, name and role only', async (role) => {
    const world = await makeWorld(t);
    const other = await makeWorld(t);
    const gone = await makeUser({ role: 'technician', programIds: [world.program.id], active: false });
    const res = await request(t.app).get(`/api/programs/${world.program.id}/members`).set(world.auth(role));
    expect(res.status).toBe(200);
    const items = (res.body as { items: ProgramMember[] }).items;
    const expected = Object.values(world.users)
      .map((u) => ({ id: u.id, name: u.name, role: u.role }))
      .sort((a, b) => a.name.toLowerCase().localeCompare(b.name.toLowerCase()) || a.id.localeCompare(b.id));
    expect(items.map((m) => m.id).sort()).toEqual(expected.map((m) => m.id).sort());
    expect(items).toEqual(expect.arrayContaining(expected));
    // Only what a picker needs: no e-mail address, no password data.
    for (const member of items) expect(Object.keys(member).sort()).toEqual(['id', 'name', 'role']);
    expect(JSON.stringify(res.body)).not.toMatch(/@|password|hash/i);
    expect(items.map((m) => m.id)).not.toContain(gone.id);
    expect(items.map((m) => m.id)).not.toContain(other.users.lead.id);
  });

  it('when someone asks for the members of a program they do not belong to, or of no program, then 404', async () => {
    const world = await makeWorld(t);
    const other = await makeWorld(t);
    for (const role of ROLES_IN_A_PROGRAM) {
      const res = await request(t.app).get(`/api/programs/${other.program.id}/members`).set(world.auth(role));
      expect({ role, status: res.status }).toEqual({ role, status: 404 });
    }
    expect((await request(t.app).get('/api/programs/not-a-program/members').set(world.auth('lead'))).status).toBe(404);
    expect((await request(t.app).get(`/api/programs/${world.program.id}/members`)).status).toBe(401);
  });
});

describe('my gate actions', () => {
  it('when an owner lists their actions, then they see only theirs, open ones first by due date, with the stage and review they came from', async () => {
    const { world, stage, review, actions } = await actionWorld();
    // The API refuses a past due date, rightly: an overdue action is made so directly.
    await t.sequelize.query(`UPDATE gate_actions SET due_date = $2 WHERE id = $1`, { bind: [actions[2].id, addDays(today(), -2)] });
    const done = await move(world, 'technician', actions[0], { status: 'done', note: 'All twelve bolts re-torqued and marked.' });
    expect(done.status).toBe(200);

    const items = await mine(world, 'technician');
    expect(items.map((a) => [a.title, a.status, a.overdue])).toEqual([
      ['Re-run the isolation measurement', 'open', true],
      ['Re-torque the rear subframe bolts', 'done', false],
    ]);
    expect(items[0]).toMatchObject({ reviewId: review.id, stageId: stage.id, stageName: 'Early prototype', reviewDecidedAt: review.decidedAt, note: '' });
    expect(items[1]).toMatchObject({ note: 'All twelve bolts re-torqued and marked.', updatedBy: { id: world.users.technician.id } });
    expect((await mine(world, 'engineer')).map((a) => a.title)).toEqual(['Update the restbus files']);
    expect(await mine(world, 'driver')).toEqual([]);
    const open = await request(t.app).get(`/api/gate-actions?programId=${world.program.id}&mine=true&status=open`).set(world.auth('technician'));
    expect((open.body as { items: GateAction[] }).items.map((a) => a.id)).toEqual([actions[2].id]);
  });

  it('when the owner closes an action with a note, then the note is kept with it and in its history, and the decided review stays as it was', async () => {
    const { world, review, actions } = await actionWorld();
    const [before] = (await t.sequelize.query(`SELECT to_jsonb(r) AS row FROM gate_reviews r WHERE id = $1`, { bind: [review.id] }))[0] as Array<{ row: unknown }>;

    const res = await move(world, 'technician', actions[0], { status: 'done', note: '  Torque sheet signed by the shift lead.  ' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'done', note: 'Torque sheet signed by the shift lead.', version: actions[0].version + 1, overdue: false });
    let current = res.body as GateAction;

    // The same status with a new note changes only the note; a status change without a note clears it.
    const noted = await move(world, 'technician', current, { status: 'done', note: 'Torque sheet signed; photo attached to the finding.' });
    expect(noted.body).toMatchObject({ status: 'done', note: 'Torque sheet signed; photo attached to the finding.', version: current.version + 1 });
    current = noted.body as GateAction;
    const unchanged = await move(world, 'technician', current, { status: 'done' });
    expect(unchanged.body).toMatchObject({ version: current.version });
    const reopened = await move(world, 'lead', current, { status: 'open' });
    expect(reopened.body).toMatchObject({ status: 'open', note: '', updatedBy: { id: world.users.lead.id } });

    expect((await historyOf(actions[0].id)).map((h) => [h.action, h.actor_id, h.after])).toEqual([
      ['created', world.users.lead.id, expect.objectContaining({ status: 'open' })],
      ['status-changed', world.users.technician.id, { status: 'done', note: 'Torque sheet signed by the shift lead.' }],
      ['note-changed', world.users.technician.id, { status: 'done', note: 'Torque sheet signed; photo attached to the finding.' }],
      ['status-changed', world.users.lead.id, { status: 'open', note: '' }],
    ]);
    // The review row itself never changed (its trigger refuses any change to a decided review).
    const [after] = (await t.sequelize.query(`SELECT to_jsonb(r) AS row FROM gate_reviews r WHERE id = $1`, { bind: [review.id] }))[0] as Array<{ row: unknown }>;
    expect(after.row).toEqual(before.row);
    const reread = (await request(t.app).get(`/api/gate-reviews/${review.id}`).set(world.auth('driver'))).body as GateReview;
    expect(reread).toMatchObject({ decision: 'conditional', version: review.version, decisionNotes: 'Go once the actions are closed.' });
    expect(reread.actions.find((a) => a.id === actions[0].id)).toMatchObject({ status: 'open', version: actions[0].version + 3 });
  });

  it('when anyone but the owner or a lead tries to close an action, then 403 and nothing changes', async () => {
    const { world, actions } = await actionWorld();
    const action = actions[0]; // the technician's
    for (const role of ['engineer', 'coordinator', 'driver', 'admin'] as const) {
      const res = await move(world, role, action, { status: 'done', note: 'Not mine to close.' });
      expect({ role, status: res.status }).toEqual({ role, status: 403 });
    }
    const denied = await move(world, 'engineer', action, { status: 'in-work' });
    expect(denied.body.error.code).toBe('gate/action-forbidden');
    expect((await historyOf(action.id)).map((h) => h.action)).toEqual(['created']);
    // The engineer closes their own; the lead closes anyone's.
    expect((await move(world, 'engineer', actions[1], { status: 'done' })).status).toBe(200);
    expect((await move(world, 'lead', action, { status: 'done', note: 'Checked at the line-up.' })).status).toBe(200);
  });

  it('when someone reaches into another program, then listing and closing its actions answer 404', async () => {
    const mineWorld = await actionWorld();
    const theirs = await actionWorld();
    for (const role of ['technician', 'lead'] as const) {
      const list = await request(t.app).get(`/api/gate-actions?programId=${theirs.world.program.id}&mine=true`).set(mineWorld.world.auth(role));
      expect({ role, status: list.status }).toEqual({ role, status: 404 });
      const close = await move(mineWorld.world, role, theirs.actions[0], { status: 'done', note: 'Closed from outside.' });
      expect({ role, status: close.status }).toEqual({ role, status: 404 });
    }
    const [row] = (await t.sequelize.query(`SELECT status, note FROM gate_actions WHERE id = $1`, { bind: [theirs.actions[0].id] }))[0] as Array<{ status: string; note: string }>;
    expect(row).toEqual({ status: 'open', note: '' });
  });

  it('when a note is too long or the body has unknown fields, then 400; a stale version answers 409 with the action as it is', async () => {
    const { world, actions } = await actionWorld();
    const long = await move(world, 'technician', actions[0], { status: 'done', note: 'x'.repeat(2001) });
    expect(long.status).toBe(400);
    expect(Object.keys(long.body.error.details.fields)).toEqual(['note']);
    expect((await move(world, 'technician', actions[0], { status: 'done', title: 'Renamed' })).status).toBe(400);
    expect((await move(world, 'technician', actions[0], { status: 'in-work' })).status).toBe(200);
    const stale = await move(world, 'technician', actions[0], { status: 'done' });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current).toMatchObject({ id: actions[0].id, status: 'in-work' });
  });

  it('when a lead names an administrator as an action owner, then 400: administrators own no actions', async () => {
    const world = await makeWorld(t);
    await muteWorld(t, world);
    const review = await openReview(t, world, world.stages[0].id);
    const res = await request(t.app)
      .post(`/api/gate-reviews/${review.id}/decision`)
      .set(world.auth('lead'))
      .send({ decision: 'conditional', actions: [{ title: 'Add the supplier to the program', ownerId: world.users.admin.id, dueDate: addDays(today(), 5) }] });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['actions.0.ownerId']);
  });
});
