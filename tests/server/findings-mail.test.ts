import request from 'supertest';
import { signToken } from '../../server/middleware/auth';
import { runOverdueDigest } from '../../server/services/finding-mail';
import { JOBS, nextDailyAt, registerJobs, runDueJobs, type Job } from '../../server/services/jobs';
import { fileFinding, makeFindingWorld, patchFinding, queuedMail, walk, type FindingWorld } from '../helpers/findings';
import { makeTestApp, makeUser, uid, waitForMail } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

const link = (id: string) => `${process.env.PUBLIC_URL}/findings/${id}`;

let world: FindingWorld;
beforeAll(async () => {
  world = await makeFindingWorld(t);
});

const setPrefs = (userId: string, prefs: object) =>
  t.sequelize.query(`UPDATE users SET email_prefs = $2::jsonb WHERE id = $1`, { bind: [userId, JSON.stringify(prefs)] });

describe('e-mail when a finding is assigned', () => {
  it('when a finding is filed with an owner, then the owner gets an e-mail with the finding and a link back to it', async () => {
    const finding = await fileFinding(t, world, { title: `Coolant weep ${uid()}`, ownerId: world.users.engineer.id, dueDate: undefined });
    const mail = await waitForMail(t.deps, world.users.engineer.email, finding.title);
    expect(mail.subject).toBe(`[${world.program.code}] Finding assigned to you: ${finding.title}`);
    expect(mail.text).toContain(`${world.users.technician.name} assigned this finding to you`);
    expect(mail.text).toContain(`Asset: ${world.asset.tag} · Severity: Major · Status: Open`);
    expect(mail.text).toContain(link(finding.id));
    expect(await queuedMail(t, world.users.technician.email, 'finding-assigned')).toEqual([]);
  });

  it('when a safety finding is assigned, then the e-mail carries the caution', async () => {
    const finding = await fileFinding(t, world, { title: `HVIL open ${uid()}`, severity: 'safety', ownerId: world.users.engineer.id });
    const mail = await waitForMail(t.deps, world.users.engineer.email, finding.title);
    expect(mail.text).toContain('Do not drive or power it until the finding is resolved');
  });

  it('when the owner changes, then the new owner gets an e-mail; assigning oneself sends none', async () => {
    const finding = await fileFinding(t, world, { title: `Reassigned ${uid()}` });
    const moved = await patchFinding(t, world, finding, { ownerId: world.users.lead.id }, 'engineer');
    expect(moved.status).toBe(200);
    await waitForMail(t.deps, world.users.lead.email, finding.title);
    const self = await fileFinding(t, world, { title: `Self ${uid()}`, ownerId: world.users.technician.id });
    expect((await queuedMail(t, world.users.technician.email)).filter((m) => m.subject.includes(self.title))).toEqual([]);
  });
});

describe('e-mail when a finding changes status', () => {
  it('when a finding is rejected, then the owner and the watchers get an e-mail with the reason and the link; the person who acted does not', async () => {
    const watcher = await makeUser({ role: 'driver', programIds: [world.program.id] });
    const finding = await fileFinding(t, world, {
      title: `Door seal pinch ${uid()}`,
      ownerId: world.users.technician.id,
      watcherIds: [watcher.id, world.users.lead.id],
    });
    await walk(t, world, finding, [['rejected', 'lead', 'Within the drawing tolerance.']]);
    for (const to of [world.users.technician.email, watcher.email]) {
      const mail = await waitForMail(t.deps, to, `Rejected: ${finding.title}`);
      expect(mail.text).toContain(`${world.users.lead.name} moved this finding from Open to Rejected.`);
      expect(mail.text).toContain('Reason: Within the drawing tolerance.');
      expect(mail.text).toContain(link(finding.id));
    }
    expect((await queuedMail(t, world.users.lead.email, 'finding-status')).filter((m) => m.subject.includes(finding.title))).toEqual([]);
  });
});

describe('turning e-mails off per kind', () => {
  it('when an owner turned assignment e-mails off, then none is queued, but status e-mails still come', async () => {
    const owner = await makeUser({ role: 'technician', programIds: [world.program.id] });
    await setPrefs(owner.id, { assigned: false, status: true, digest: true });
    const finding = await fileFinding(t, world, { title: `Muted assign ${uid()}`, ownerId: owner.id }, 'engineer');
    await walk(t, world, finding, [['in-work', 'engineer']]);
    await waitForMail(t.deps, owner.email, `In work: ${finding.title}`);
    expect(await queuedMail(t, owner.email, 'finding-assigned')).toEqual([]);
  });

  it('when a watcher turned status e-mails off, then the status change queues nothing for them', async () => {
    const watcher = await makeUser({ role: 'coordinator', programIds: [world.program.id] });
    await setPrefs(watcher.id, { status: false });
    const finding = await fileFinding(t, world, { title: `Muted status ${uid()}`, watcherIds: [watcher.id] });
    await walk(t, world, finding, [['in-work', 'engineer']]);
    expect(await queuedMail(t, watcher.email)).toEqual([]);
  });

  it('when a user turns a kind off through the API, then that kind stops', async () => {
    const owner = await makeUser({ role: 'technician', programIds: [world.program.id] });
    const put = await request(t.app)
      .put('/api/me/email-prefs')
      .set('Authorization', `Bearer ${signToken(t.deps, owner)}`)
      .send({ assigned: false, status: true, digest: true, fleet: true });
    expect(put.status).toBe(200);
    await fileFinding(t, world, { title: `API mute ${uid()}`, ownerId: owner.id }, 'engineer');
    expect(await queuedMail(t, owner.email)).toEqual([]);
  });
});

describe('the daily digest of overdue findings', () => {
  let digestWorld: FindingWorld;
  let late: { id: string; title: string };
  let lateOfEngineer: { id: string; title: string };
  const asOf = new Date();

  beforeAll(async () => {
    digestWorld = await makeFindingWorld(t);
    await setPrefs(digestWorld.users.coordinator.id, { digest: false });
    const file = (title: string, ownerId: string) => fileFinding(t, digestWorld, { title, ownerId, dueDate: undefined }, 'lead');
    late = await file(`Late chiller union ${uid()}`, digestWorld.users.technician.id);
    lateOfEngineer = await file(`Late CAN termination ${uid()}`, digestWorld.users.engineer.id);
    const muted = await file(`Late but muted ${uid()}`, digestWorld.users.coordinator.id);
    const notYet = await file(`Not yet due ${uid()}`, digestWorld.users.technician.id);
    const closed = await file(`Late but verified ${uid()}`, digestWorld.users.technician.id);
    await walk(t, digestWorld, closed, [['fixed', 'lead'], ['verified', 'lead']]);
    await t.sequelize.query(`UPDATE findings SET due_date = current_date - 4 WHERE id = ANY($1::uuid[])`, {
      bind: [[late.id, lateOfEngineer.id, muted.id, closed.id]],
    });
    await t.sequelize.query(`UPDATE findings SET due_date = current_date + 4 WHERE id = $1`, { bind: [notYet.id] });
  });

  it('when the digest runs, then each owner gets their overdue findings with links, and the lead gets the program', async () => {
    const result = await runOverdueDigest(t.deps, asOf, { programIds: [digestWorld.program.id] });
    expect(result).toEqual({ recipients: 3, findings: 3 });
    const tech = await waitForMail(t.deps, digestWorld.users.technician.email, 'overdue finding');
    expect(tech.subject).toMatch(/^Proofyard: 1 overdue finding \(\d{4}-\d{2}-\d{2}\)$/);
    expect(tech.text).toContain('Yours:');
    expect(tech.text).toContain(late.title);
    expect(tech.text).toContain('(4 days late)');
    expect(tech.text).toContain(link(late.id));
    expect(tech.text).not.toContain('Not yet due');
    expect(tech.text).not.toContain('Late but verified');

    const lead = await waitForMail(t.deps, digestWorld.users.lead.email, 'overdue finding');
    expect(lead.subject).toContain('3 overdue findings');
    expect(lead.text).toContain(`Others in ${digestWorld.program.code}:`);
    for (const f of [late, lateOfEngineer]) expect(lead.text).toContain(link(f.id));
    expect(lead.text).toContain('Late but muted');
  });

  it('when a person turned the digest off, then they get none', async () => {
    await runOverdueDigest(t.deps, asOf, { programIds: [digestWorld.program.id] });
    expect(await queuedMail(t, digestWorld.users.coordinator.email, 'finding-digest')).toEqual([]);
    expect((await queuedMail(t, digestWorld.users.engineer.email, 'finding-digest')).length).toBeGreaterThan(0);
  });

  it('when nothing is overdue, then no digest goes out', async () => {
    const quiet = await makeFindingWorld(t);
    await fileFinding(t, quiet, { ownerId: quiet.users.technician.id });
    expect(await runOverdueDigest(t.deps, asOf, { programIds: [quiet.program.id] })).toEqual({ recipients: 0, findings: 0 });
  });
});

describe('the job loop (a persisted schedule, one run per due time)', () => {
  const HOUR = 3600_000;
  const testJob = (runs: string[], fail = false): Job => ({
    name: `test-job-${uid()}`,
    next: (after) => new Date(after.getTime() + HOUR),
    run: async (deps, asOf, transaction) => {
      if (fail) {
        // Written inside the job's transaction, then thrown away with it.
        await deps.sequelize.query(`INSERT INTO scheduled_jobs (name, next_run_at) VALUES ($1, now())`, { bind: [`ghost-${uid()}`], transaction });
        throw new Error('job failed');
      }
      runs.push(asOf.toISOString());
    },
  });
  const row = async (name: string) =>
    (
      (await t.sequelize.query(`SELECT next_run_at, last_run_at, run_count, last_error FROM scheduled_jobs WHERE name = $1`, { bind: [name] })) as [
        Array<{ next_run_at: Date; last_run_at: Date | null; run_count: number; last_error: string | null }>,
        unknown,
      ]
    )[0][0];

  it('when a job is registered, then it first runs at its next time, once, and its next time is kept in the database', async () => {
    const runs: string[] = [];
    const job = testJob(runs);
    const start = new Date();
    await registerJobs(t.deps, [job], start);
    expect(await runDueJobs(t.deps, [job], start)).toEqual([]);
    const due = new Date(start.getTime() + HOUR + 1000);
    expect(await runDueJobs(t.deps, [job], due)).toEqual([job.name]);
    expect(await runDueJobs(t.deps, [job], due)).toEqual([]);
    expect(runs).toHaveLength(1);
    expect(await row(job.name)).toMatchObject({ run_count: 1, last_error: null, next_run_at: new Date(due.getTime() + HOUR) });
  });

  it('when the server restarts, then a second app sees the persisted schedule and registering again does not reset it', async () => {
    const runs: string[] = [];
    const job = testJob(runs);
    const start = new Date();
    await registerJobs(t.deps, [job], start);
    const second = makeTestApp();
    try {
      await registerJobs(second.deps, [job], new Date(start.getTime() + 10 * HOUR));
      expect((await row(job.name)).next_run_at).toEqual(new Date(start.getTime() + HOUR));
      expect(await runDueJobs(second.deps, [job], new Date(start.getTime() + 2 * HOUR))).toEqual([job.name]);
    } finally {
      await second.close();
    }
    expect(runs).toHaveLength(1);
  });

  it('when two instances look for due jobs at the same time, then the job runs once', async () => {
    const runs: string[] = [];
    const job = testJob(runs);
    const start = new Date();
    await registerJobs(t.deps, [job], start);
    const due = new Date(start.getTime() + 2 * HOUR);
    const results = await Promise.all([runDueJobs(t.deps, [job], due), runDueJobs(t.deps, [job], due), runDueJobs(t.deps, [job], due)]);
    expect(results.flat()).toEqual([job.name]);
    expect(runs).toHaveLength(1);
  });

  it('when a job fails, then what it wrote is rolled back, the error is kept and it is tried again later', async () => {
    const job = testJob([], true);
    const start = new Date();
    await registerJobs(t.deps, [job], start);
    const due = new Date(start.getTime() + 2 * HOUR);
    const logged: unknown[] = [];
    const ran = await runDueJobs({ ...t.deps, log: (e) => logged.push(e) }, [job], due);
    expect(ran).toEqual([]);
    expect(logged).toHaveLength(1);
    const after = await row(job.name);
    expect(after).toMatchObject({ run_count: 0, last_error: 'job failed' });
    expect(after.next_run_at.getTime()).toBe(due.getTime() + 5 * 60_000);
    const [ghosts] = (await t.sequelize.query(`SELECT 1 FROM scheduled_jobs WHERE name LIKE 'ghost-%'`)) as [unknown[], unknown];
    expect(ghosts).toHaveLength(0);
  });

  it('when the real jobs are read, then the overdue digest is scheduled daily at 06:00 UTC', () => {
    const digest = JOBS.find((j) => j.name === 'overdue-digest')!;
    expect(digest.next(new Date('2026-12-02T05:59:00Z')).toISOString()).toBe('2026-12-02T06:00:00.000Z');
    expect(digest.next(new Date('2026-12-02T06:00:00Z')).toISOString()).toBe('2026-12-03T06:00:00.000Z');
    expect(nextDailyAt(6)(new Date('2026-12-31T23:00:00Z')).toISOString()).toBe('2027-01-01T06:00:00.000Z');
  });
});
