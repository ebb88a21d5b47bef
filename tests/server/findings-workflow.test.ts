import request from 'supertest';
import * as outbox from '../../server/services/outbox';
import type { Role } from '../../shared/schemas/auth';
import type { Finding, FindingStatus } from '../../shared/schemas/findings';
import { WORKING_ROLES } from '../helpers/assets';
import { fileFinding, historyOf, makeFindingWorld, muteFindingMail, patchFinding, walk, type FindingWorld } from '../helpers/findings';
import { makeTestApp, makeUser } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

let world: FindingWorld;
beforeAll(async () => {
  world = await makeFindingWorld(t);
  await muteFindingMail(t, world);
});

/** Who acts: the finding's owner is the technician; `member` is the driver (in the program, neither owner nor creator). */
type Actor = 'owner' | 'member' | 'coordinator' | 'engineer' | 'lead';
const ROLE_OF: Record<Actor, Role> = { owner: 'technician', member: 'driver', coordinator: 'coordinator', engineer: 'engineer', lead: 'lead' };

/** How an engineer brings a new finding to each status. */
const PATH_TO: Record<FindingStatus, Array<[string, Role, string?]>> = {
  open: [],
  'in-work': [['in-work', 'engineer']],
  fixed: [
    ['in-work', 'engineer'],
    ['fixed', 'engineer'],
  ],
  verified: [
    ['in-work', 'engineer'],
    ['fixed', 'engineer'],
    ['verified', 'engineer'],
  ],
  rejected: [['rejected', 'engineer', 'Duplicate of an earlier finding.']],
};

/** A finding owned by the technician, filed by the coordinator, brought to `status`. */
async function findingAt(status: FindingStatus): Promise<Finding> {
  const filed = await fileFinding(t, world, { ownerId: world.users.technician.id, title: `Workflow ${status}` }, 'coordinator');
  return walk(t, world, filed, PATH_TO[status]);
}

// PRODUCT.md section 3C and issue 4: the owner (or an engineer or lead) moves open -> in work ->
// fixed; only an engineer or lead verifies or rejects (reason required); reopening needs a reason.
const CASES: Array<[FindingStatus, FindingStatus, Actor, string | undefined, number]> = [
  ['open', 'in-work', 'owner', undefined, 200],
  ['open', 'in-work', 'engineer', undefined, 200],
  ['open', 'in-work', 'lead', undefined, 200],
  ['open', 'in-work', 'member', undefined, 403],
  ['open', 'in-work', 'coordinator', undefined, 403],
  ['open', 'fixed', 'owner', undefined, 200],
  ['in-work', 'fixed', 'owner', undefined, 200],
  ['in-work', 'fixed', 'lead', undefined, 200],
  ['in-work', 'fixed', 'member', undefined, 403],
  ['in-work', 'open', 'owner', undefined, 200],
  ['fixed', 'verified', 'engineer', undefined, 200],
  ['fixed', 'verified', 'lead', undefined, 200],
  ['fixed', 'verified', 'owner', undefined, 403],
  ['fixed', 'verified', 'member', undefined, 403],
  ['fixed', 'in-work', 'owner', undefined, 200],
  ['open', 'verified', 'engineer', undefined, 400],
  ['in-work', 'verified', 'lead', undefined, 400],
  ['open', 'rejected', 'engineer', 'Not a defect: within the drawing tolerance.', 200],
  ['in-work', 'rejected', 'owner', 'I do not think this is a problem.', 403],
  ['fixed', 'rejected', 'lead', 'Caused by the test fixture.', 200],
  ['open', 'rejected', 'lead', undefined, 400],
  ['rejected', 'open', 'member', 'Seen again on the drive.', 200],
  ['rejected', 'open', 'member', undefined, 400],
  ['verified', 'open', 'owner', 'Weep came back after the soak.', 200],
  ['verified', 'open', 'coordinator', undefined, 400],
  ['fixed', 'open', 'coordinator', 'Still leaking at the union.', 200],
  ['verified', 'in-work', 'engineer', undefined, 400],
  ['rejected', 'fixed', 'lead', undefined, 400],
];

const reasonRequired = (from: FindingStatus, to: FindingStatus) => to === 'rejected' || (to === 'open' && from !== 'in-work');

describe('the workflow by role (server-enforced)', () => {
  it.each(CASES)('when a finding is %s and a move to %s is asked by the %s with reason %p, then %i', async (from, to, actor, reason, expected) => {
    const finding = await findingAt(from);
    const before = await historyOf(t, finding.id);
    const res = await patchFinding(t, world, finding, { status: to, ...(reason ? { reason } : {}) }, ROLE_OF[actor]);
    expect(res.status).toBe(expected);
    const after = await historyOf(t, finding.id);
    if (expected === 200) {
      expect(res.body).toMatchObject({ status: to, version: finding.version + 1 });
      expect(after).toHaveLength(before.length + 1);
      expect(after[after.length - 1]).toMatchObject({ action: 'status-changed', before: { status: from }, after: { status: to }, note: reason ?? null });
    } else {
      expect(res.body.error.message).toEqual(expect.any(String));
      if (expected === 403) expect(res.body.error.code).toBe('finding/transition-forbidden');
      // A missing reason names `reason`; a move the workflow does not have names `status`.
      if (expected === 400) expect(Object.keys(res.body.error.details.fields)).toEqual([reasonRequired(from, to) && !reason ? 'reason' : 'status']);
      // Nothing half-written: the finding and its history are as they were.
      expect(after).toEqual(before);
      const current = await request(t.app).get(`/api/findings/${finding.id}`).set(world.auth('lead'));
      expect(current.body).toMatchObject({ status: from, version: finding.version });
    }
  });

  it('when a verifier is refused, then the 403 names who may do it', async () => {
    const finding = await findingAt('fixed');
    const res = await patchFinding(t, world, finding, { status: 'verified' }, 'technician');
    expect(res.status).toBe(403);
    expect(res.body.error.message).toBe('Only an engineer or a lead can verify a finding.');
  });

  it('when a reopen has no reason, then 400 naming reason', async () => {
    const finding = await findingAt('verified');
    const res = await patchFinding(t, world, finding, { status: 'open' }, 'engineer');
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields).toEqual({ reason: 'Say why the finding is reopened.' });
  });

  it('when a finding is rejected, then the reason is kept; when it is reopened, then the reason goes and the history keeps it', async () => {
    const finding = await findingAt('open');
    const rejected = await walk(t, world, finding, [['rejected', 'lead', 'Duplicate of the finding on the same union.']]);
    expect(rejected.rejectReason).toBe('Duplicate of the finding on the same union.');
    const reopened = await walk(t, world, rejected, [['open', 'driver', 'Not the same union: this one is on the chiller.']]);
    expect(reopened.rejectReason).toBeNull();
    const history = await historyOf(t, finding.id);
    expect(history.map((h) => [h.action, h.after?.status, h.note])).toEqual([
      ['created', 'open', null],
      ['status-changed', 'rejected', 'Duplicate of the finding on the same union.'],
      ['status-changed', 'open', 'Not the same union: this one is on the chiller.'],
    ]);
  });
});

describe('who files and edits', () => {
  it.each(WORKING_ROLES)('when the %s files a finding, then 201 with the finding, its id and version 0', async (role) => {
    const res = await request(t.app)
      .post('/api/findings')
      .set(world.auth(role))
      .send({ assetId: world.asset.id, title: `Filed by the ${role}`, severity: 'minor' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ id: expect.any(String), version: 0, status: 'open', createdBy: { id: world.users[role].id } });
  });

  it('when an administrator files or changes a finding, then 403 (admins set up users, they do not work findings)', async () => {
    const create = await request(t.app).post('/api/findings').set(world.auth('admin')).send({ assetId: world.asset.id, title: 'X', severity: 'minor' });
    expect(create.status).toBe(403);
    const finding = await fileFinding(t, world);
    expect((await patchFinding(t, world, finding, { title: 'Y' }, 'admin')).status).toBe(403);
  });

  it.each([
    ['the creator', 'coordinator', 200],
    ['the owner', 'technician', 200],
    ['an engineer', 'engineer', 200],
    ['a member who is neither', 'driver', 403],
  ] as const)('when %s (the %s) changes the title, then %i', async (_who, role, expected) => {
    const finding = await fileFinding(t, world, { ownerId: world.users.technician.id }, 'coordinator');
    const res = await patchFinding(t, world, finding, { title: 'Coolant weep at front chiller union' }, role);
    expect(res.status).toBe(expected);
    if (expected === 403) expect(res.body.error.code).toBe('finding/edit-forbidden');
  });

  it('when a technician lowers a safety finding, then 403 (it would clear the asset); an engineer may', async () => {
    const finding = await fileFinding(t, world, { severity: 'safety', ownerId: world.users.technician.id });
    const refused = await patchFinding(t, world, finding, { severity: 'major' }, 'technician');
    expect(refused.status).toBe(403);
    expect(refused.body.error.message).toMatch(/clear the asset/);
    const ok = await patchFinding(t, world, finding, { severity: 'major' }, 'engineer');
    expect(ok.status).toBe(200);
    expect(ok.body.severity).toBe('major');
  });

  it('when a member who may not edit adds themselves as a watcher, then 200; when they add someone else, then 403', async () => {
    const finding = await fileFinding(t, world);
    const self = await patchFinding(t, world, finding, { watcherIds: [world.users.driver.id] }, 'driver');
    expect(self.status).toBe(200);
    expect(self.body.watchers).toEqual([{ id: world.users.driver.id, name: world.users.driver.name }]);
    const other = await patchFinding(t, world, self.body, { watcherIds: [world.users.driver.id, world.users.coordinator.id] }, 'driver');
    expect(other.status).toBe(403);
  });
});

describe('history of every change', () => {
  it('when a finding is created, changed and commented, then each change is in its history with who, before and after', async () => {
    const finding = await fileFinding(t, world, { severity: 'major', dueDate: undefined });
    const changed = await patchFinding(
      t,
      world,
      finding,
      { severity: 'blocking', ownerId: world.users.engineer.id, watcherIds: [world.users.lead.id] },
      'lead',
    );
    expect(changed.status).toBe(200);
    const comment = await request(t.app).post(`/api/findings/${finding.id}/comments`).set(world.auth('driver')).send({ body: 'Seen it too on the loop.' });
    expect(comment.status).toBe(201);
    const res = await request(t.app).get(`/api/findings/${finding.id}/history`).set(world.auth('technician'));
    expect(res.status).toBe(200);
    const entries = [...res.body.entries].reverse();
    expect(entries.map((e: { action: string }) => e.action)).toEqual(['created', 'updated', 'commented']);
    expect(entries[0]).toMatchObject({ actor: { id: world.users.technician.id }, after: { title: finding.title, severity: 'major', status: 'open' } });
    expect(entries[1]).toMatchObject({
      actor: { id: world.users.lead.id, name: world.users.lead.name },
      before: { severity: 'major', owner: null, watchers: [] },
      after: {
        severity: 'blocking',
        owner: { id: world.users.engineer.id, name: world.users.engineer.name },
        watchers: [{ id: world.users.lead.id, name: world.users.lead.name }],
      },
    });
    expect(Object.keys(entries[1].after).sort()).toEqual(['owner', 'severity', 'watchers']);
    expect(entries[2]).toMatchObject({ actor: { id: world.users.driver.id }, after: { commentId: comment.body.id, body: 'Seen it too on the loop.' } });
    // The asset's timeline shows the finding's entries too.
    const assetHistory = await request(t.app).get(`/api/assets/${world.asset.id}/history`).set(world.auth('technician'));
    expect(assetHistory.body.entries.filter((e: { entityId: string }) => e.entityId === finding.id)).toHaveLength(3);
  });

  it('when the change fails after its history entry was written (the outbox refuses), then neither the change nor the entry is kept', async () => {
    // An owner who wants e-mail, so the status change queues one.
    const owner = await makeUser({ role: 'technician', programIds: [world.program.id] });
    const finding = await fileFinding(t, world, { ownerId: owner.id }, 'engineer');
    const before = await historyOf(t, finding.id);
    const spy = jest.spyOn(outbox, 'enqueueMail').mockRejectedValueOnce(new Error('outbox unavailable'));
    try {
      const res = await patchFinding(t, world, finding, { status: 'in-work' }, 'engineer');
      expect(res.status).toBe(500);
      expect(spy).toHaveBeenCalled();
    } finally {
      spy.mockRestore();
    }
    expect(await historyOf(t, finding.id)).toEqual(before);
    const current = await request(t.app).get(`/api/findings/${finding.id}`).set(world.auth('lead'));
    expect(current.body).toMatchObject({ status: 'open', version: finding.version });
  });

  it('when a create fails on bad input, then no finding and no history entry are written', async () => {
    const title = `Never written ${Date.now()}`;
    const res = await request(t.app)
      .post('/api/findings')
      .set(world.auth('technician'))
      .send({ assetId: world.asset.id, title, severity: 'major', ownerId: world.users.admin.id });
    expect(res.status).toBe(400);
    const [rows] = (await t.sequelize.query(`SELECT count(*)::int AS n FROM history_entries WHERE after->>'title' = $1`, { bind: [title] })) as [
      Array<{ n: number }>,
      unknown,
    ];
    expect(rows[0].n).toBe(0);
  });
});

describe('optimistic locking', () => {
  it('when two updates carry the same version at the same time, then exactly one wins and the other gets 409 with the current record', async () => {
    const finding = await fileFinding(t, world, { ownerId: world.users.technician.id });
    const [a, b] = await Promise.all([
      patchFinding(t, world, finding, { title: 'Coolant weep, first edit' }, 'engineer'),
      patchFinding(t, world, finding, { status: 'in-work' }, 'lead'),
    ]);
    expect([a.status, b.status].sort()).toEqual([200, 409]);
    const [winner, loser] = a.status === 200 ? [a, b] : [b, a];
    expect(winner.body.version).toBe(finding.version + 1);
    expect(loser.body.error.code).toBe('request/conflict');
    expect(loser.body.error.details.current).toEqual(winner.body);
    const history = await historyOf(t, finding.id);
    expect(history.map((h) => h.action)).toHaveLength(2);
  });

  it('when an update carries a stale version, then 409 and nothing changes', async () => {
    const finding = await fileFinding(t, world);
    const first = await patchFinding(t, world, finding, { description: 'Damp ring at the union.' }, 'technician');
    expect(first.status).toBe(200);
    const stale = await patchFinding(t, world, finding, { description: 'Overwritten?' }, 'technician');
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current).toMatchObject({ description: 'Damp ring at the union.', version: finding.version + 1 });
  });

  it('when an update changes nothing, then 200 with the same version and no history entry', async () => {
    const finding = await fileFinding(t, world);
    const res = await patchFinding(t, world, finding, { title: finding.title, status: 'open' }, 'technician');
    expect(res.status).toBe(200);
    expect(res.body.version).toBe(finding.version);
    expect(await historyOf(t, finding.id)).toHaveLength(1);
  });
});
