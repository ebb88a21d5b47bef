import request from 'supertest';
import { withCheckDigit } from '../../shared/domain/vin';
import { ImportPreviewSchema, ImportResultSchema } from '../../shared/schemas/software';
import { demoSession, makeSoftwareWorld, softwareAsset, type SoftwareWorld } from '../helpers/software';
import { makeTestApp, uid } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

const vin = () => withCheckDigit(`0FWC3ED10TB${String(Math.floor(Math.random() * 1e6)).padStart(6, '0')}`);

async function installed(assetId: string) {
  const [rows] = (await t.sequelize.query(
    `SELECT e.code, i.software_version, i.software_number, i.ecu_serial, i.source FROM installed_software i JOIN ecus e ON e.id = i.ecu_id WHERE i.asset_id = $1 ORDER BY e.code`,
    { bind: [assetId] },
  )) as [Array<{ code: string; software_version: string; software_number: string; ecu_serial: string; source: string }>, unknown];
  return Object.fromEntries(rows.map((r) => [r.code, r.software_version]));
}

/** Two vehicles with VINs, one with FZC 4.2.1 (serial S-1) recorded already. */
async function setUp() {
  const world = await makeSoftwareWorld(t);
  const a = await softwareAsset(t, world, { tag: `IMP-A-${uid()}`, vin: vin() });
  const b = await softwareAsset(t, world, { tag: `IMP-B-${uid()}`, vin: vin() });
  await request(t.app).put(`/api/assets/${a.id}/software/${world.ecus.FZC.id}`).set(world.auth('technician')).send({ softwareVersion: '4.2.1', softwareNumber: 'FW3S-FZC-421', ecuSerial: 'S-1' });
  return { world, a, b };
}

const csvOf = (rows: string[][]) => rows.map((r) => r.join(',')).join('\r\n') + '\r\n';

describe('import of an ECU identification read-out (UDS identifiers, ISO 14229-1)', () => {
  it('when a CSV with F18x column names is previewed, then each row is change, unchanged or unknown with reasons, and nothing is written', async () => {
    const { world, a, b } = await setUp();
    const csv = csvOf([
      ['asset_tag', 'F190', 'ECU', 'F188', 'F189', 'F18C', 'F191'],
      [a.tag, a.vin!, 'FZC', 'FW3S-FZC-421', '4.2.1', 'S-1', ''], // unchanged
      [a.tag, a.vin!, 'BCM', 'FW3S-BCM-304', '3.0.4', 'S-2', 'HW-B'], // change, breaks the rule
      ['', b.vin!, 'fzc', 'FW3S-FZC-421', '4.2.1', 'S-3', 'HW-A'], // change, found by VIN
      [b.tag, a.vin!, 'INV', '', '2.3.0', '', ''], // VIN not matching the asset
      [`NOPE-${uid()}`, '', 'FZC', '', '4.2.1', '', ''], // unknown asset
      [b.tag, '', 'XYZ', '', '1.0.0', '', ''], // unknown ECU
    ]);
    const res = await request(t.app)
      .post('/api/software/import/preview')
      .set(world.auth('technician'))
      .field('programId', world.program.id)
      .attach('file', Buffer.from(csv), { filename: 'readout.csv', contentType: 'text/csv' });
    expect(res.status).toBe(200);
    const body = ImportPreviewSchema.parse(res.body);
    expect(body.rows.map((r) => r.outcome)).toEqual(['unchanged', 'change', 'change', 'unknown', 'unknown', 'unknown']);
    expect(body.summary).toEqual({ change: 2, unchanged: 1, unknown: 3, invalid: 0 });
    expect(body.columns).toMatchObject({ tag: 'asset_tag', vin: 'F190', ecu: 'ECU', softwareVersion: 'F189', softwareNumber: 'F188', ecuSerial: 'F18C', hardwareNumber: 'F191' });
    expect(body.rows[1]).toMatchObject({ tag: a.tag, ecuCode: 'BCM', before: null, after: { softwareVersion: '3.0.4', ecuSerial: 'S-2' }, status: 'rule-broken' });
    expect(body.rows[2]).toMatchObject({ assetId: b.id, tag: b.tag, status: 'on-baseline' });
    expect(body.rows[3].reasons[0]).toMatch(/does not match the VIN of/);
    expect(body.rows[4].reasons[0]).toMatch(/No asset NOPE-/);
    expect(body.rows[5].reasons[0]).toMatch(/No ECU with the code XYZ/);
    expect(await installed(a.id)).toEqual({ FZC: '4.2.1' });
    expect(await installed(b.id)).toEqual({});
  });

  it('when one row is unknown and skipInvalid is false, then apply answers 400 listing the row and nothing is applied', async () => {
    const { world, a, b } = await setUp();
    const rows = [
      { tag: a.tag, ecu: 'BCM', F189: '3.2.0' },
      { tag: b.tag, ecu: 'FZC', F189: '4.2.1' },
      { tag: b.tag, ecu: 'NOPE', F189: '1.0.0' },
    ];
    const res = await request(t.app).post('/api/software/import/apply').set(world.auth('engineer')).send({ programId: world.program.id, rows });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('import/invalid-rows');
    expect(res.body.error.message).toMatch(/Nothing was imported: 1 row cannot be \(row 3: No ECU with the code NOPE/);
    expect(res.body.error.details.rows.map((r: { row: number }) => r.row)).toEqual([3]);
    expect(await installed(a.id)).toEqual({ FZC: '4.2.1' });
    expect(await installed(b.id)).toEqual({});
  });

  it('when one row has a version over 64 characters, then it is invalid and nothing is applied; with skipInvalid the rest is applied in one go', async () => {
    const { world, a, b } = await setUp();
    const rows = [
      { asset: a.tag, ecu: 'BCM', software_version: '3.2.0', serial: 'S-9' },
      { asset: b.tag, ecu: 'FZC', software_version: `4.2.1-${'x'.repeat(60)}` },
      { asset: b.tag, ecu: 'INV', software_version: '2.3.0' },
    ];
    const refused = await request(t.app).post('/api/software/import/apply').set(world.auth('lead')).send({ programId: world.program.id, rows });
    expect(refused.status).toBe(400);
    expect(refused.body.error.details.rows[0]).toMatchObject({ row: 2, outcome: 'invalid', reasons: [expect.stringMatching(/at most 64 characters/)] });
    expect(await installed(b.id)).toEqual({});
    const applied = await request(t.app).post('/api/software/import/apply').set(world.auth('lead')).send({ programId: world.program.id, rows, skipInvalid: true });
    expect(applied.status).toBe(200);
    expect(ImportResultSchema.parse(applied.body)).toMatchObject({ applied: 2, skipped: 1, summary: { change: 2, invalid: 1 } });
    expect(await installed(a.id)).toEqual({ BCM: '3.2.0', FZC: '4.2.1' });
    expect(await installed(b.id)).toEqual({ INV: '2.3.0' });
    const software = await request(t.app).get(`/api/assets/${a.id}/software`).set(world.auth('driver'));
    const bcm = software.body.ecus.find((e: { ecu: { code: string } }) => e.ecu.code === 'BCM');
    expect(bcm.installed).toMatchObject({ source: 'import', ecuSerial: 'S-9', flashedBy: { id: world.users.lead.id } });
    expect(bcm.history[0].note).toMatch(/Imported from rows sent as JSON, row 1/);
  });

  it('when a JSON file holds one object per asset with its ecus, then it is read the same way and applied', async () => {
    const { world, a } = await setUp();
    const json = JSON.stringify({ rows: [{ asset_tag: a.tag, F190: a.vin, ecus: [{ ecu: 'FZC', F189: '4.2.2', F18C: 'S-1' }, { ecu: 'INV', F189: '2.3.0' }] }] });
    const res = await request(t.app)
      .post('/api/software/import/apply')
      .set(world.auth('technician'))
      .field('programId', world.program.id)
      .attach('file', Buffer.from(json), { filename: 'readout.json', contentType: 'application/json' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ applied: 2, skipped: 0 });
    expect(res.body.rows[0]).toMatchObject({ outcome: 'change', changes: ['softwareVersion', 'softwareNumber'], before: { softwareVersion: '4.2.1' }, after: { softwareVersion: '4.2.2', softwareNumber: '', ecuSerial: 'S-1' } });
    expect(await installed(a.id)).toEqual({ FZC: '4.2.2', INV: '2.3.0' });
  });

  it('when a spreadsheet export uses semicolons, a byte-order mark and headers like "F189 Software Version", then it is read the same', async () => {
    const { world, b } = await setUp();
    const csv = `\uFEFFAsset Tag;ECU Code;0xF189 ECU Software Version;DID F18C\r\n${b.tag};INV;2.3.0;S-7\r\n${b.tag};CAM;;S-8\r\n`;
    const res = await request(t.app)
      .post('/api/software/import/preview')
      .set(world.auth('technician'))
      .field('programId', world.program.id)
      .attach('file', Buffer.from(csv), { filename: 'export.csv', contentType: 'application/vnd.ms-excel' });
    expect(res.status).toBe(200);
    expect(res.body.columns).toEqual({ tag: 'Asset Tag', ecu: 'ECU Code', softwareVersion: '0xF189 ECU Software Version', ecuSerial: 'DID F18C' });
    expect(res.body.rows[0]).toMatchObject({ outcome: 'change', after: { softwareVersion: '2.3.0', ecuSerial: 'S-7' }, status: 'on-baseline' });
    expect(res.body.rows[1]).toMatchObject({ outcome: 'invalid', reasons: ['No software version (F189).'] });
  });

  it('when the same pair is read twice with different values, then the later row is invalid', async () => {
    const { world, b } = await setUp();
    const res = await request(t.app)
      .post('/api/software/import/preview')
      .set(world.auth('technician'))
      .send({ programId: world.program.id, rows: [{ tag: b.tag, ecu: 'FZC', F189: '4.2.1' }, { tag: b.tag, ecu: 'FZC', F189: '4.2.2' }, { tag: b.tag, ecu: 'FZC', F189: '4.2.1' }] });
    expect(res.body.rows.map((r: { outcome: string }) => r.outcome)).toEqual(['change', 'invalid', 'unchanged']);
    expect(res.body.rows[1].reasons).toEqual([expect.stringMatching(/Row 1 gives another reading for FZC/)]);
  });

  it.each([
    ['a spreadsheet', Buffer.from('PK\u0003\u0004binary'), 'readout.xlsx', 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet', 'import/unsupported-type', /not a CSV or JSON file/],
    ['binary content named .csv', Buffer.from([0x41, 0x00, 0x42, 0xff]), 'readout.csv', 'text/csv', 'import/unsupported-type', /not a CSV or JSON file/],
    ['a CSV without the version column', Buffer.from('asset_tag,ecu,F188\r\nA,FZC,X\r\n'), 'readout.csv', 'text/csv', 'import/missing-columns', /no column for the software version \(F189\)/],
    ['a CSV without tag or VIN', Buffer.from('ecu,F189\r\nFZC,1.0.0\r\n'), 'readout.csv', 'text/csv', 'import/missing-columns', /the asset tag or the VIN/],
    ['two columns for the version', Buffer.from('tag,ecu,F189,software_version\r\nA,FZC,1,2\r\n'), 'r.csv', 'text/csv', 'import/duplicate-columns', /Two columns give the software version/],
    ['JSON that does not parse', Buffer.from('{"rows": ['), 'readout.json', 'application/json', 'import/malformed', /does not parse/],
    ['an empty file', Buffer.alloc(0), 'readout.csv', 'text/csv', 'import/empty', /empty/],
    ['a file over 2 MB', Buffer.alloc(2 * 1024 * 1024 + 1, 0x41), 'readout.csv', 'text/csv', 'import/too-large', /larger than 2 MB/],
  ])('when the file is %s, then 400 naming the problem', async (_label, buffer, filename, contentType, code, message) => {
    const world = await makeSoftwareWorld(t);
    const res = await request(t.app)
      .post('/api/software/import/preview')
      .set(world.auth('engineer'))
      .field('programId', world.program.id)
      .attach('file', buffer, { filename, contentType });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe(code);
    expect(res.body.error.message).toMatch(message);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['file']);
  });

  it('when a multipart import has no file, then 400 naming file', async () => {
    const world = await makeSoftwareWorld(t);
    const res = await request(t.app).post('/api/software/import/preview').set(world.auth('engineer')).field('programId', world.program.id);
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['file']);
  });

  it.each(['coordinator', 'driver', 'admin'] as const)('when a %s previews or applies an import, then 403', async (role) => {
    const world: SoftwareWorld = await makeSoftwareWorld(t);
    const body = { programId: world.program.id, rows: [{ tag: 'X', ecu: 'FZC', F189: '1.0.0' }] };
    const preview = await request(t.app).post('/api/software/import/preview').set(world.auth(role)).send(body);
    const apply = await request(t.app).post('/api/software/import/apply').set(world.auth(role)).send(body);
    expect([preview.status, apply.status]).toEqual([403, 403]);
  });

  it('when an apply is retried with the same Idempotency-Key, then the first answer is replayed and nothing is written twice', async () => {
    const { world, b } = await setUp();
    const key = `imp-${uid()}`;
    const first = await request(t.app).post('/api/software/import/apply').set(world.auth('technician')).set('Idempotency-Key', key).send({ programId: world.program.id, rows: [{ tag: b.tag, ecu: 'FZC', F189: '4.2.1' }] });
    const again = await request(t.app).post('/api/software/import/apply').set(world.auth('technician')).set('Idempotency-Key', key).send({ programId: world.program.id, rows: [{ tag: b.tag, ecu: 'FZC', F189: '4.2.1' }] });
    expect([first.status, again.status]).toEqual([200, 200]);
    expect(again.headers['idempotent-replayed']).toBe('true');
    const [rows] = (await t.sequelize.query(`SELECT count(*)::int AS n FROM software_flashes WHERE asset_id = $1`, { bind: [b.id] })) as [Array<{ n: number }>, unknown];
    expect(rows[0].n).toBe(1);
  });

  it('when the demo read-out sample is previewed against the demo data, then it finds changes, unchanged rows and unknown rows', async () => {
    const demo = await demoSession(t, 'engineer@fenwater.example');
    for (const file of ['ecu-readout-sample.csv', 'ecu-readout-sample.json']) {
      const res = await request(t.app)
        .post('/api/software/import/preview')
        .set(demo.auth)
        .field('programId', demo.programId)
        .attach('file', `assets/demo/${file}`);
      expect(res.status).toBe(200);
      expect({ file, summary: res.body.summary }).toEqual({ file, summary: { change: 6, unchanged: 2, unknown: 3, invalid: 0 } });
    }
  });
});
