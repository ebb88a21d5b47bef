import request from 'supertest';
import sharp from 'sharp';
import { ROLES, type Role } from '../../shared/schemas/auth';
import type { GateReview } from '../../shared/schemas/readiness';
import type { RouteSpec } from '../../server/lib/routes';
import { makeTestApp } from '../helpers/test-app';
import { createAsset, makeWorld, type World } from '../helpers/assets';
import { booked, dayIn, inHours, muteMail, setProfile, type FleetWorld } from '../helpers/fleet';
import { dropGateMail, openReview } from '../helpers/readiness';
import { makeBaseline, makeSoftwareWorld, TARGETS } from '../helpers/software';
import { allocate, planTest, startCampaign } from '../helpers/validation';

/**
 * The route x role x program matrix, generated from the server's own route table: a new route
 * that has no entry below fails this suite until someone decides how it is scoped.
 */
const t = makeTestApp({ SIGNIN_MAX_FAILS_PER_CLIENT: '1000', SIGNIN_MAX_FAILS_PER_EMAIL: '1000' });
afterAll(() => t.close());

/** The foreign objects (all in the "away" program), by the name OBJECT_FOR_PREFIX gives them. */
const foreignKeys = {
  asset: 1,
  checklistItem: 1,
  finding: 1,
  stage: 1,
  templateItem: 1,
  photo: 1,
  user: 1,
  program: 1,
  validationTest: 1,
  allocation: 1,
  campaign: 1,
  campaignStep: 1,
  ecu: 1,
  baseline: 1,
  otherBaseline: 1,
  driver: 1,
  assignment: 1,
  gateReview: 1,
  gateAction: 1,
};
type ForeignKey = keyof typeof foreignKeys;
let home: World;
let away: World;
const foreign = {} as Record<ForeignKey, string>;

beforeAll(async () => {
  home = await makeWorld(t);
  const software = await makeSoftwareWorld(t);
  away = software;
  await muteMail(t, [...Object.values(home.users), ...Object.values(away.users)].map((u) => u.id));

  const asset = await createAsset(t, away);
  foreign.asset = asset.id;
  foreign.stage = away.stages[0].id;
  foreign.program = away.program.id;
  foreign.user = away.users.technician.id;
  const checklist = await request(t.app).get(`/api/assets/${asset.id}/checklist`).set(away.auth('lead'));
  foreign.checklistItem = checklist.body.groups[0].items[0].id;
  const template = await request(t.app).get(`/api/stages/${foreign.stage}/template`).set(away.auth('lead'));
  foreign.templateItem = template.body.items[0].id;
  const finding = await request(t.app).post('/api/findings').set(away.auth('technician')).send({ assetId: asset.id, title: 'Loose trim clip', severity: 'minor' });
  foreign.finding = finding.body.id;
  const jpeg = await sharp({ create: { width: 32, height: 24, channels: 3, background: '#777777' } }).jpeg().toBuffer();
  const photo = await request(t.app).post(`/api/assets/${asset.id}/photos`).set(away.auth('technician')).attach('photo', jpeg, 'p.jpg');
  foreign.photo = photo.body.id;

  // Software: the ECUs and the released baseline of makeSoftwareWorld, and a draft to diff against.
  foreign.ecu = software.ecus.FZC.id;
  foreign.otherBaseline = software.baseline.id;
  foreign.baseline = (await makeBaseline(t, away, software.ecus, away.stages[1].id, TARGETS, false, 'Draft for the matrix')).id;

  // Fleet: a vehicle on the early-prototype stage, the driver's profile, one booking.
  const vehicle = await createAsset(t, away, { stageId: away.stages[2].id, status: 'available', odometerKm: 1000 });
  await setProfile(t, away, away.users.driver.id, { drivingLevel: 2, licenceExpiry: dayIn(900) });
  foreign.driver = away.users.driver.id;
  foreign.assignment = (await booked(t, { ...away, vehicles: [vehicle] } as FleetWorld)).id;

  // Validation: a planned test with the vehicle allocated, and a campaign on the asset.
  const test = await planTest(t, away);
  foreign.validationTest = test.id;
  foreign.allocation = (await allocate(t, away, test.id, vehicle.id)).allocations[0].id;
  const campaign = await startCampaign(t, away, asset.id);
  foreign.campaign = campaign.id;
  foreign.campaignStep = campaign.steps[0].id;

  // Readiness: a gate review decided "conditional" with one action (its mail dropped).
  const review = await openReview(t, away, away.stages[0].id);
  const decided = await request(t.app)
    .post(`/api/gate-reviews/${review.id}/decision`)
    .set(away.auth('lead'))
    .send({ decision: 'conditional', actions: [{ title: 'Re-torque the subframe', ownerId: away.users.technician.id, dueDate: dayIn(14) }] });
  if (decided.status !== 200) throw new Error(`decision failed: ${decided.status} ${JSON.stringify(decided.body)}`);
  foreign.gateReview = review.id;
  foreign.gateAction = (decided.body as GateReview).actions[0].id;
  await dropGateMail(t, away);

  for (const k of Object.keys(foreignKeys) as ForeignKey[]) if (!foreign[k]) throw new Error(`no foreign ${k}`);
}, 120_000);

/** Which foreign object an `:id` in each route prefix names. */
const OBJECT_FOR_PREFIX: Array<[RegExp, ForeignKey]> = [
  [/^\/api\/assets\/:id/, 'asset'],
  [/^\/api\/checklist-items\/:id/, 'checklistItem'],
  [/^\/api\/findings\/:id/, 'finding'],
  [/^\/api\/stages\/:id/, 'stage'],
  [/^\/api\/template-items\/:id/, 'templateItem'],
  [/^\/api\/photos\/:id/, 'photo'],
  [/^\/api\/admin\/users\/:id/, 'user'],
  [/^\/api\/admin\/programs\/:id/, 'program'],
  // The program's readiness roll-up and its member list (GET /api/programs/:id/members, open to any member).
  [/^\/api\/programs\/:id/, 'program'],
  [/^\/api\/validation\/tests\/:id/, 'validationTest'],
  [/^\/api\/validation\/allocations\/:id/, 'allocation'],
  [/^\/api\/campaigns\/:id/, 'campaign'],
  [/^\/api\/ecus\/:id/, 'ecu'],
  [/^\/api\/baselines\/:id/, 'baseline'],
  [/^\/api\/drivers\/:id/, 'driver'],
  [/^\/api\/assignments\/:id/, 'assignment'],
  [/^\/api\/gate-reviews\/:id/, 'gateReview'],
  [/^\/api\/gate-actions\/:id/, 'gateAction'],
];
/** Second path parameters and the foreign object each names. */
const OTHER_PARAMS: Record<string, ForeignKey> = { ':ecuId': 'ecu', ':otherId': 'otherBaseline' };

const soon = () => ({ startsAt: inHours(72), endsAt: inHours(80) });

/** Routes scoped by a programId (or another program's object) in the query or body, with a valid request naming the foreign one. */
const PROGRAM_SCOPED: Record<string, (p: string) => { query?: object; body?: object }> = {
  'get /api/assets': (p) => ({ query: { programId: p } }),
  'get /api/assets/export.csv': (p) => ({ query: { programId: p } }),
  'post /api/assets': (p) => ({ body: { programId: p, tag: 'X-FOREIGN-1', kind: 'vehicle', stageId: foreign.stage } }),
  'get /api/findings': (p) => ({ query: { programId: p } }),
  'post /api/findings': () => ({ body: { assetId: foreign.asset, title: 'Cross-program finding', severity: 'minor' } }),
  'get /api/stages': (p) => ({ query: { programId: p } }),
  'post /api/stages': (p) => ({ body: { programId: p, name: 'Foreign stage' } }),
  'post /api/stages/reorder': (p) => ({ body: { programId: p, stageIds: [foreign.stage] } }),
  'get /api/validation/tests': (p) => ({ query: { programId: p } }),
  'post /api/validation/tests': () => ({ body: { stageId: foreign.stage, name: 'Cross-program test', reliability: 0.9, confidence: 0.9 } }),
  'get /api/validation/campaigns': (p) => ({ query: { programId: p } }),
  'get /api/ecus': (p) => ({ query: { programId: p } }),
  'post /api/ecus': (p) => ({ body: { programId: p, code: 'XPG', name: 'Cross-program ECU', assetKinds: ['vehicle'] } }),
  'get /api/baselines': (p) => ({ query: { programId: p } }),
  'post /api/baselines': (p) => ({ body: { programId: p, stageId: foreign.stage, name: 'Cross-program baseline', date: '2026-11-30' } }),
  'post /api/software/import/preview': (p) => ({ body: { programId: p, rows: [{ tag: 'X-1', ecu: 'FZC', version: '4.2.1' }] } }),
  'post /api/software/import/apply': (p) => ({ body: { programId: p, rows: [{ tag: 'X-1', ecu: 'FZC', version: '4.2.1' }] } }),
  'get /api/software/matrix': (p) => ({ query: { programId: p } }),
  'get /api/software/reflash': (p) => ({ query: { programId: p } }),
  'get /api/software/reflash.csv': (p) => ({ query: { programId: p } }),
  'post /api/software/reflash/done': () => ({ body: { version: '4.2.1', assetId: foreign.asset, ecuId: foreign.ecu } }),
  'get /api/drivers': (p) => ({ query: { programId: p } }),
  'get /api/assignments': (p) => ({ query: { programId: p } }),
  'post /api/assignments': (p) => ({ body: { programId: p, assetId: foreign.asset, driverId: foreign.driver, purpose: 'other', ...soon() } }),
  'get /api/fleet/utilisation': (p) => ({ query: { programId: p, from: inHours(-24 * 7), to: inHours(0) } }),
  'post /api/fleet/proposals': (p) => ({ body: { programId: p, requests: [{ purpose: 'other', ...soon() }] } }),
  'post /api/fleet/proposals/accept': (p) => ({ body: { programId: p, pairs: [{ assetId: foreign.asset, driverId: foreign.driver, purpose: 'other', ...soon() }] } }),
  'get /api/gate-reviews': (p) => ({ query: { programId: p } }),
  'post /api/gate-reviews': () => ({ body: { stageId: foreign.stage } }),
  'get /api/gate-actions': (p) => ({ query: { programId: p } }),
};

/** Routes that hold no program's objects (the user's own data, calculators, sign-in, health). */
const UNSCOPED = new Set([
  'post /api/auth/sign-in',
  'post /api/auth/forgot-password',
  'post /api/auth/set-password',
  'get /api/me',
  'get /api/me/email-prefs',
  'put /api/me/email-prefs',
  'get /api/health',
  'get /api/dev/mail',
  'get /api/calc/vin/:vin',
  'get /api/calc/sample-size',
  'get /api/calc/demonstrated-reliability',
  'get /api/calc/dew-point',
  'get /api/calc/version-compare',
  'post /api/calc/assignment',
  'get /api/admin/users',
  'post /api/admin/users',
  'get /api/admin/programs',
  'post /api/admin/programs',
]);

/** Bodies that pass validation, so that the program check (not the parser) answers. */
const VALID_BODY: Record<string, () => object> = {
  'patch /api/assets/:id': () => ({ notes: 'x', version: 0 }),
  'post /api/assets/:id/stage': () => ({ stageId: foreign.stage, version: 0 }),
  'patch /api/checklist-items/:id': () => ({ state: 'passed', version: 0 }),
  'patch /api/findings/:id': () => ({ title: 'Renamed', version: 0 }),
  'post /api/findings/:id/comments': () => ({ body: 'A comment' }),
  'patch /api/stages/:id': () => ({ name: 'Renamed', version: 0 }),
  'post /api/stages/:id/template/items': () => ({ system: 'body', title: 'Door seal check' }),
  'patch /api/template-items/:id': () => ({ title: 'Renamed', version: 0 }),
  'patch /api/admin/users/:id': () => ({ role: 'lead', version: 0 }),
  'put /api/admin/programs/:id/members': () => ({ userIds: [] }),
  'patch /api/validation/tests/:id': () => ({ name: 'Renamed', version: 0 }),
  'post /api/validation/tests/:id/allocations': () => ({ assetId: foreign.asset }),
  'patch /api/validation/allocations/:id': () => ({ status: 'running', version: 0 }),
  'post /api/assets/:id/campaigns': () => ({ name: 'Cross-program campaign', kind: 'climate', steps: [{ name: 'Soak', durationHours: 2 }] }),
  'patch /api/campaigns/:id': () => ({ name: 'Renamed', version: 0 }),
  'post /api/campaigns/:id/progress': () => ({ stepId: foreign.campaignStep, doneHours: 1 }),
  'post /api/campaigns/:id/log': () => ({ csv: 'step,hours\nSoak,1\n' }),
  'patch /api/ecus/:id': () => ({ name: 'Renamed', version: 0 }),
  'patch /api/baselines/:id': () => ({ name: 'Renamed', version: 0 }),
  'post /api/baselines/:id/release': () => ({ version: 0 }),
  'put /api/assets/:id/software/:ecuId': () => ({ softwareVersion: '4.2.1' }),
  'put /api/drivers/:id': () => ({ drivingLevel: 1, hvAwareness: false, licenceExpiry: null, version: 0 }),
  'patch /api/assignments/:id': () => ({ notes: 'x', version: 0 }),
  'post /api/assignments/:id/cancel': () => ({ version: 0 }),
  'post /api/assignments/:id/check-out': () => ({ odometerKm: 1200, chargePercent: 80 }),
  'post /api/assignments/:id/check-in': () => ({ odometerKm: 1300, chargePercent: 60 }),
  'put /api/stages/:id/target-date': () => ({ date: null }),
  'patch /api/gate-reviews/:id': () => ({ notes: 'x', version: 0 }),
  'post /api/gate-reviews/:id/decision': () => ({ decision: 'go' }),
  'patch /api/gate-actions/:id': () => ({ status: 'done', version: 0 }),
};

const key = (r: RouteSpec) => `${r.method} ${r.path}`;
const allowed = (r: RouteSpec, role: Role) => r.access === 'public' || r.access === 'user' || (r.access as readonly Role[]).includes(role);
const concrete = (r: RouteSpec) =>
  r.path
    .replace(':vin', '1G4AH59H45G118341')
    .replace(/:id\b/, () => {
      const match = OBJECT_FOR_PREFIX.find(([re]) => re.test(r.path));
      if (!match) throw new Error(`${key(r)} has an :id with no foreign object in the security matrix: add one`);
      return foreign[match[1]];
    })
    .replace(/:[A-Za-z]+/g, (param) => {
      if (!(param in OTHER_PARAMS)) throw new Error(`${key(r)} has a parameter ${param} with no foreign object in the security matrix: add one`);
      return foreign[OTHER_PARAMS[param]];
    });

function send(r: RouteSpec, path: string, token: string | null, extra: { query?: object; body?: object } = {}) {
  let req = request(t.app)[r.method](path);
  if (token) req = req.set('Authorization', `Bearer ${token}`);
  if (extra.query) req = req.query(extra.query);
  if (r.method !== 'get' && r.method !== 'delete') req = req.send(extra.body ?? {});
  return req;
}

describe('the route table', () => {
  it('when every route is classified, then none escapes the matrix', () => {
    expect(t.routes.length).toBeGreaterThan(100);
    for (const r of t.routes) {
      const classified = UNSCOPED.has(key(r)) || key(r) in PROGRAM_SCOPED || OBJECT_FOR_PREFIX.some(([re]) => re.test(r.path));
      expect({ route: key(r), classified }).toEqual({ route: key(r), classified: true });
      expect(() => concrete(r)).not.toThrow();
    }
  });

  it('when the table lists entries no route has, then they are dropped (the lists stay honest)', () => {
    const keys = new Set(t.routes.map(key));
    const stale = [...UNSCOPED, ...Object.keys(PROGRAM_SCOPED), ...Object.keys(VALID_BODY)].filter((k) => !keys.has(k));
    expect(stale).toEqual([]);
  });
});

describe('every route x every role', () => {
  it.each([...ROLES])('when a %s calls every route, then the access rule holds and nothing answers 500', async (role) => {
    const token = home.tokens[role];
    for (const r of t.routes) {
      if (r.path === '/api/auth/sign-in') continue; // its throttling has its own tests
      const res = await send(r, concrete(r), token, { body: VALID_BODY[key(r)]?.() });
      const label = `${key(r)} as ${role}`;
      if (!allowed(r, role)) expect({ label, status: res.status }).toEqual({ label, status: 403 });
      else expect({ label, status: res.status < 500 && res.status !== 401 }).toEqual({ label, status: true });
    }
  });

  it('when nobody is signed in, then every non-public route answers 401', async () => {
    for (const r of t.routes.filter((x) => x.access !== 'public')) {
      const res = await send(r, concrete(r), null);
      expect({ route: key(r), status: res.status }).toEqual({ route: key(r), status: 401 });
    }
  });
});

describe('every object of another program answers 404', () => {
  it.each([...ROLES])("when a %s names another program's object or program, then 404", async (role) => {
    const token = home.tokens[role];
    for (const r of t.routes) {
      if (!allowed(r, role) || UNSCOPED.has(key(r))) continue;
      const scoped = PROGRAM_SCOPED[key(r)];
      const res = scoped ? await send(r, r.path, token, scoped(foreign.program)) : await send(r, concrete(r), token, { body: VALID_BODY[key(r)]?.() });
      const label = `${key(r)} as ${role}`;
      expect({ label, status: res.status, body: res.status === 404 ? undefined : res.body }).toEqual({ label, status: 404, body: undefined });
    }
  });
});
