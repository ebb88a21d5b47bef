import request from 'supertest';
import { checkVin, withCheckDigit } from '../../shared/domain/vin';
import { AssetDetailSchema, AssetListSchema, type AssetSummary } from '../../shared/schemas/assets';
import { createAsset, makeWorld, type World } from '../helpers/assets';
import { makeTestApp, uid } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

// An invented VIN with its check digit computed by the rule under test (49 CFR 565.15(c)).
const validVin = () => withCheckDigit(`0FWC3ED10TB${String(Math.floor(Math.random() * 1e6)).padStart(6, '0')}`);

describe('creating and editing assets', () => {
  it('when a technician creates an asset, then 201 with the detail shape, the VIN check and the creation in the history', async () => {
    const world = await makeWorld(t);
    const vin = validVin();
    const res = await request(t.app)
      .post('/api/assets')
      .set(world.auth('technician'))
      .send({ programId: world.program.id, tag: ` fw3-ep-${uid().slice(0, 4)} `, kind: 'vehicle', stageId: world.stages[0].id, vin: vin.toLowerCase(), location: 'Bay 4', odometerKm: 12.5, buildDate: '2026-11-02' });
    expect(res.status).toBe(201);
    expect(AssetDetailSchema.parse(res.body)).toBeTruthy();
    expect(res.body).toMatchObject({
      tag: expect.stringMatching(/^FW3-EP-/),
      vin,
      stage: 'Bench',
      status: 'in-build',
      odometerKm: 12.5,
      buildDate: '2026-11-02',
      version: 0,
      cleared: true,
      vinCheck: { wellFormed: true, checkDigitValid: true, sections: { wmi: '0FW' } },
      program: { id: world.program.id },
    });
    expect(res.body.stageHistory).toHaveLength(1);
    const history = await request(t.app).get(`/api/assets/${res.body.id}/history`).set(world.auth('driver'));
    expect(history.status).toBe(200);
    expect(history.body.entries[0]).toMatchObject({ action: 'created', entityType: 'asset', actor: { id: world.users.technician.id } });
  });

  it.each([
    ['coordinator', 403],
    ['driver', 403],
    ['engineer', 201],
  ] as const)('when a %s creates an asset, then %i', async (role, status) => {
    const world = await makeWorld(t);
    const res = await request(t.app).post('/api/assets').set(world.auth(role)).send({ programId: world.program.id, tag: `R-${uid()}`, kind: 'component', stageId: world.stages[0].id });
    expect(res.status).toBe(status);
  });

  it('when a tag is already used in the program (in any case), then 409 naming `tag`; another program may use it', async () => {
    const world = await makeWorld(t);
    const other = await makeWorld(t);
    const tag = `DUP-${uid()}`.toUpperCase();
    await createAsset(t, world, { tag });
    const res = await request(t.app).post('/api/assets').set(world.auth('lead')).send({ programId: world.program.id, tag: tag.toLowerCase(), kind: 'vehicle', stageId: world.stages[0].id });
    expect(res.status).toBe(409);
    expect(res.body.error.details.fields).toEqual({ tag: expect.any(String) });
    expect(res.body.error.message).toMatch(/^tag: /);
    await expect(createAsset(t, other, { tag })).resolves.toMatchObject({ tag });
    const second = await createAsset(t, world);
    const rename = await request(t.app).patch(`/api/assets/${second.id}`).set(world.auth('lead')).send({ tag, version: second.version });
    expect(rename.status).toBe(409);
    expect(Object.keys(rename.body.error.details.fields)).toEqual(['tag']);
  });

  it('when two people save the same new tag at once, then one gets 201 and the other 409 naming `tag`', async () => {
    const world = await makeWorld(t);
    const tag = `RACE-${uid()}`.toUpperCase();
    const send = () => request(t.app).post('/api/assets').set(world.auth('lead')).send({ programId: world.program.id, tag, kind: 'vehicle', stageId: world.stages[0].id });
    const results = await Promise.all([send(), send(), send()]);
    expect(results.map((r) => r.status).sort()).toEqual([201, 409, 409]);
    for (const r of results.filter((x) => x.status === 409)) expect(Object.keys(r.body.error.details.fields)).toEqual(['tag']);
  });

  it.each([
    ['16 characters', '1G4AH59H45G11834', /17 characters/],
    ['the letter O', '1G4AH59H45G11834O', /I, O and Q/],
    ['a dash', '1G4AH-9H45G118341', /capital letters and digits/],
  ])('when the VIN has %s, then 400 on the field vin with the reason and nothing is saved', async (_label, vin, reason) => {
    const world = await makeWorld(t);
    const tag = `V-${uid()}`;
    const res = await request(t.app).post('/api/assets').set(world.auth('lead')).send({ programId: world.program.id, tag, kind: 'vehicle', stageId: world.stages[0].id, vin });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['vin']);
    expect(res.body.error.details.fields.vin).toMatch(reason);
    const [rows] = (await t.sequelize.query(`SELECT 1 FROM assets WHERE tag = $1`, { bind: [tag.toUpperCase()] })) as [unknown[], unknown];
    expect(rows).toHaveLength(0);
  });

  it('when a well-formed VIN has a wrong check digit (49 CFR 565.15(c): 1FTDX186XWKA10140 should carry 8), then it is saved with a visible warning', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world, { vin: '1FTDX186XWKA10140' });
    expect(asset.vin).toBe('1FTDX186XWKA10140');
    expect(asset.vinCheck).toMatchObject({ wellFormed: true, checkDigitValid: false, expectedCheckDigit: '8' });
  });

  it('when an asset is edited with the current version, then it is saved and the history keeps before and after', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const res = await request(t.app)
      .patch(`/api/assets/${asset.id}`)
      .set(world.auth('coordinator'))
      .send({ status: 'available', location: ' Parts cage ', odometerKm: 140, notes: 'Back from the loop.', version: asset.version });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ status: 'available', location: 'Parts cage', odometerKm: 140, notes: 'Back from the loop.', version: asset.version + 1 });
    const history = await request(t.app).get(`/api/assets/${asset.id}/history`).set(world.auth('technician'));
    expect(history.body.entries.map((e: { action: string }) => e.action)).toEqual(['updated', 'created']);
    expect(history.body.entries[0]).toMatchObject({
      actor: { id: world.users.coordinator.id, name: world.users.coordinator.name },
      before: { status: 'in-build', location: '' },
      after: { status: 'available', location: 'Parts cage' },
    });
  });

  it('when an asset is edited with a stale version, then 409 with the current asset and nothing changes', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    await request(t.app).patch(`/api/assets/${asset.id}`).set(world.auth('lead')).send({ location: 'Climate lab', version: asset.version });
    const stale = await request(t.app).patch(`/api/assets/${asset.id}`).set(world.auth('technician')).send({ location: 'Test loop', version: asset.version });
    expect(stale.status).toBe(409);
    expect(stale.body.error).toMatchObject({ code: 'request/conflict', message: expect.any(String), details: { current: { id: asset.id, location: 'Climate lab', version: asset.version + 1 } } });
    const now = await request(t.app).get(`/api/assets/${asset.id}`).set(world.auth('lead'));
    expect(now.body.location).toBe('Climate lab');
  });

  it('when a driver edits an asset, then 403', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const res = await request(t.app).patch(`/api/assets/${asset.id}`).set(world.auth('driver')).send({ location: 'Home', version: asset.version });
    expect(res.status).toBe(403);
  });

  it.each([
    { label: 'an unknown kind', body: { kind: 'spaceship' }, field: 'kind' },
    { label: 'a negative odometer', body: { odometerKm: -1 }, field: 'odometerKm' },
    { label: 'a tag with spaces inside', body: { tag: 'FW3 EP 1' }, field: 'tag' },
    { label: 'an over-long location', body: { location: 'x'.repeat(81) }, field: 'location' },
    { label: 'a build date that is not a date', body: { buildDate: '31/12/2026' }, field: 'buildDate' },
    { label: 'an unknown field', body: { colour: 'red' }, field: 'colour' },
    { label: 'a stage id that is not a uuid', body: { stageId: 'bench' }, field: 'stageId' },
  ])('when a new asset has $label, then 400 naming $field', async ({ body, field }) => {
    const world = await makeWorld(t);
    const res = await request(t.app)
      .post('/api/assets')
      .set(world.auth('lead'))
      .send({ programId: world.program.id, tag: `B-${uid()}`, kind: 'vehicle', stageId: world.stages[0].id, ...body });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('request/invalid');
    expect(Object.keys(res.body.error.details.fields)).toContain(field);
  });
});

describe('the asset list', () => {
  const page = async (world: World, query: string) => {
    const res = await request(t.app).get(`/api/assets?programId=${world.program.id}&${query}`).set(world.auth('driver'));
    expect(res.status).toBe(200);
    return AssetListSchema.parse(res.body);
  };
  const walk = async (world: World, query: string) => {
    const pages: AssetSummary[][] = [];
    let cursor: string | null = null;
    do {
      const res: { items: AssetSummary[]; nextCursor: string | null } = await page(world, `${query}${cursor ? `&cursor=${cursor}` : ''}`);
      pages.push(res.items);
      cursor = res.nextCursor;
    } while (cursor && pages.length < 10);
    return pages;
  };

  it.each([
    ['tag', 'asc'],
    ['tag', 'desc'],
    ['updated', 'asc'],
    ['updated', 'desc'],
    ['location', 'asc'],
    ['status', 'desc'],
    ['stage', 'asc'],
  ])('when 7 assets are paged 3 at a time sorted by %s %s, then the pages hold 3, 3 and 1, with no duplicates, in order', async (sort, dir) => {
    const world = await makeWorld(t);
    const token = `pg${uid()}`;
    for (let i = 0; i < 7; i += 1) {
      await createAsset(t, world, { tag: `P-${i}-${uid()}`, location: i % 2 ? 'Bay 4' : 'Climate lab', notes: `batch ${token}`, stageId: world.stages[i % 2].id });
    }
    const pages = await walk(world, `q=${token}&limit=3&sort=${sort}&dir=${dir}`);
    expect(pages.map((p) => p.length)).toEqual([3, 3, 1]);
    const ids = pages.flat().map((a) => a.id);
    expect(new Set(ids).size).toBe(7);
    const all = await page(world, `q=${token}&limit=50&sort=${sort}&dir=${dir}`);
    expect(all.items.map((a) => a.id)).toEqual(ids);
  });

  it.each([
    { sort: 'updated', tieBreak: 'id', key: (a: AssetSummary) => a.id },
    { sort: 'location', tieBreak: 'tag', key: (a: AssetSummary) => a.tag },
  ])('when every asset has the same $sort value, then paging is still stable (ties broken by $tieBreak)', async ({ sort, key }) => {
    const world = await makeWorld(t);
    const token = `tie${uid()}`;
    for (let i = 0; i < 7; i += 1) await createAsset(t, world, { location: 'Test loop', notes: token });
    await t.sequelize.query(`UPDATE assets SET updated_at = '2026-11-30T10:00:00.123Z' WHERE program_id = $1`, { bind: [world.program.id] });
    const pages = await walk(world, `q=${token}&limit=3&sort=${sort}`);
    expect(pages.map((p) => p.length)).toEqual([3, 3, 1]);
    const keys = pages.flat().map(key);
    expect(new Set(keys).size).toBe(7);
    expect(keys).toEqual([...keys].sort());
  });

  it('when the list is filtered by stage, status, kind, location or text, then only matching assets come back', async () => {
    const world = await makeWorld(t);
    const a = await createAsset(t, world, { kind: 'bench-rig', location: 'Bay 4', status: 'in-test', notes: 'inverter bench' });
    const b = await createAsset(t, world, { kind: 'vehicle', location: 'Test loop', stageId: world.stages[1].id, vin: validVin() });
    const tags = async (query: string) => (await page(world, query)).items.map((i) => i.tag);
    expect(await tags(`stage=${world.stages[1].id}`)).toEqual([b.tag]);
    expect(await tags('status=in-test')).toEqual([a.tag]);
    expect(await tags('kind=bench-rig')).toEqual([a.tag]);
    expect(await tags('location=test%20loop')).toEqual([b.tag]);
    expect(await tags('q=INVERTER')).toEqual([a.tag]);
    expect(await tags(`q=${b.vin!.slice(-6)}`)).toEqual([b.tag]);
    expect(await tags('q=100%25')).toEqual([]);
  });

  it('when the list is read, then each item carries its checklist progress from the same query', async () => {
    const world = await makeWorld(t);
    const asset = await createAsset(t, world);
    const { items } = await page(world, `q=${asset.tag}`);
    expect(items[0].checklist).toEqual({ total: 5, done: 0, requiredTotal: 4, requiredDone: 0, deviations: 0 });
  });

  const forged = (k: unknown[]) => Buffer.from(JSON.stringify({ s: 'updated', d: 'asc', k, id: '00000000-0000-4000-8000-000000000000' })).toString('base64url');
  it.each([
    ['not base64 JSON', 'not-a-cursor'],
    ['from another sort', null],
    ['forged with a value that is not a time', forged(['yesterday'])],
    ['forged with a number for a time', forged([12])],
  ])('when the cursor is %s, then 400 naming cursor', async (_label, raw) => {
    const world = await makeWorld(t);
    for (let i = 0; i < 2; i += 1) await createAsset(t, world);
    const cursor = raw ?? (await page(world, 'limit=1&sort=tag')).nextCursor;
    const res = await request(t.app).get(`/api/assets?programId=${world.program.id}&sort=updated&cursor=${cursor}`).set(world.auth('driver'));
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['cursor']);
  });

  it.each([
    { label: 'an unknown sort', query: 'sort=colour', field: 'sort' },
    { label: 'a limit over 200', query: 'limit=500', field: 'limit' },
    { label: 'an unknown status', query: 'status=lost', field: 'status' },
  ])('when the list query has $label, then 400 naming $field', async ({ query, field }) => {
    const world = await makeWorld(t);
    const res = await request(t.app).get(`/api/assets?programId=${world.program.id}&${query}`).set(world.auth('driver'));
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual([field]);
  });
});

describe('CSV export', () => {
  const parseCsvLine = (line: string) => {
    const cells: string[] = [];
    let cell = '';
    let quoted = false;
    for (let i = 0; i < line.length; i += 1) {
      const c = line[i];
      if (quoted) {
        if (c === '"' && line[i + 1] === '"') {
          cell += '"';
          i += 1;
        } else if (c === '"') quoted = false;
        else cell += c;
      } else if (c === '"') quoted = true;
      else if (c === ',') {
        cells.push(cell);
        cell = '';
      } else cell += c;
    }
    cells.push(cell);
    return cells;
  };

  it('when assets are exported, then the CSV has the header, escapes commas and quotes, and neutralises formulas (OWASP CSV injection)', async () => {
    const world = await makeWorld(t);
    const token = `csv${uid()}`;
    const locations = ['Bay 4, row "B"', '=HYPERLINK("http://x.example")', '+44 loop', '-1 level', '@SUM(A1)', 'Climate lab'];
    for (const [i, location] of locations.entries()) {
      await createAsset(t, world, { tag: `C-${i}-${uid()}`, location, notes: token, odometerKm: i * 10 });
    }
    const res = await request(t.app).get(`/api/assets/export.csv?programId=${world.program.id}&q=${token}&sort=tag`).set(world.auth('coordinator'));
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="assets-T[A-Z0-9]+-\d{4}-\d{2}-\d{2}\.csv"$/);
    const lines = res.text.split('\r\n');
    expect(lines[0]).toBe('tag,kind,stage,status,location,vin,odometer_km,checklist_done,checklist_total,updated_at');
    expect(lines[lines.length - 1]).toBe('');
    const rows = lines.slice(1, -1).map(parseCsvLine);
    expect(rows).toHaveLength(locations.length);
    expect(rows.map((r) => r[4])).toEqual(['Bay 4, row "B"', '\'=HYPERLINK("http://x.example")', "'+44 loop", "'-1 level", "'@SUM(A1)", 'Climate lab']);
    expect(lines[1]).toContain('"Bay 4, row ""B"""');
    expect(rows[0].slice(6, 9)).toEqual(['0', '0', '5']);
    expect(rows.every((r) => r.length === 10)).toBe(true);
  });

  it('when the export gets a cursor, then 400 naming cursor', async () => {
    const world = await makeWorld(t);
    const res = await request(t.app).get(`/api/assets/export.csv?programId=${world.program.id}&cursor=abc`).set(world.auth('lead'));
    expect(res.status).toBe(400);
    expect(res.body.error.details.fields).toHaveProperty('cursor');
  });
});

describe('VIN check route', () => {
  it.each([
    ['1G4AH59H45G118341', { wellFormed: true, checkDigitValid: true, expectedCheckDigit: '4', modelYears: [2005, 2035] }, '49 CFR 565.15(c) sample'],
    ['1m8gdm9axkp042788', { wellFormed: true, checkDigitValid: true, expectedCheckDigit: 'X' }, 'REFERENCES.md, lower case normalised'],
    ['1FTDX186XWKA10140', { wellFormed: true, checkDigitValid: false, expectedCheckDigit: '8' }, 'REFERENCES.md, invalid'],
    ['1G4AH59H45G11834', { wellFormed: false, checkDigitValid: false, expectedCheckDigit: null }, '16 characters'],
  ])('when %s is checked, then the answer is %j (%s)', async (vin, expected, _source) => {
    const world = await makeWorld(t);
    const res = await request(t.app).get(`/api/calc/vin/${vin}`).set(world.auth('driver'));
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject(expected);
    expect(res.body).toEqual(checkVin(vin.toUpperCase()));
  });

  it('when nobody is signed in, then the VIN check answers 401', async () => {
    expect((await request(t.app).get('/api/calc/vin/1G4AH59H45G118341')).status).toBe(401);
  });
});
