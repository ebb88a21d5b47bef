import request from 'supertest';
import { ReflashListSchema, SoftwareMatrixSchema, type SoftwareMatrix } from '../../shared/schemas/software';
import { demoSession, makeSoftwareWorld, softwareAsset, type SoftwareWorld } from '../helpers/software';
import { makeTestApp, statementsOf, uid } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

/** Versions per asset that give every status (targets: FZC 4.2.1, BCM 3.2.0, INV 2.3.0, CAM CAM_SW_0412; rule FZC >= 4.2.0 -> BCM >=3.1.0 <4). */
const MIX: Array<Record<string, string>> = [
  { FZC: '4.2.1', BCM: '3.2.0', INV: '2.3.0', CAM: 'CAM_SW_0412' }, // all on baseline
  { FZC: '4.1.3', BCM: '3.2.0', INV: '2.3.0', CAM: 'CAM_SW_0412' }, // FZC behind
  { FZC: '4.2.1', BCM: '3.0.4', INV: '2.4.0', CAM: 'CAM_SW_0412' }, // BCM rule-broken, INV ahead
  { FZC: '4.2.1', BCM: 'B07_RC2', INV: '2.3.0' }, // BCM not comparable, CAM missing
  { FZC: '4.2.1', BCM: '3.2.0', INV: '2.3.0', CAM: 'CAM_SW_0412' },
];

/** `n` vehicles on the baselined stage with the MIX in turn, flashed by one import. */
async function fleet(world: SoftwareWorld, n: number, prefix = `M${uid().slice(0, 4)}`.toUpperCase()) {
  const assets = [];
  for (let i = 0; i < n; i += 1) assets.push(await softwareAsset(t, world, { tag: `${prefix}-${String(i).padStart(3, '0')}` }));
  const rows = assets.flatMap((a, i) => Object.entries(MIX[i % MIX.length]).map(([ecu, F189]) => ({ tag: a.tag, ecu, F189 })));
  const res = await request(t.app).post('/api/software/import/apply').set(world.auth('engineer')).send({ programId: world.program.id, rows });
  if (res.status !== 200) throw new Error(`import failed: ${res.status} ${JSON.stringify(res.body)}`);
  return assets;
}

const matrix = async (world: SoftwareWorld, query: string): Promise<SoftwareMatrix> => {
  const res = await request(t.app).get(`/api/software/matrix?programId=${world.program.id}&${query}`).set(world.auth('driver'));
  expect(res.status).toBe(200);
  return SoftwareMatrixSchema.parse(res.body);
};

describe('the software matrix', () => {
  it('when the matrix is read, then assets run down, ECUs across, each cell with installed, target and status, and counts per status', async () => {
    const world = await makeSoftwareWorld(t);
    const assets = await fleet(world, 5);
    const body = await matrix(world, 'limit=50');
    expect(body.ecus.map((e) => e.code)).toEqual(['BCM', 'CAM', 'FZC', 'INV']);
    expect(body.rows.map((r) => r.tag)).toEqual(assets.map((a) => a.tag));
    const cell = (row: number, code: string) => body.rows[row].cells.find((c) => c.ecuId === world.ecus[code].id);
    expect(cell(1, 'FZC')).toEqual({ ecuId: world.ecus.FZC.id, installed: '4.1.3', target: '4.2.1', status: 'behind' });
    expect(cell(2, 'BCM')).toMatchObject({ installed: '3.0.4', status: 'rule-broken' });
    expect(cell(2, 'INV')).toMatchObject({ installed: '2.4.0', status: 'ahead' });
    expect(cell(3, 'BCM')).toMatchObject({ installed: 'B07_RC2', status: 'not-comparable' });
    expect(cell(3, 'CAM')).toMatchObject({ installed: null, target: 'CAM_SW_0412', status: 'missing' });
    expect(body.counts).toEqual({ 'on-baseline': 15, behind: 1, ahead: 1, missing: 1, 'not-comparable': 1, 'rule-broken': 1 });
    expect(body.rows[0].score).toEqual({ onBaseline: 4, expected: 4 });
    expect(body.rows[2].score).toEqual({ onBaseline: 3, expected: 4 });
    expect(body.baselines).toEqual([expect.objectContaining({ id: world.baseline.id, stageId: world.stage.id })]);
    expect(body.totalAssets).toBe(5);
  });

  it('when filtered by status and ECU, then only matching assets come back, counts leave the status filter out, and paging is stable', async () => {
    const world = await makeSoftwareWorld(t);
    const assets = await fleet(world, 12);
    const broken = await matrix(world, 'status=rule-broken');
    expect(broken.rows.map((r) => r.tag)).toEqual([assets[2].tag, assets[7].tag]);
    expect(broken.totalAssets).toBe(2);
    expect(broken.counts['on-baseline']).toBeGreaterThan(0);
    const bcm = await matrix(world, `ecuId=${world.ecus.BCM.id}&status=not-comparable`);
    expect(bcm.ecus.map((e) => e.code)).toEqual(['BCM']);
    expect(bcm.rows.map((r) => r.tag)).toEqual([assets[3].tag, assets[8].tag]);
    expect(bcm.rows.every((r) => r.cells.length === 1)).toBe(true);
    expect(bcm.counts).toMatchObject({ 'rule-broken': 2, 'not-comparable': 2, 'on-baseline': 8, missing: 0 });
    const pages: string[][] = [];
    let cursor: string | null = null;
    do {
      const page: SoftwareMatrix = await matrix(world, `status=on-baseline&limit=3${cursor ? `&cursor=${cursor}` : ''}`);
      pages.push(page.rows.map((r) => r.tag));
      cursor = page.nextCursor;
    } while (cursor && pages.length < 10);
    const all = pages.flat();
    expect(new Set(all).size).toBe(all.length);
    expect(all).toEqual((await matrix(world, 'status=on-baseline&limit=50')).rows.map((r) => r.tag));
    expect(pages.slice(0, -1).every((p) => p.length === 3)).toBe(true);
  });

  it('when the cursor is not one the server made, then 400 naming cursor', async () => {
    const world = await makeSoftwareWorld(t);
    const res = await request(t.app).get(`/api/software/matrix?programId=${world.program.id}&cursor=bm9wZQ`).set(world.auth('driver'));
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['cursor']);
  });

  it('when the matrix is read for 5 and for 30 assets, then it runs the same number of SQL statements (no query per asset)', async () => {
    const small = await makeSoftwareWorld(t);
    const large = await makeSoftwareWorld(t);
    await fleet(small, 5);
    await fleet(large, 30);
    for (const query of ['limit=200', 'status=behind', `ecuId=${small.ecus.FZC.id}`]) {
      const forLarge = query.replace(small.ecus.FZC.id, large.ecus.FZC.id);
      const a = await statementsOf(t, () => request(t.app).get(`/api/software/matrix?programId=${small.program.id}&${query}`).set(small.auth('lead')));
      const b = await statementsOf(t, () => request(t.app).get(`/api/software/matrix?programId=${large.program.id}&${forLarge}`).set(large.auth('lead')));
      expect({ query, small: a, large: b }).toEqual({ query, small: a, large: a });
      expect(a).toBeLessThanOrEqual(8);
    }
    const r5 = await statementsOf(t, () => request(t.app).get(`/api/software/reflash?programId=${small.program.id}`).set(small.auth('lead')));
    const r30 = await statementsOf(t, () => request(t.app).get(`/api/software/reflash?programId=${large.program.id}`).set(large.auth('lead')));
    expect(r30).toBe(r5);
  });
});

describe('the reflash list', () => {
  it('when read, then it lists behind, missing, rule-broken and not-comparable ECUs with the version to flash; marking one done records the flash', async () => {
    const world = await makeSoftwareWorld(t);
    const assets = await fleet(world, 5);
    const res = await request(t.app).get(`/api/software/reflash?programId=${world.program.id}&stageId=${world.stage.id}`).set(world.auth('driver'));
    expect(res.status).toBe(200);
    const list = ReflashListSchema.parse(res.body);
    expect(list.items.map((i) => [i.tag, i.ecuCode, i.status, i.flashTo])).toEqual([
      [assets[1].tag, 'FZC', 'behind', '4.2.1'],
      [assets[2].tag, 'BCM', 'rule-broken', '3.2.0'],
      [assets[3].tag, 'BCM', 'not-comparable', '3.2.0'],
      [assets[3].tag, 'CAM', 'missing', 'CAM_SW_0412'],
    ]);
    expect(list.assets).toBe(3);
    expect(list.items[1].reason).toMatch(/FZC is at 4\.2\.1 .* BCM must be within >=3\.1\.0 <4; it is at 3\.0\.4/);
    const entry = list.items[1];
    const done = await request(t.app)
      .post('/api/software/reflash/done')
      .set(world.auth('technician'))
      .send({ assetId: entry.assetId, ecuId: entry.ecuId, version: entry.flashTo, recordVersion: entry.recordVersion, ecuSerial: 'BCM-77' });
    expect(done.status).toBe(200);
    const bcm = done.body.ecus.find((e: { ecu: { code: string } }) => e.ecu.code === 'BCM');
    expect(bcm).toMatchObject({ status: 'on-baseline', installed: { softwareVersion: '3.2.0', ecuSerial: 'BCM-77', source: 'manual' } });
    expect(bcm.history[0].note).toBe('Flashed from the reflash list.');
    const after = await request(t.app).get(`/api/software/reflash?programId=${world.program.id}`).set(world.auth('driver'));
    expect(after.body.items).toHaveLength(3);
    const stale = await request(t.app)
      .post('/api/software/reflash/done')
      .set(world.auth('technician'))
      .send({ assetId: entry.assetId, ecuId: entry.ecuId, version: '3.2.0', recordVersion: entry.recordVersion });
    expect(stale.status).toBe(409);
  });

  it('when exported as CSV, then one line per entry with a header, and stages without a released baseline are named in the list', async () => {
    const world = await makeSoftwareWorld(t);
    const assets = await fleet(world, 4);
    const csv = await request(t.app).get(`/api/software/reflash.csv?programId=${world.program.id}`).set(world.auth('coordinator'));
    expect(csv.status).toBe(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    expect(csv.headers['content-disposition']).toMatch(/attachment; filename="reflash-T[0-9A-F]+-\d{4}-\d{2}-\d{2}\.csv"/);
    const lines = csv.text.trim().split('\r\n');
    expect(lines[0]).toBe('tag,vin,stage,location,ecu,ecu_name,installed,flash_to,status,reason,needed_by,needed_for');
    expect(lines).toHaveLength(5);
    expect(lines[1]).toMatch(new RegExp(`^${assets[1].tag},,Integration car,,FZC,FZC controller,4\\.1\\.3,4\\.2\\.1,behind,`));
    const list = await request(t.app).get(`/api/software/reflash?programId=${world.program.id}`).set(world.auth('driver'));
    expect(list.body.stagesWithoutBaseline.map((s: { name: string }) => s.name)).toEqual(['Bench', 'Early prototype', 'Validation build']);
  });

  it.each(['coordinator', 'driver'] as const)('when a %s marks an entry done, then 403', async (role) => {
    const world = await makeSoftwareWorld(t);
    const [asset] = await fleet(world, 2);
    const res = await request(t.app).post('/api/software/reflash/done').set(world.auth(role)).send({ assetId: asset.id, ecuId: world.ecus.FZC.id, version: '4.2.1' });
    expect(res.status).toBe(403);
  });
});

describe('the demo software (PRODUCT.md section 8)', () => {
  it('when the FW3 demo is read, then a dozen ECUs, two released baselines, one superseded, a draft, and every status on the matrix', async () => {
    const [row] = (await t.sequelize.query(
      `SELECT (SELECT count(*)::int FROM ecus e WHERE e.program_id = p.id) AS ecus,
              (SELECT count(*)::int FROM baselines b WHERE b.program_id = p.id AND b.status = 'released') AS released,
              (SELECT count(*)::int FROM baselines b WHERE b.program_id = p.id AND b.status = 'superseded') AS superseded,
              (SELECT count(*)::int FROM baselines b WHERE b.program_id = p.id AND b.status = 'draft') AS drafts,
              (SELECT count(*)::int FROM assets a WHERE a.program_id = p.id AND a.kind <> 'component'
                  AND NOT EXISTS (SELECT 1 FROM installed_software i WHERE i.asset_id = a.id)) AS without_software,
              (SELECT count(*)::int FROM software_flashes f WHERE f.program_id = p.id) AS flashes,
              (SELECT count(*)::int FROM installed_software i WHERE i.program_id = p.id) AS installed
         FROM programs p WHERE p.code = 'FW3'`,
    )) as [Array<Record<string, number>>, unknown];
    expect(row[0]).toMatchObject({ ecus: 12, released: 2, superseded: 1, drafts: 1, without_software: 0 });
    expect(row[0].flashes).toBeGreaterThan(row[0].installed);
    const demo = await demoSession(t, 'engineer@fenwater.example');
    const res = await request(t.app).get(`/api/software/matrix?programId=${demo.programId}&limit=200`).set(demo.auth);
    expect(res.status).toBe(200);
    const counts = SoftwareMatrixSchema.parse(res.body).counts;
    for (const status of ['on-baseline', 'behind', 'ahead', 'missing', 'not-comparable', 'rule-broken'] as const) expect({ status, n: counts[status] > 0 }).toEqual({ status, n: true });
    expect(counts['rule-broken']).toBeLessThanOrEqual(4);
    expect(counts['on-baseline']).toBeGreaterThan(counts.behind * 5);
  });
});
