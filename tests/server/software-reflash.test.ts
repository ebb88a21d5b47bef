import request from 'supertest';
import { ReflashListSchema, type ReflashList } from '../../shared/schemas/software';
import { makeSoftwareWorld, softwareAsset, type SoftwareWorld } from '../helpers/software';
import { makeTestApp, statementsOf, uid } from '../helpers/test-app';

// The reflash list "before a chosen date or test" (issue 5): which assets must be flashed, with
// what, before a day or a validation test, with the date each is needed by.

const t = makeTestApp();
afterAll(() => t.close());

const DAY = 24 * 3600_000;
const HOUR = 3600_000;
/** A UTC calendar day `days` from now, as YYYY-MM-DD. */
const dayFromNow = (days: number) => new Date(Date.now() + days * DAY).toISOString().slice(0, 10);

/** Versions that put assets 1, 2 and 3 on the list (FZC behind; BCM rule-broken; BCM not comparable and CAM missing). */
const MIX: Array<Record<string, string>> = [
  { FZC: '4.2.1', BCM: '3.2.0', INV: '2.3.0', CAM: 'CAM_SW_0412' },
  { FZC: '4.1.3', BCM: '3.2.0', INV: '2.3.0', CAM: 'CAM_SW_0412' },
  { FZC: '4.2.1', BCM: '3.0.4', INV: '2.4.0', CAM: 'CAM_SW_0412' },
  { FZC: '4.2.1', BCM: 'B07_RC2', INV: '2.3.0' },
  { FZC: '4.2.1', BCM: '3.2.0', INV: '2.3.0', CAM: 'CAM_SW_0412' },
];

async function fleet(world: SoftwareWorld, n: number) {
  const prefix = `R${uid().slice(0, 4)}`.toUpperCase();
  const assets = [];
  for (let i = 0; i < n; i += 1) assets.push(await softwareAsset(t, world, { tag: `${prefix}-${String(i).padStart(3, '0')}` }));
  const rows = assets.flatMap((a, i) => Object.entries(MIX[i % MIX.length]).map(([ecu, F189]) => ({ tag: a.tag, ecu, F189 })));
  const res = await request(t.app).post('/api/software/import/apply').set(world.auth('engineer')).send({ programId: world.program.id, rows });
  if (res.status !== 200) throw new Error(`import failed: ${res.status} ${JSON.stringify(res.body)}`);
  return assets;
}

const sql = (text: string, bind: unknown[]) => t.sequelize.query(text, { bind });

async function drive(world: SoftwareWorld, assetId: string, startsInHours: number, hours: number, status: 'planned' | 'checked-out' | 'cancelled' | 'returned') {
  await sql(
    `INSERT INTO assignments (program_id, asset_id, driver_id, starts_at, ends_at, purpose, status)
     VALUES ($1, $2, $3, $4, $5, 'durability-route', $6)`,
    [world.program.id, assetId, world.users.driver.id, new Date(Date.now() + startsInHours * HOUR), new Date(Date.now() + (startsInHours + hours) * HOUR), status],
  );
}

async function validationTest(world: SoftwareWorld, name: string): Promise<string> {
  const [rows] = (await sql(
    `INSERT INTO validation_tests (program_id, stage_id, name, reliability, confidence, required_samples)
     VALUES ($1, $2, $3, 0.9, 0.9, 22) RETURNING id`,
    [world.program.id, world.stage.id, name],
  )) as [Array<{ id: string }>, unknown];
  return rows[0].id;
}

async function allocate(world: SoftwareWorld, testId: string, assetId: string, status: 'planned' | 'running' | 'passed' | 'failed') {
  await sql(`INSERT INTO test_allocations (program_id, test_id, asset_id, status) VALUES ($1, $2, $3, $4)`, [world.program.id, testId, assetId, status]);
}

async function campaign(world: SoftwareWorld, assetId: string, name: string, startedHoursAgo: number, planned: number, done: number) {
  const [rows] = (await sql(
    `INSERT INTO campaigns (program_id, asset_id, name, kind, started_at) VALUES ($1, $2, $3, 'climate', $4) RETURNING id`,
    [world.program.id, assetId, name, new Date(Date.now() - startedHoursAgo * HOUR)],
  )) as [Array<{ id: string }>, unknown];
  await sql(`INSERT INTO campaign_steps (campaign_id, position, name, duration_hours, done_hours) VALUES ($1, 0, 'Soak', $2, $3)`, [rows[0].id, planned, done]);
}

async function gateDate(world: SoftwareWorld, date: string) {
  await sql(`INSERT INTO gate_target_dates (stage_id, program_id, target_date) VALUES ($1, $2, $3)`, [world.stage.id, world.program.id, date]);
}

/**
 * Five vehicles, three of them to flash: [1] has a drive booked in two days; [2] a climate
 * campaign under way and a running allocation on the test; [3] a planned allocation on the test
 * (its stage's gate is in ten days), a cancelled drive tomorrow and a finished campaign. [1] passed the test.
 */
async function plannedWorld() {
  const world = await makeSoftwareWorld(t);
  const assets = await fleet(world, 5);
  const testId = await validationTest(world, `Thermal shock ${uid()}`);
  await drive(world, assets[1].id, 48, 6, 'planned');
  await campaign(world, assets[2].id, 'Humid soak', 24, 100, 30);
  await allocate(world, testId, assets[1].id, 'passed');
  await allocate(world, testId, assets[2].id, 'running');
  await allocate(world, testId, assets[3].id, 'planned');
  await drive(world, assets[3].id, 24, 4, 'cancelled');
  await campaign(world, assets[3].id, 'Finished soak', 48, 10, 10);
  await gateDate(world, dayFromNow(10));
  return { world, assets, testId };
}

async function reflash(world: SoftwareWorld, query: string): Promise<ReflashList> {
  const res = await request(t.app).get(`/api/software/reflash?programId=${world.program.id}${query}`).set(world.auth('driver'));
  expect(res.status).toBe(200);
  return ReflashListSchema.parse(res.body);
}

describe('the reflash list before a chosen date or test', () => {
  it('when read without a filter, then every entry says by when it is needed and for what, the earliest first', async () => {
    const { world, assets, testId } = await plannedWorld();
    const list = await reflash(world, '');
    expect(list.before).toBeNull();
    expect(list.test).toBeNull();
    expect(list.items.map((i) => [i.tag, i.ecuCode])).toEqual([
      [assets[2].tag, 'BCM'],
      [assets[1].tag, 'FZC'],
      [assets[3].tag, 'BCM'],
      [assets[3].tag, 'CAM'],
    ]);
    const [two, one, three] = list.items;
    expect(two.neededFor).toMatchObject({ kind: 'campaign', name: 'Humid soak', underWay: true, testId: null });
    expect(one.neededFor).toMatchObject({ kind: 'drive', name: 'durability-route', underWay: false });
    expect(new Date(one.neededBy!).getTime()).toBeGreaterThan(Date.now() + 47 * HOUR);
    // The planned test and the gate both fall on the gate's target date; the gate comes first.
    expect(three.neededFor).toMatchObject({ kind: 'gate', underWay: false });
    expect(three.neededBy).toBe(`${dayFromNow(10)}T00:00:00.000Z`);
    expect(testId).toBeTruthy();
  });

  it('when filtered by a date, then only assets with a use starting by the end of that day stay, cancelled drives and finished campaigns do not count', async () => {
    const { world, assets } = await plannedWorld();
    const soon = await reflash(world, `&before=${dayFromNow(3)}`);
    expect(soon.before).toBe(dayFromNow(3));
    expect(soon.items.map((i) => [i.tag, i.ecuCode, i.neededFor?.kind])).toEqual([
      [assets[2].tag, 'BCM', 'campaign'],
      [assets[1].tag, 'FZC', 'drive'],
    ]);
    expect(soon.assets).toBe(2);
    const tomorrow = await reflash(world, `&before=${dayFromNow(1)}`);
    expect(tomorrow.items.map((i) => i.tag)).toEqual([assets[2].tag]);
    const later = await reflash(world, `&before=${dayFromNow(12)}`);
    expect(later.items.map((i) => i.tag)).toEqual([assets[2].tag, assets[1].tag, assets[3].tag, assets[3].tag]);
    expect(later.items[2].neededBy).toBe(`${dayFromNow(10)}T00:00:00.000Z`);
  });

  it('when filtered by a test, then only assets allocated to it and not passed stay, needed now when running or by the gate date', async () => {
    const { world, assets, testId } = await plannedWorld();
    const list = await reflash(world, `&testId=${testId}`);
    expect(list.test).toMatchObject({ id: testId, stageId: world.stage.id, stage: 'Integration car' });
    expect(list.items.map((i) => [i.tag, i.ecuCode])).toEqual([
      [assets[2].tag, 'BCM'],
      [assets[3].tag, 'BCM'],
      [assets[3].tag, 'CAM'],
    ]);
    expect(list.items[0].neededFor).toMatchObject({ kind: 'test', testId, underWay: true });
    expect(list.items[1].neededFor).toMatchObject({ kind: 'test', testId, underWay: false });
    expect(list.items[1].neededBy).toBe(`${dayFromNow(10)}T00:00:00.000Z`);
    const both = await reflash(world, `&testId=${testId}&before=${dayFromNow(3)}`);
    expect(both.items.map((i) => i.tag)).toEqual([assets[2].tag]);
  });

  it('when a test has no gate date on its stage, then its planned assets stay on the test filter without a date and leave the date filter', async () => {
    const world = await makeSoftwareWorld(t);
    const assets = await fleet(world, 2);
    const testId = await validationTest(world, `Cold start ${uid()}`);
    await allocate(world, testId, assets[1].id, 'failed');
    const list = await reflash(world, `&testId=${testId}`);
    expect(list.items.map((i) => [i.tag, i.neededBy, i.neededFor?.kind])).toEqual([[assets[1].tag, null, 'test']]);
    expect((await reflash(world, `&before=${dayFromNow(30)}`)).items).toEqual([]);
  });

  it('when exported as CSV with a filter, then the same entries with their needed-by date and use, and the filter in the file name', async () => {
    const { world, assets } = await plannedWorld();
    const res = await request(t.app).get(`/api/software/reflash.csv?programId=${world.program.id}&before=${dayFromNow(3)}`).set(world.auth('coordinator'));
    expect(res.status).toBe(200);
    expect(res.headers['content-disposition']).toMatch(new RegExp(`filename="reflash-T[0-9A-F]+-\\d{4}-\\d{2}-\\d{2}-before-${dayFromNow(3)}\\.csv"`));
    const lines = res.text.trim().split('\r\n');
    expect(lines[0].split(',').slice(-2)).toEqual(['needed_by', 'needed_for']);
    expect(lines).toHaveLength(3);
    expect(lines[1]).toMatch(new RegExp(`^${assets[2].tag},.*,\\d{4}-\\d{2}-\\d{2}T[\\d:.]+Z,Campaign: Humid soak \\(under way\\)$`));
    expect(lines[2]).toMatch(new RegExp(`^${assets[1].tag},.*,Drive: Durability route$`));
  });

  it('when the date is not a date or the test is of another program, then 400 naming before, and 404', async () => {
    const { world } = await plannedWorld();
    const bad = await request(t.app).get(`/api/software/reflash?programId=${world.program.id}&before=next-week`).set(world.auth('driver'));
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.details.fields)).toEqual(['before']);
    const other = await makeSoftwareWorld(t);
    const theirTest = await validationTest(other, `Their test ${uid()}`);
    const foreign = await request(t.app).get(`/api/software/reflash?programId=${world.program.id}&testId=${theirTest}`).set(world.auth('driver'));
    expect(foreign.status).toBe(404);
    const csv = await request(t.app).get(`/api/software/reflash.csv?programId=${world.program.id}&testId=${theirTest}`).set(world.auth('driver'));
    expect(csv.status).toBe(404);
  });

  it('when filtered for 5 and for 30 assets with planned uses, then the same number of SQL statements (no query per asset)', async () => {
    const small = await plannedWorld();
    const large = await makeSoftwareWorld(t);
    const many = await fleet(large, 30);
    const largeTest = await validationTest(large, `Vibration ${uid()}`);
    for (const [i, a] of many.entries()) {
      await drive(large, a.id, 30 + i * 8, 6, 'planned');
      await allocate(large, largeTest, a.id, i % 2 ? 'planned' : 'running');
    }
    await gateDate(large, dayFromNow(10));
    for (const query of [`before=${dayFromNow(3)}`, '']) {
      const a = await statementsOf(t, () => request(t.app).get(`/api/software/reflash?programId=${small.world.program.id}&${query}`).set(small.world.auth('lead')));
      const b = await statementsOf(t, () => request(t.app).get(`/api/software/reflash?programId=${large.program.id}&${query}`).set(large.auth('lead')));
      expect({ query, small: a, large: b }).toEqual({ query, small: a, large: a });
    }
    const a = await statementsOf(t, () =>
      request(t.app).get(`/api/software/reflash?programId=${small.world.program.id}&testId=${small.testId}&before=${dayFromNow(3)}`).set(small.world.auth('lead')),
    );
    const b = await statementsOf(t, () =>
      request(t.app).get(`/api/software/reflash?programId=${large.program.id}&testId=${largeTest}&before=${dayFromNow(3)}`).set(large.auth('lead')),
    );
    expect(b).toBe(a);
  });
});

describe('recording a flash with its identification (issue 5)', () => {
  it('when a flash is recorded with hardware number, serial and an earlier time, then the record and its history keep them; empty ones keep what was read', async () => {
    const world = await makeSoftwareWorld(t);
    const asset = await softwareAsset(t, world);
    const at = new Date(Date.now() - 3 * HOUR).toISOString();
    const first = await request(t.app)
      .put(`/api/assets/${asset.id}/software/${world.ecus.FZC.id}`)
      .set(world.auth('technician'))
      .send({ softwareVersion: '4.1.3', softwareNumber: 'SW-413', hardwareNumber: 'HW-77', ecuSerial: 'FZC-0001', flashedAt: at });
    expect(first.status).toBe(200);
    const fzc = (body: { ecus: Array<{ ecu: { code: string } }> }) => body.ecus.find((e) => e.ecu.code === 'FZC') as unknown as {
      installed: Record<string, unknown>;
      history: Array<Record<string, unknown>>;
    };
    expect(fzc(first.body).installed).toMatchObject({ softwareVersion: '4.1.3', softwareNumber: 'SW-413', hardwareNumber: 'HW-77', ecuSerial: 'FZC-0001', flashedAt: at, source: 'manual' });
    const second = await request(t.app)
      .post('/api/software/reflash/done')
      .set(world.auth('engineer'))
      .send({ assetId: asset.id, ecuId: world.ecus.FZC.id, version: '4.2.1', recordVersion: 0, softwareNumber: 'SW-421', flashedAt: new Date(Date.now() - HOUR).toISOString() });
    expect(second.status).toBe(200);
    expect(fzc(second.body).installed).toMatchObject({ softwareVersion: '4.2.1', softwareNumber: 'SW-421', hardwareNumber: 'HW-77', ecuSerial: 'FZC-0001', flashedBy: { id: world.users.engineer.id } });
    expect(fzc(second.body).history.map((h) => [h.softwareVersion, h.hardwareNumber, h.ecuSerial])).toEqual([
      ['4.2.1', 'HW-77', 'FZC-0001'],
      ['4.1.3', 'HW-77', 'FZC-0001'],
    ]);
  });

  it('when the reflash list is marked done with a flash time in the future, then 400 naming flashedAt and nothing is written', async () => {
    const world = await makeSoftwareWorld(t);
    const asset = await softwareAsset(t, world);
    const res = await request(t.app)
      .post('/api/software/reflash/done')
      .set(world.auth('technician'))
      .send({ assetId: asset.id, ecuId: world.ecus.FZC.id, version: '4.2.1', flashedAt: new Date(Date.now() + 2 * DAY).toISOString() });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['flashedAt']);
    const software = await request(t.app).get(`/api/assets/${asset.id}/software`).set(world.auth('driver'));
    expect(software.body.ecus.find((e: { ecu: { code: string } }) => e.ecu.code === 'FZC').installed).toBeNull();
  });
});

describe('deleting a draft baseline', () => {
  it('when an engineer deletes a draft, then it is gone; a released baseline answers 409; a technician 403', async () => {
    const world = await makeSoftwareWorld(t);
    const draft = await request(t.app)
      .post('/api/baselines')
      .set(world.auth('engineer'))
      .send({ programId: world.program.id, stageId: world.stage.id, name: `Next ${uid()}`, date: '2026-12-02', copyFromId: world.baseline.id });
    expect(draft.status).toBe(201);
    const refused = await request(t.app).delete(`/api/baselines/${draft.body.id}`).set(world.auth('technician'));
    expect(refused.status).toBe(403);
    const released = await request(t.app).delete(`/api/baselines/${world.baseline.id}`).set(world.auth('engineer'));
    expect(released.status).toBe(409);
    expect(released.body.error.code).toBe('baseline/read-only');
    const gone = await request(t.app).delete(`/api/baselines/${draft.body.id}`).set(world.auth('lead'));
    expect(gone.status).toBe(204);
    expect((await request(t.app).get(`/api/baselines/${draft.body.id}`).set(world.auth('driver'))).status).toBe(404);
  });
});
