import sharp from 'sharp';
import request from 'supertest';
import type { Checklist } from '../../shared/schemas/assets';
import { createAsset, makeWorld, type World } from '../helpers/assets';
import { makeTestApp } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

// Every route of this issue, from the route table, so a new one cannot escape the checks.
const PREFIXES = ['/api/assets', '/api/stages', '/api/template-items', '/api/checklist-items', '/api/photos', '/api/calc'];
const newRoutes = t.routes.filter((r) => PREFIXES.some((p) => r.path.startsWith(p)));

type Ids = { asset: string; stage: string; templateItem: string; checklistItem: string; photo: string; program: string };

/** Rows of a program the caller does not belong to. */
async function foreignIds(other: World): Promise<Ids> {
  const asset = await createAsset(t, other);
  const checklist = (await request(t.app).get(`/api/assets/${asset.id}/checklist`).set(other.auth('lead'))).body as Checklist;
  const template = await request(t.app).get(`/api/stages/${other.stages[0].id}/template`).set(other.auth('lead'));
  const jpeg = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#456' } }).jpeg().toBuffer();
  const photo = await request(t.app).post(`/api/assets/${asset.id}/photos`).set(other.auth('lead')).attach('photo', jpeg, 'a.jpg');
  return {
    asset: asset.id,
    stage: other.stages[0].id,
    templateItem: template.body.items[0].id,
    checklistItem: checklist.groups[0].items[0].id,
    photo: photo.body.id,
    program: other.program.id,
  };
}

/** A plausible request to a route with the other program's id in it (valid bodies, so only scoping can refuse them). */
function callWith(path: string, method: string, ids: Ids, stageOfMine: string) {
  const idFor: Record<string, string> = {
    '/api/assets/': ids.asset,
    '/api/stages/': ids.stage,
    '/api/template-items/': ids.templateItem,
    '/api/checklist-items/': ids.checklistItem,
    '/api/photos/': ids.photo,
  };
  const prefix = Object.keys(idFor).find((p) => path.startsWith(p))!;
  const url = path.replace(':id', idFor[prefix]);
  const bodies: Record<string, object> = {
    'patch /api/assets/:id': { location: 'Elsewhere', version: 0 },
    'post /api/assets/:id/stage': { stageId: stageOfMine, version: 0 },
    'patch /api/stages/:id': { name: 'Taken over', version: 0 },
    'post /api/stages/:id/template/items': { system: 'body', title: 'Injected item' },
    'patch /api/template-items/:id': { title: 'Changed', version: 0 },
    'patch /api/checklist-items/:id': { state: 'passed', version: 0 },
  };
  return { url, body: bodies[`${method} ${path}`] };
}

describe('program scoping of the asset, stage, checklist and photo routes', () => {
  let mine: World;
  let ids: Ids;
  beforeAll(async () => {
    mine = await makeWorld(t);
    ids = await foreignIds(await makeWorld(t));
  });

  it('when the route table is read, then every route of this issue is in it with an access rule', () => {
    expect(newRoutes.length).toBeGreaterThanOrEqual(18);
    for (const route of newRoutes) expect(route.access).toBeDefined();
  });

  it('when a lead calls every route that takes an id with an id of another program, then 404 (never 403) and nothing changes', async () => {
    const withId = newRoutes.filter((r) => r.path.includes(':id'));
    expect(withId.length).toBeGreaterThanOrEqual(12);
    for (const route of withId) {
      const { url, body } = callWith(route.path, route.method, ids, mine.stages[1].id);
      let req = request(t.app)[route.method](url).set(mine.auth('lead'));
      if (route.path === '/api/assets/:id/photos') {
        req = req.attach('photo', await sharp({ create: { width: 8, height: 8, channels: 3, background: '#000' } }).jpeg().toBuffer(), 'x.jpg');
      } else if (body) req = req.send(body);
      const res = await req;
      expect({ route: `${route.method} ${route.path}`, status: res.status }).toEqual({ route: `${route.method} ${route.path}`, status: 404 });
    }
    const [rows] = (await t.sequelize.query(`SELECT location, version FROM assets WHERE id = $1`, { bind: [ids.asset] })) as [Array<{ location: string; version: number }>, unknown];
    expect(rows[0]).toEqual({ location: '', version: 0 });
  });

  it.each([
    ['get', '/api/assets?programId={other}'],
    ['get', '/api/assets/export.csv?programId={other}'],
    ['get', '/api/stages?programId={other}'],
  ] as const)('when a lead reads %s %s with another program, then 404', async (method, path) => {
    const res = await request(t.app)[method](path.replace('{other}', ids.program)).set(mine.auth('lead'));
    expect(res.status).toBe(404);
  });

  it('when a lead creates an asset or stage or reorders stages in another program, then 404', async () => {
    const asset = await request(t.app).post('/api/assets').set(mine.auth('lead')).send({ programId: ids.program, tag: 'X-1', kind: 'vehicle', stageId: ids.stage });
    expect(asset.status).toBe(404);
    const stage = await request(t.app).post('/api/stages').set(mine.auth('lead')).send({ programId: ids.program, name: 'Mine now' });
    expect(stage.status).toBe(404);
    const reorder = await request(t.app).post('/api/stages/reorder').set(mine.auth('lead')).send({ programId: ids.program, stageIds: [ids.stage] });
    expect(reorder.status).toBe(404);
  });

  it('when an asset of my program is moved to a stage of another program, then 400 naming stageId', async () => {
    const asset = await createAsset(t, mine);
    const res = await request(t.app).post(`/api/assets/${asset.id}/stage`).set(mine.auth('lead')).send({ stageId: ids.stage, version: asset.version });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['stageId']);
  });

  it('when nobody is signed in, then every route of this issue answers 401 (the photo stream too, without a signed URL)', async () => {
    for (const route of newRoutes) {
      const res = await request(t.app)[route.method](route.path.replace(':id', ids.asset).replace(':vin', '1G4AH59H45G118341')).send({});
      expect({ route: `${route.method} ${route.path}`, status: res.status }).toEqual({ route: `${route.method} ${route.path}`, status: 401 });
    }
  });

  it('when an id in the path is not a uuid, then 404 rather than 500', async () => {
    for (const path of ['/api/assets/nope', '/api/assets/nope/checklist', '/api/stages/nope/template', '/api/photos/nope']) {
      const res = await request(t.app).get(path).set(mine.auth('lead'));
      expect({ path, status: res.status }).toEqual({ path, status: 404 });
    }
  });
});
