import request from 'supertest';
import { ROLES } from '../../shared/schemas/auth';
import { linkToken, makeProgram, makeTestApp, makeUser, signInAs, uid, waitForMail } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

const adminRoutes = t.routes.filter((r) => r.path.startsWith('/api/admin'));
const fakeId = '00000000-0000-4000-8000-000000000000';
const concrete = (path: string) => path.replace(':id', fakeId);

let program: Awaited<ReturnType<typeof makeProgram>>;
let otherProgram: Awaited<ReturnType<typeof makeProgram>>;
let admin: Awaited<ReturnType<typeof makeUser>>;
let adminToken: string;
let otherAdminToken: string;
let outsider: Awaited<ReturnType<typeof makeUser>>;

beforeAll(async () => {
  program = await makeProgram('Scoped program');
  otherProgram = await makeProgram('Other program');
  admin = await makeUser({ role: 'admin', programIds: [program.id] });
  adminToken = await signInAs(t.app, admin.email);
  const otherAdmin = await makeUser({ role: 'admin', programIds: [otherProgram.id] });
  otherAdminToken = await signInAs(t.app, otherAdmin.email);
  outsider = await makeUser({ role: 'technician', programIds: [otherProgram.id] });
});

describe('role checks on every admin route (from the route table)', () => {
  it('when the table is read, then it has the admin routes', () => {
    expect(adminRoutes.length).toBeGreaterThanOrEqual(7);
  });

  it.each(ROLES.filter((r) => r !== 'admin'))('when a %s calls each admin route, then 403', async (role) => {
    const user = await makeUser({ role, programIds: [program.id] });
    const token = await signInAs(t.app, user.email);
    for (const route of adminRoutes) {
      const res = await request(t.app)[route.method](concrete(route.path)).set('Authorization', `Bearer ${token}`).send({});
      expect({ route: `${route.method} ${route.path}`, status: res.status }).toEqual({ route: `${route.method} ${route.path}`, status: 403 });
    }
  });

  it('when nobody is signed in, then each admin route answers 401', async () => {
    for (const route of adminRoutes) {
      const res = await request(t.app)[route.method](concrete(route.path)).send({});
      expect(res.status).toBe(401);
    }
  });
});

describe('program scoping', () => {
  it('when an admin lists users, then only members of the admin\'s programs appear', async () => {
    const res = await request(t.app).get('/api/admin/users').set('Authorization', `Bearer ${adminToken}`);
    expect(res.status).toBe(200);
    const ids = res.body.users.map((u: { id: string }) => u.id);
    expect(ids).toContain(admin.id);
    expect(ids).not.toContain(outsider.id);
  });

  it('when an admin touches a user or program of another program, then 404', async () => {
    const patch = await request(t.app)
      .patch(`/api/admin/users/${outsider.id}`)
      .set('Authorization', `Bearer ${adminToken}`)
      .send({ role: 'lead', version: outsider.version });
    expect(patch.status).toBe(404);
    const get = await request(t.app).get(`/api/admin/programs/${otherProgram.id}`).set('Authorization', `Bearer ${adminToken}`);
    expect(get.status).toBe(404);
    const members = await request(t.app)
      .put(`/api/admin/programs/${otherProgram.id}/members`)
      .set('Authorization', `Bearer ${adminToken}`)
      .send({ userIds: [admin.id] });
    expect(members.status).toBe(404);
  });

  it('when /api/me is read, then only the user\'s own programs are listed', async () => {
    const res = await request(t.app).get('/api/me').set('Authorization', `Bearer ${otherAdminToken}`);
    expect(res.body.programs.map((p: { id: string }) => p.id)).toEqual([otherProgram.id]);
  });
});

describe('invitations and password reset by e-mail', () => {
  it('when an admin invites a user, then the e-mailed link sets a password once, and the user signs in', async () => {
    const email = `invitee-${uid()}@test.example`;
    const res = await request(t.app)
      .post('/api/admin/users')
      .set('Authorization', `Bearer ${adminToken}`)
      .send({ email, name: 'New Colleague', role: 'driver', programIds: [program.id] });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ email, role: 'driver', invitedPending: true, programIds: [program.id] });

    const mail = await waitForMail(t.deps, email, 'invited');
    expect(mail.text).toContain(`${process.env.PUBLIC_URL}/set-password?token=`);
    const token = linkToken(mail.text);

    const set = await request(t.app).post('/api/auth/set-password').send({ token, password: 'a-new-long-password' });
    expect(set.status).toBe(200);
    expect(set.body.user).toMatchObject({ email, role: 'driver' });
    const again = await request(t.app).post('/api/auth/set-password').send({ token, password: 'another-long-password' });
    expect(again.status).toBe(400);
    expect(again.body.error.code).toBe('auth/link-invalid');
    expect(await signInAs(t.app, email, 'a-new-long-password')).toEqual(expect.any(String));
  });

  it('when a user asks for a reset, then the e-mailed link sets a new password and old sessions end', async () => {
    const user = await makeUser({ role: 'engineer', programIds: [program.id] });
    const oldToken = await signInAs(t.app, user.email);
    const ask = await request(t.app).post('/api/auth/forgot-password').send({ email: user.email });
    expect(ask.status).toBe(202);
    const mail = await waitForMail(t.deps, user.email, 'Reset');
    const set = await request(t.app).post('/api/auth/set-password').send({ token: linkToken(mail.text), password: 'brand-new-password-1' });
    expect(set.status).toBe(200);
    expect((await request(t.app).get('/api/me').set('Authorization', `Bearer ${oldToken}`)).status).toBe(401);
    expect(await signInAs(t.app, user.email, 'brand-new-password-1')).toEqual(expect.any(String));
  });

  it('when a reset is asked for an unknown address, then the answer is the same and no mail is queued', async () => {
    const res = await request(t.app).post('/api/auth/forgot-password').send({ email: `ghost-${uid()}@test.example` });
    expect(res.status).toBe(202);
  });

  it('when a link has expired, then it is refused', async () => {
    const email = `late-${uid()}@test.example`;
    await request(t.app)
      .post('/api/admin/users')
      .set('Authorization', `Bearer ${adminToken}`)
      .send({ email, name: 'Late Invitee', role: 'technician', programIds: [program.id] });
    const mail = await waitForMail(t.deps, email, 'invited');
    await t.sequelize.query(
      `UPDATE auth_links SET expires_at = now() - interval '1 minute' WHERE user_id = (SELECT id FROM users WHERE email = $1)`,
      { bind: [email] },
    );
    const res = await request(t.app).post('/api/auth/set-password').send({ token: linkToken(mail.text), password: 'too-late-password' });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/expired or was already used/);
  });
});

describe('user administration', () => {
  it('when an admin changes a role with the current version, then it is saved and written to the history', async () => {
    const user = await makeUser({ role: 'technician', programIds: [program.id] });
    const res = await request(t.app)
      .patch(`/api/admin/users/${user.id}`)
      .set('Authorization', `Bearer ${adminToken}`)
      .send({ role: 'engineer', version: user.version });
    expect(res.status).toBe(200);
    expect(res.body.role).toBe('engineer');
    const [rows] = (await t.sequelize.query(`SELECT action, before, after FROM history_entries WHERE entity_id = $1`, { bind: [user.id] })) as [
      Array<{ action: string; before: { role: string }; after: { role: string } }>,
      unknown,
    ];
    expect(rows).toEqual([expect.objectContaining({ action: 'updated', before: expect.objectContaining({ role: 'technician' }), after: expect.objectContaining({ role: 'engineer' }) })]);
  });

  it('when the version is stale, then 409 with the current record', async () => {
    const user = await makeUser({ role: 'technician', programIds: [program.id] });
    await request(t.app).patch(`/api/admin/users/${user.id}`).set('Authorization', `Bearer ${adminToken}`).send({ role: 'lead', version: user.version });
    const stale = await request(t.app)
      .patch(`/api/admin/users/${user.id}`)
      .set('Authorization', `Bearer ${adminToken}`)
      .send({ role: 'driver', version: user.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current.role).toBe('lead');
  });

  it('when an admin deactivates a user, then that user\'s session ends', async () => {
    const user = await makeUser({ role: 'driver', programIds: [program.id] });
    const token = await signInAs(t.app, user.email);
    const res = await request(t.app).patch(`/api/admin/users/${user.id}`).set('Authorization', `Bearer ${adminToken}`).send({ active: false, version: user.version });
    expect(res.status).toBe(200);
    expect((await request(t.app).get('/api/me').set('Authorization', `Bearer ${token}`)).status).toBe(401);
  });

  it('when the history is changed directly, then the database refuses it', async () => {
    await expect(t.sequelize.query('DELETE FROM history_entries')).rejects.toThrow(/append-only/);
  });

  it('when an admin creates a program and sets its members, then both show', async () => {
    const code = `P${uid().slice(0, 6).toUpperCase()}`;
    const created = await request(t.app).post('/api/admin/programs').set('Authorization', `Bearer ${adminToken}`).send({ code, name: 'Pilot line' });
    expect(created.status).toBe(201);
    const member = await makeUser({ role: 'lead', programIds: [program.id] });
    const set = await request(t.app)
      .put(`/api/admin/programs/${created.body.id}/members`)
      .set('Authorization', `Bearer ${adminToken}`)
      .send({ userIds: [admin.id, member.id] });
    expect(set.status).toBe(200);
    expect(set.body.members.map((m: { id: string }) => m.id).sort()).toEqual([admin.id, member.id].sort());
    const dup = await request(t.app).post('/api/admin/programs').set('Authorization', `Bearer ${adminToken}`).send({ code, name: 'Again' });
    expect(dup.status).toBe(409);
  });
});
