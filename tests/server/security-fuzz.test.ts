import fc from 'fast-check';
import request from 'supertest';
import sharp from 'sharp';
import type { Role } from '../../shared/schemas/auth';
import type { GateReview } from '../../shared/schemas/readiness';
import type { RouteSpec } from '../../server/lib/routes';
import { createApp } from '../../server/app';
import { makeTestApp } from '../helpers/test-app';
import { createAsset } from '../helpers/assets';
import { booked, dayIn, inHours, muteMail, setProfile, type FleetWorld } from '../helpers/fleet';
import { dropGateMail, openReview } from '../helpers/readiness';
import { makeBaseline, makeSoftwareWorld, TARGETS, type SoftwareWorld } from '../helpers/software';
import { allocate, planTest, startCampaign } from '../helpers/validation';

/**
 * Property-based malformed input for every write route of the route table: 50 bodies per route
 * (fixed seed), sent as an allowed role of the home program to a home-program object. Each
 * answers 4xx (never 5xx), a 400 names a field, and nothing of the program is written.
 * DELETE routes take no body: their path id is fuzzed instead. Sign-in has its own throttle tests.
 */
const t = makeTestApp();
afterAll(() => t.close());

const RUNS = 50;
const SEED = 20261202;
const SKIPPED = new Set(['post /api/auth/sign-in']);

let home: SoftwareWorld;
const ids: Record<string, string> = {};

beforeAll(async () => {
  home = await makeSoftwareWorld(t);
  await muteMail(t, Object.values(home.users).map((u) => u.id));
  const asset = await createAsset(t, home);
  ids.asset = asset.id;
  ids.stage = home.stages[0].id;
  ids.program = home.program.id;
  ids.user = home.users.technician.id;
  const checklist = await request(t.app).get(`/api/assets/${asset.id}/checklist`).set(home.auth('lead'));
  ids.checklistItem = checklist.body.groups[0].items[0].id;
  const template = await request(t.app).get(`/api/stages/${ids.stage}/template`).set(home.auth('lead'));
  ids.templateItem = template.body.items[0].id;
  const finding = await request(t.app).post('/api/findings').set(home.auth('technician')).send({ assetId: asset.id, title: 'Loose trim clip', severity: 'minor' });
  ids.finding = finding.body.id;
  const jpeg = await sharp({ create: { width: 32, height: 24, channels: 3, background: '#777777' } }).jpeg().toBuffer();
  ids.photo = (await request(t.app).post(`/api/assets/${asset.id}/photos`).set(home.auth('technician')).attach('photo', jpeg, 'p.jpg')).body.id;
  ids.ecu = home.ecus.FZC.id;
  ids.baseline = (await makeBaseline(t, home, home.ecus, home.stages[1].id, TARGETS, false, 'Draft for the fuzz')).id;
  const vehicle = await createAsset(t, home, { stageId: home.stages[2].id, status: 'available', odometerKm: 1000 });
  ids.vehicle = vehicle.id;
  await setProfile(t, home, home.users.driver.id, { drivingLevel: 2, licenceExpiry: dayIn(900) });
  ids.driver = home.users.driver.id;
  ids.assignment = (await booked(t, { ...home, vehicles: [vehicle] } as FleetWorld)).id;
  const test = await planTest(t, home);
  ids.validationTest = test.id;
  ids.allocation = (await allocate(t, home, test.id, vehicle.id)).allocations[0].id;
  const campaign = await startCampaign(t, home, asset.id);
  ids.campaign = campaign.id;
  ids.campaignStep = campaign.steps[0].id;
  // An open review (to change and decide) and a decided one with an action.
  ids.openReview = (await openReview(t, home, home.stages[1].id)).id;
  const decided = await openReview(t, home, home.stages[0].id);
  const res = await request(t.app)
    .post(`/api/gate-reviews/${decided.id}/decision`)
    .set(home.auth('lead'))
    .send({ decision: 'conditional', actions: [{ title: 'Re-torque the subframe', ownerId: home.users.technician.id, dueDate: dayIn(14) }] });
  if (res.status !== 200) throw new Error(`decision failed: ${res.status} ${JSON.stringify(res.body)}`);
  ids.gateAction = (res.body as GateReview).actions[0].id;
  await dropGateMail(t, home);
  fingerprintSql = await buildFingerprintSql();
}, 120_000);

/** The home object each route's `:id` (and second parameter) names. */
const PATH_OBJECT: Array<[RegExp, string]> = [
  [/^\/api\/assets\/:id/, 'asset'],
  [/^\/api\/checklist-items\/:id/, 'checklistItem'],
  [/^\/api\/findings\/:id/, 'finding'],
  [/^\/api\/stages\/:id/, 'stage'],
  [/^\/api\/template-items\/:id/, 'templateItem'],
  [/^\/api\/admin\/users\/:id/, 'user'],
  [/^\/api\/admin\/programs\/:id/, 'program'],
  [/^\/api\/validation\/tests\/:id/, 'validationTest'],
  [/^\/api\/validation\/allocations\/:id/, 'allocation'],
  [/^\/api\/campaigns\/:id/, 'campaign'],
  [/^\/api\/ecus\/:id/, 'ecu'],
  [/^\/api\/baselines\/:id/, 'baseline'],
  [/^\/api\/drivers\/:id/, 'driver'],
  [/^\/api\/assignments\/:id/, 'assignment'],
  [/^\/api\/gate-reviews\/:id/, 'openReview'],
  [/^\/api\/gate-actions\/:id/, 'gateAction'],
];
const pathFor = (r: RouteSpec, id?: string) =>
  r.path
    .replace(':id', () => {
      if (id !== undefined) return id;
      const match = PATH_OBJECT.find(([re]) => re.test(r.path));
      if (!match) throw new Error(`${key(r)}: no home object for :id in the fuzz suite: add one`);
      return ids[match[1]];
    })
    .replace(':ecuId', () => ids.ecu);

const soon = () => ({ startsAt: inHours(72), endsAt: inHours(80) });

/**
 * A well-formed body per write route (types right; the values need not be accepted): the
 * generators below corrupt it so that it can no longer pass the route's schema.
 */
const TEMPLATE: Record<string, () => Record<string, unknown>> = {
  'post /api/auth/forgot-password': () => ({ email: 'someone@test.example' }),
  'post /api/auth/set-password': () => ({ token: 'a'.repeat(40), password: 'a-long-enough-password' }),
  'post /api/admin/users': () => ({ email: 'new@test.example', name: 'New person', role: 'technician', programIds: [ids.program] }),
  'patch /api/admin/users/:id': () => ({ role: 'lead', version: 0 }),
  'post /api/admin/programs': () => ({ code: 'FUZZ', name: 'Fuzz program' }),
  'put /api/admin/programs/:id/members': () => ({ userIds: [ids.user] }),
  'post /api/stages': () => ({ programId: ids.program, name: 'Fuzz stage' }),
  'post /api/stages/reorder': () => ({ programId: ids.program, stageIds: home.stages.map((s) => s.id) }),
  'patch /api/stages/:id': () => ({ name: 'Renamed', version: 0 }),
  'post /api/stages/:id/template/items': () => ({ system: 'body', title: 'Door seal check' }),
  'patch /api/template-items/:id': () => ({ title: 'Renamed', version: 0 }),
  'post /api/assets': () => ({ programId: ids.program, tag: 'FUZZ-1', kind: 'vehicle', stageId: ids.stage }),
  'patch /api/assets/:id': () => ({ notes: 'x', version: 0 }),
  'post /api/assets/:id/stage': () => ({ stageId: ids.stage, version: 0 }),
  'post /api/assets/:id/photos': () => ({}),
  'patch /api/checklist-items/:id': () => ({ state: 'passed', version: 0 }),
  'post /api/findings': () => ({ assetId: ids.asset, title: 'Fuzz finding', severity: 'minor' }),
  'patch /api/findings/:id': () => ({ title: 'Renamed', version: 0 }),
  'post /api/findings/:id/comments': () => ({ body: 'A comment' }),
  'post /api/findings/:id/photos': () => ({}),
  'put /api/me/email-prefs': () => ({ assigned: false, status: false, digest: false, fleet: false }),
  'post /api/validation/tests': () => ({ stageId: ids.stage, name: 'Fuzz test', reliability: 0.9, confidence: 0.9 }),
  'patch /api/validation/tests/:id': () => ({ name: 'Renamed', version: 0 }),
  'post /api/validation/tests/:id/allocations': () => ({ assetId: ids.asset }),
  'patch /api/validation/allocations/:id': () => ({ status: 'running', version: 0 }),
  'post /api/validation/allocations/:id/report': () => ({}),
  'post /api/assets/:id/campaigns': () => ({ name: 'Fuzz campaign', kind: 'climate', steps: [{ name: 'Soak', durationHours: 2 }] }),
  'patch /api/campaigns/:id': () => ({ name: 'Renamed', version: 0 }),
  'post /api/campaigns/:id/progress': () => ({ stepId: ids.campaignStep, doneHours: 1 }),
  'post /api/campaigns/:id/log': () => ({ csv: 'step,hours\nSoak,1\n' }),
  'post /api/ecus': () => ({ programId: ids.program, code: 'FUZ', name: 'Fuzz ECU', assetKinds: ['vehicle'] }),
  'patch /api/ecus/:id': () => ({ name: 'Renamed', version: 0 }),
  'post /api/baselines': () => ({ programId: ids.program, stageId: ids.stage, name: 'Fuzz baseline', date: '2026-11-30' }),
  'patch /api/baselines/:id': () => ({ name: 'Renamed', version: 0 }),
  'post /api/baselines/:id/release': () => ({ version: 0 }),
  'put /api/assets/:id/software/:ecuId': () => ({ softwareVersion: '4.2.1' }),
  'post /api/software/import/preview': () => ({ programId: ids.program, rows: [{ tag: 'X-1', ecu: 'FZC', version: '4.2.1' }] }),
  'post /api/software/import/apply': () => ({ programId: ids.program, rows: [{ tag: 'X-1', ecu: 'FZC', version: '4.2.1' }] }),
  'post /api/software/reflash/done': () => ({ version: '4.2.1', assetId: ids.asset, ecuId: ids.ecu }),
  'put /api/drivers/:id': () => ({ drivingLevel: 1, hvAwareness: false, licenceExpiry: dayIn(400), version: 0 }),
  'post /api/assignments': () => ({ programId: ids.program, assetId: ids.vehicle, driverId: ids.driver, purpose: 'other', ...soon() }),
  'patch /api/assignments/:id': () => ({ notes: 'x', version: 0 }),
  'post /api/assignments/:id/cancel': () => ({ reason: 'x', version: 0 }),
  'post /api/assignments/:id/check-out': () => ({ odometerKm: 1200, chargePercent: 80 }),
  'post /api/assignments/:id/check-in': () => ({ odometerKm: 1300, chargePercent: 60 }),
  'post /api/fleet/proposals': () => ({ programId: ids.program, requests: [{ purpose: 'other', ...soon() }] }),
  'post /api/fleet/proposals/accept': () => ({ programId: ids.program, pairs: [{ assetId: ids.vehicle, driverId: ids.driver, purpose: 'other', ...soon() }] }),
  'post /api/calc/assignment': () => ({ costs: [[1, 2], [3, 4]] }),
  'put /api/stages/:id/target-date': () => ({ date: dayIn(60) }),
  'post /api/gate-reviews': () => ({ stageId: home.stages[2].id }),
  'patch /api/gate-reviews/:id': () => ({ notes: 'x', version: 0 }),
  'post /api/gate-reviews/:id/decision': () => ({ decision: 'go' }),
  'patch /api/gate-actions/:id': () => ({ status: 'done', version: 0 }),
};
/** String fields whose schema takes long text (an over-long value of them is not malformed). */
const LONG_TEXT = new Set(['csv']);
const OVERLONG = 'x'.repeat(20_001);

const key = (r: RouteSpec) => `${r.method} ${r.path}`;
const writeRoutes = t.routes.filter((r) => r.method !== 'get' && !SKIPPED.has(key(r)));
const roleFor = (r: RouteSpec): Role => (r.access === 'public' || r.access === 'user' || r.access.includes('lead') ? 'lead' : r.access[0]);

const smallObject = fc.dictionary(fc.string({ maxLength: 8 }), fc.oneof(fc.integer(), fc.string({ maxLength: 8 })), { maxKeys: 3 });
/** A value of another JSON type than `v` (never null: some fields take null). */
function wrongType(v: unknown): fc.Arbitrary<unknown> {
  if (typeof v === 'string') return fc.oneof(fc.integer(), fc.double({ noNaN: true }), fc.boolean(), fc.array(fc.string({ maxLength: 5 }), { maxLength: 3 }), smallObject);
  if (typeof v === 'number') return fc.oneof(fc.integer().map(String), fc.constant('NaN'), fc.boolean(), fc.array(fc.integer(), { maxLength: 3 }), smallObject);
  if (typeof v === 'boolean') return fc.oneof(fc.constantFrom('true', 'false', 'yes', ''), fc.integer({ min: 0, max: 1 }), smallObject);
  if (Array.isArray(v)) return fc.oneof(fc.string({ maxLength: 10 }), fc.integer(), smallObject.filter((o) => Object.keys(o).length > 0));
  return fc.oneof(fc.array(fc.anything(), { maxLength: 3 }), fc.string({ maxLength: 10 }), fc.integer());
}

/** Malformed bodies: non-objects, arrays of the body, wrong types with fields missing, over-long strings, unknown keys. */
function malformed(template: Record<string, unknown>): fc.Arbitrary<unknown> {
  const fields = Object.keys(template);
  const kinds: Array<fc.Arbitrary<unknown>> = [
    fc.oneof(fc.string({ maxLength: 20 }), fc.integer(), fc.boolean(), fc.constant(null), fc.array(fc.anything({ maxDepth: 2 }), { maxLength: 4 })),
    fc.constant([template]),
    // Unknown keys (every body schema is strict).
    fc.dictionary(fc.string({ minLength: 1, maxLength: 12 }).map((k) => `zz${k}`), fc.anything({ maxDepth: 2 }), { minKeys: 1, maxKeys: 4 }).map((extra) => ({ ...template, ...extra })),
    // Random objects: unknown keys, or nothing at all where fields are required.
    fc.object({ maxDepth: 2, maxKeys: 4 }).filter((o) => Object.keys(o).length > 0 || fields.length > 0),
  ];
  if (fields.length) {
    kinds.push(
      // One field of the wrong type (numbers as strings among them), others perhaps missing.
      fc
        .constantFrom(...fields)
        .chain((f) => fc.tuple(fc.constant(f), wrongType(template[f]), fc.subarray(fields.filter((x) => x !== f))))
        .map(([f, bad, drop]) => {
          const body: Record<string, unknown> = { ...template, [f]: bad };
          for (const d of drop) delete body[d];
          return body;
        }),
    );
    const strings = fields.filter((f) => typeof template[f] === 'string' && !LONG_TEXT.has(f));
    if (strings.length) kinds.push(fc.constantFrom(...strings).map((f) => ({ ...template, [f]: OVERLONG })));
  }
  return fc.oneof(...kinds);
}

/** Fuzzed path ids for DELETE routes: garbage, numbers, the nil UUID, random UUIDs. */
const badIds = fc.oneof(fc.string({ minLength: 1, maxLength: 60 }), fc.integer().map(String), fc.constant('00000000-0000-0000-0000-000000000000'), fc.uuid());

// ---- The fingerprint: row counts and the latest updated_at of every table, within the home program.
let fingerprintSql = '';
async function buildFingerprintSql(): Promise<string> {
  const [cols] = (await t.sequelize.query(
    `SELECT table_name AS t, column_name AS c FROM information_schema.columns WHERE table_schema = 'public'`,
  )) as [Array<{ t: string; c: string }>, unknown];
  const [fks] = (await t.sequelize.query(
    `SELECT c.conrelid::regclass::text AS t, a.attname AS c, c.confrelid::regclass::text AS ref
       FROM pg_constraint c JOIN pg_attribute a ON a.attrelid = c.conrelid AND a.attnum = c.conkey[1]
      WHERE c.contype = 'f' AND array_length(c.conkey, 1) = 1 AND c.connamespace = 'public'::regnamespace`,
  )) as [Array<{ t: string; c: string; ref: string }>, unknown];
  const columns = new Map<string, Set<string>>();
  for (const { t: table, c } of cols) columns.set(table, (columns.get(table) ?? new Set()).add(c));
  const tables = [...columns.keys()].filter((x) => !/sequelize/i.test(x));
  /** The predicate selecting a table's rows of the home program ($1). */
  const pred = new Map<string, string>([
    ['programs', 'id = $1'],
    ['users', 'id IN (SELECT user_id FROM program_members WHERE program_id = $1)'],
  ]);
  for (const table of tables) if (!pred.has(table) && columns.get(table)!.has('program_id')) pred.set(table, 'program_id = $1');
  for (let pass = 0; pass < 4; pass += 1) {
    for (const table of tables) {
      if (pred.has(table)) continue;
      const via = fks.filter((f) => f.t === table && f.ref !== table && pred.has(f.ref) && columns.get(f.ref)!.has('id'));
      if (via.length) pred.set(table, via.map((f) => `${f.c} IN (SELECT id FROM ${f.ref} WHERE ${pred.get(f.ref)})`).join(' OR '));
    }
  }
  if (columns.has('outbox_messages') && !pred.has('outbox_messages'))
    pred.set('outbox_messages', `to_address IN (SELECT email FROM users WHERE ${pred.get('users')})`);
  return [...pred.entries()]
    .map(([table, where]) => {
      const updated = columns.get(table)!.has('updated_at') ? 'max(updated_at)::text' : 'NULL::text';
      return `SELECT '${table}' AS t, count(*)::int AS n, ${updated} AS u FROM ${table} WHERE ${where}`;
    })
    .join(' UNION ALL ');
}
async function fingerprint(): Promise<Record<string, string>> {
  const [rows] = (await t.sequelize.query(fingerprintSql, { bind: [home.program.id] })) as [Array<{ t: string; n: number; u: string | null }>, unknown];
  return Object.fromEntries(rows.map((r) => [r.t, `${r.n} rows, last updated ${r.u}`]));
}

/** What is wrong with one answer to a malformed request, or null. */
function problem(res: request.Response): string | null {
  if (res.status < 400 || res.status >= 500) return `answered ${res.status}`;
  if (res.status !== 400) return null;
  const error = res.body?.error as { message?: string; details?: { fields?: Record<string, string> } } | undefined;
  const fields = Object.keys(error?.details?.fields ?? {});
  if (fields.length) return null;
  return /\b[a-z][A-Za-z]*(\.[\w]+)*: /.test(error?.message ?? '') ? null : `400 names no field: ${JSON.stringify(res.body)}`;
}

describe('malformed input on every write route', () => {
  it('when a write route has no template or home object, then the suite says so', () => {
    expect(writeRoutes.length).toBeGreaterThan(50);
    for (const r of writeRoutes) {
      if (r.method === 'delete') continue;
      expect({ route: key(r), template: key(r) in TEMPLATE }).toEqual({ route: key(r), template: true });
      if (r.path.includes(':')) expect(() => pathFor(r)).not.toThrow();
    }
  });

  it('when the fingerprint is taken, then it covers the main tables of a program', async () => {
    const covered = Object.keys(await fingerprint());
    const main = ['programs', 'users', 'program_members', 'stages', 'template_items', 'assets', 'checklist_items', 'findings', 'finding_comments', 'photos', 'history_entries', 'outbox_messages', 'ecus', 'baselines', 'installed_software', 'driver_profiles', 'assignments', 'validation_tests', 'test_allocations', 'campaigns', 'campaign_steps', 'gate_reviews', 'gate_actions', 'gate_target_dates'];
    expect(main.filter((x) => !covered.includes(x))).toEqual([]);
  });

  it.each(writeRoutes.map((r) => [key(r), r] as const))('when %s gets 50 malformed requests, then each answers 4xx naming the field and nothing is written', async (_label, r) => {
    const auth = home.auth(roleFor(r));
    const before = await fingerprint();
    const failures: string[] = [];
    if (r.method === 'delete') {
      for (const id of fc.sample(badIds, { numRuns: RUNS, seed: SEED })) {
        const res = await request(t.app).delete(pathFor(r, encodeURIComponent(id))).set(auth);
        const p = problem(res);
        if (p) failures.push(`id ${JSON.stringify(id)}: ${p}`);
      }
    } else {
      const path = pathFor(r);
      // The password-reset routes allow 20 requests per client per app: a fresh app (its own counters) every 15.
      const throttled = r.path.startsWith('/api/auth/');
      let app = t.app;
      for (const [i, body] of fc.sample(malformed(TEMPLATE[key(r)]()), { numRuns: RUNS, seed: SEED }).entries()) {
        if (throttled && i % 15 === 0) app = createApp(t.deps).app;
        const res = await request(app)[r.method](path).set(auth).set('Content-Type', 'application/json').send(JSON.stringify(body));
        const p = problem(res);
        if (p) failures.push(`${JSON.stringify(body).slice(0, 200)}: ${p}`);
      }
    }
    expect(failures).toEqual([]);
    expect(await fingerprint()).toEqual(before);
  });
});
