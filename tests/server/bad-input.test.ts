import request from 'supertest';
import { makeProgram, makeTestApp, makeUser, signInAs } from '../helpers/test-app';

const t = makeTestApp({ SIGNIN_MAX_FAILS_PER_CLIENT: '1000', SIGNIN_MAX_FAILS_PER_EMAIL: '1000' });
afterAll(() => t.close());

describe('bad input answers 400 with the field named, never 500', () => {
  it('when the JSON is malformed, then 400', async () => {
    const res = await request(t.app).post('/api/auth/sign-in').set('Content-Type', 'application/json').send('{"email": ');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('request/malformed-json');
  });

  it.each([
    ['a missing field', { email: 'a@test.example' }, 'password'],
    ['a wrong type', { email: 42, password: 'x' }, 'email'],
    ['an over-long string', { email: `${'a'.repeat(300)}@test.example`, password: 'x' }, 'email'],
    ['an unknown field', { email: 'a@test.example', password: 'x', admin: true }, 'admin'],
    ['not an object', ['a'], 'body'],
  ])('when sign-in gets %s, then 400 naming %#', async (_label, body, field) => {
    const res = await request(t.app).post('/api/auth/sign-in').send(body as object);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('request/invalid');
    expect(Object.keys(res.body.error.details.fields)).toContain(field);
    expect(res.body.error.message).toContain(field);
  });

  it('when an invitation has a bad role and no programs, then 400 naming both and nothing is written', async () => {
    const program = await makeProgram();
    const admin = await makeUser({ role: 'admin', programIds: [program.id] });
    const token = await signInAs(t.app, admin.email);
    const res = await request(t.app)
      .post('/api/admin/users')
      .set('Authorization', `Bearer ${token}`)
      .send({ email: 'bad-invite@test.example', name: 'X', role: 'pilot', programIds: [] });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields).sort()).toEqual(['programIds', 'role']);
    const [rows] = (await t.sequelize.query(`SELECT 1 FROM users WHERE email = 'bad-invite@test.example'`)) as [unknown[], unknown];
    expect(rows).toHaveLength(0);
  });

  it('when an id in the path is not a uuid, then 404 rather than 500', async () => {
    const program = await makeProgram();
    const admin = await makeUser({ role: 'admin', programIds: [program.id] });
    const token = await signInAs(t.app, admin.email);
    const res = await request(t.app).patch('/api/admin/users/not-a-uuid').set('Authorization', `Bearer ${token}`).send({ version: 0 });
    expect(res.status).toBe(404);
  });

  it('when an API route does not exist, then 404 in the one error shape', async () => {
    const res = await request(t.app).get('/api/nothing-here');
    expect(res.status).toBe(404);
    expect(res.body.error).toEqual(expect.objectContaining({ code: 'request/no-route', message: expect.any(String) }));
  });
});
