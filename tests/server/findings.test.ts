import sharp from 'sharp';
import request from 'supertest';
import { CommentListSchema, FindingHistorySchema, FindingListSchema, FindingSchema, type Finding, type FindingList } from '../../shared/schemas/findings';
import { PhotoSchema } from '../../shared/schemas/assets';
import { signToken } from '../../server/middleware/auth';
import { createAsset } from '../helpers/assets';
import { dateIn, fileFinding, makeFindingWorld, muteFindingMail, patchFinding, walk, type FindingWorld } from '../helpers/findings';
import { makeTestApp, makeUser } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

let world: FindingWorld;
let other: FindingWorld;
beforeAll(async () => {
  world = await makeFindingWorld(t);
  other = await makeFindingWorld(t);
  await muteFindingMail(t, world);
  await muteFindingMail(t, other);
});

const jpeg = (shade = '#456') => sharp({ create: { width: 64, height: 48, channels: 3, background: shade } }).jpeg().toBuffer();
const list = async (query: string, role: 'technician' | 'engineer' | 'lead' = 'lead') => {
  const res = await request(t.app).get(`/api/findings?programId=${world.program.id}&${query}`).set(world.auth(role));
  expect(res.status).toBe(200);
  return FindingListSchema.parse(res.body);
};

describe('the finding record', () => {
  it('when a finding is filed with every field, then 201 with the whole record in the shared schema', async () => {
    const res = await request(t.app)
      .post('/api/findings')
      .set(world.auth('technician'))
      .send({
        assetId: world.asset.id,
        title: '  Door seal pinch at B-pillar  ',
        severity: 'minor',
        description: 'Seal folds over when the door closes.',
        system: 'body',
        ownerId: world.users.engineer.id,
        watcherIds: [world.users.lead.id, world.users.lead.id],
        dueDate: dateIn(7),
      });
    expect(res.status).toBe(201);
    const finding = FindingSchema.parse(res.body);
    expect(finding).toMatchObject({
      programId: world.program.id,
      assetId: world.asset.id,
      assetTag: world.asset.tag,
      title: 'Door seal pinch at B-pillar',
      severity: 'minor',
      status: 'open',
      system: 'body',
      owner: { id: world.users.engineer.id, name: world.users.engineer.name },
      watchers: [{ id: world.users.lead.id, name: world.users.lead.name }],
      dueDate: dateIn(7),
      overdue: false,
      blocksDriving: false,
      rejectReason: null,
      commentCount: 0,
      photos: [],
      createdBy: { id: world.users.technician.id, name: world.users.technician.name },
      version: 0,
    });
    const read = await request(t.app).get(`/api/findings/${finding.id}`).set(world.auth('driver'));
    expect(read.body).toEqual(res.body);
  });

  it('when a finding comes from a checklist item without a system, then it takes the item and its system', async () => {
    const checklist = await request(t.app).get(`/api/assets/${world.asset.id}/checklist`).set(world.auth('technician'));
    const item = checklist.body.groups[0].items[0];
    const finding = await fileFinding(t, world, { checklistItemId: item.id, title: 'Flash failed at 80 %' });
    expect(finding).toMatchObject({ checklistItemId: item.id, system: item.system });
  });

  it('when a finding is past its due date and still open, then it is overdue; once verified, it is not', async () => {
    const finding = await fileFinding(t, world, { dueDate: dateIn(1), ownerId: world.users.technician.id });
    await t.sequelize.query(`UPDATE findings SET due_date = current_date - 3 WHERE id = $1`, { bind: [finding.id] });
    const late = await request(t.app).get(`/api/findings/${finding.id}`).set(world.auth('lead'));
    expect(late.body.overdue).toBe(true);
    const done = await walk(t, world, late.body, [
      ['fixed', 'technician'],
      ['verified', 'engineer'],
    ]);
    expect(done.overdue).toBe(false);
  });
});

describe('bad input answers 400 (or 404) with the reason, and writes nothing', () => {
  it.each([
    ['an unknown severity', { severity: 'cosmetic' }, 'severity'],
    ['a due date in the past', { dueDate: '2020-01-31' }, 'dueDate'],
    ['a malformed due date', { dueDate: '31/01/2027' }, 'dueDate'],
    ['an owner outside the program', { ownerId: 'OTHER_OWNER' }, 'ownerId'],
    ['an administrator as owner', { ownerId: 'ADMIN' }, 'ownerId'],
    ['a watcher outside the program', { watcherIds: ['OTHER_OWNER'] }, 'watcherIds'],
    ['an empty title', { title: '   ' }, 'title'],
    ['an over-long title', { title: 'x'.repeat(161) }, 'title'],
    ['an unknown field', { blocksDriving: true }, 'blocksDriving'],
    ['a checklist item of another asset', { checklistItemId: 'OTHER_ITEM' }, 'checklistItemId'],
  ])('when a finding is filed with %s, then 400 naming %#', async (_label, fields, field) => {
    const otherChecklist = await request(t.app).get(`/api/assets/${other.asset.id}/checklist`).set(other.auth('lead'));
    const swap: Record<string, string> = {
      OTHER_OWNER: other.users.engineer.id,
      ADMIN: world.users.admin.id,
      OTHER_ITEM: otherChecklist.body.groups[0].items[0].id,
    };
    const body = JSON.parse(JSON.stringify({ assetId: world.asset.id, title: `Bad input ${field}`, severity: 'major', ...fields }), (_k, v) =>
      typeof v === 'string' && swap[v] ? swap[v] : v,
    );
    const before = await list('limit=1');
    const res = await request(t.app).post('/api/findings').set(world.auth('technician')).send(body);
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual([field]);
    expect(res.body.error.message).toContain(field);
    expect((await list('limit=1')).counts).toEqual(before.counts);
  });

  it('when a change asks for an unknown status, then 400 naming status', async () => {
    const finding = await fileFinding(t, world);
    const res = await patchFinding(t, world, finding, { status: 'closed' }, 'engineer');
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['status']);
  });

  it('when a change moves the due date into the past, then 400 naming dueDate; an unchanged past date is accepted', async () => {
    const finding = await fileFinding(t, world, { dueDate: dateIn(2) });
    const res = await patchFinding(t, world, finding, { dueDate: '2021-06-01' }, 'technician');
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['dueDate']);
    await t.sequelize.query(`UPDATE findings SET due_date = '2021-06-01' WHERE id = $1`, { bind: [finding.id] });
    const same = await patchFinding(t, world, finding, { dueDate: '2021-06-01', title: 'Renamed, date as it was' }, 'technician');
    expect(same.status).toBe(200);
  });

  it('when a change names an owner outside the program, then 400 naming ownerId', async () => {
    const finding = await fileFinding(t, world);
    const res = await patchFinding(t, world, finding, { ownerId: other.users.technician.id }, 'lead');
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['ownerId']);
  });

  it('when someone outside the program files on its asset, then 404 and nothing is written', async () => {
    const res = await request(t.app)
      .post('/api/findings')
      .set(other.auth('technician'))
      .send({ assetId: world.asset.id, title: 'Not my asset', severity: 'minor' });
    expect(res.status).toBe(404);
    const [rows] = (await t.sequelize.query(`SELECT 1 FROM findings WHERE title = 'Not my asset'`)) as [unknown[], unknown];
    expect(rows).toHaveLength(0);
  });

  it('when a page link is forged, then 400 naming cursor', async () => {
    const res = await request(t.app).get(`/api/findings?programId=${world.program.id}&cursor=bm90LWpzb24`).set(world.auth('lead'));
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.details.fields)).toEqual(['cursor']);
  });
});

describe('program scoping of the finding routes', () => {
  const findingRoutes = () => t.routes.filter((r) => r.path.startsWith('/api/findings') || r.path.startsWith('/api/me/email-prefs'));

  it('when the route table is read, then every finding route is in it with its access rule', () => {
    expect(findingRoutes().map((r) => `${r.method} ${r.path} ${JSON.stringify(r.access)}`)).toEqual([
      'get /api/findings "user"',
      'post /api/findings ["technician","engineer","coordinator","driver","lead"]',
      'get /api/findings/:id "user"',
      'patch /api/findings/:id ["technician","engineer","coordinator","driver","lead"]',
      'get /api/findings/:id/comments "user"',
      'post /api/findings/:id/comments ["technician","engineer","coordinator","driver","lead"]',
      'post /api/findings/:id/photos ["technician","engineer","coordinator","driver","lead"]',
      'get /api/findings/:id/history "user"',
      'get /api/me/email-prefs "user"',
      'put /api/me/email-prefs "user"',
    ]);
  });

  it('when a lead calls every finding route with a finding of another program, then 404 (never 403) and nothing changes', async () => {
    const foreign = await fileFinding(t, other);
    const bodies: Record<string, object> = {
      'patch /api/findings/:id': { version: foreign.version, title: 'Taken over' },
      'post /api/findings/:id/comments': { body: 'Injected' },
    };
    for (const route of findingRoutes().filter((r) => r.path.includes(':id'))) {
      let req = request(t.app)[route.method](route.path.replace(':id', foreign.id)).set(world.auth('lead'));
      if (route.path.endsWith('/photos')) req = req.attach('photo', await jpeg(), 'x.jpg');
      else if (bodies[`${route.method} ${route.path}`]) req = req.send(bodies[`${route.method} ${route.path}`]);
      const res = await req;
      expect({ route: `${route.method} ${route.path}`, status: res.status }).toEqual({ route: `${route.method} ${route.path}`, status: 404 });
    }
    const after = await request(t.app).get(`/api/findings/${foreign.id}`).set(other.auth('lead'));
    expect(after.body).toMatchObject({ title: foreign.title, version: foreign.version, commentCount: 0, photos: [] });
  });

  it('when a lead lists another program, then 404', async () => {
    const res = await request(t.app).get(`/api/findings?programId=${other.program.id}`).set(world.auth('lead'));
    expect(res.status).toBe(404);
  });

  it('when nobody is signed in, then every finding route answers 401', async () => {
    for (const route of findingRoutes()) {
      const res = await request(t.app)[route.method](route.path.replace(':id', world.asset.id)).send({});
      expect({ route: `${route.method} ${route.path}`, status: res.status }).toEqual({ route: `${route.method} ${route.path}`, status: 401 });
    }
  });

  it('when an id in the path is not a uuid, then 404 rather than 500', async () => {
    for (const path of ['/api/findings/nope', '/api/findings/nope/comments', '/api/findings/nope/history']) {
      const res = await request(t.app).get(path).set(world.auth('lead'));
      expect({ path, status: res.status }).toEqual({ path, status: 404 });
    }
  });
});

describe('the not-cleared rule (PRODUCT.md sections 3C and 6)', () => {
  it('when a safety finding is filed, then its asset is not cleared with the finding as the reason; once verified, it is cleared', async () => {
    const asset = await createAsset(t, world);
    const clear = async () => (await request(t.app).get(`/api/assets/${asset.id}`).set(world.auth('driver'))).body;
    expect(await clear()).toMatchObject({ cleared: true, notClearedReason: null });
    const safety = await fileFinding(t, world, { assetId: asset.id, severity: 'safety', title: 'HV interlock loop open after pack refit', ownerId: world.users.technician.id });
    expect(safety.blocksDriving).toBe(true);
    expect(await clear()).toMatchObject({ cleared: false, notClearedReason: 'HV interlock loop open after pack refit' });
    const listed = await request(t.app).get(`/api/assets?programId=${world.program.id}`).set(world.auth('driver'));
    expect(listed.body.items.find((a: { id: string }) => a.id === asset.id)).toMatchObject({ cleared: false });

    const fixed = await walk(t, world, safety, [['in-work', 'technician'], ['fixed', 'technician']]);
    expect(await clear()).toMatchObject({ cleared: false });
    const verified = await walk(t, world, fixed, [['verified', 'engineer']]);
    expect(verified.blocksDriving).toBe(false);
    expect(await clear()).toMatchObject({ cleared: true, notClearedReason: null });
  });

  it('when a safety finding is rejected, then the asset is cleared; when it is reopened, then it is not cleared again', async () => {
    const asset = await createAsset(t, world);
    const clear = async () => (await request(t.app).get(`/api/assets/${asset.id}`).set(world.auth('driver'))).body.cleared;
    const safety = await fileFinding(t, world, { assetId: asset.id, severity: 'safety', title: 'Parking brake does not hold on test ramp' });
    const rejected = await walk(t, world, safety, [['rejected', 'lead', 'Ramp angle was beyond the test spec.']]);
    expect(await clear()).toBe(true);
    await walk(t, world, rejected, [['open', 'driver', 'Creeps on the standard ramp too.']]);
    expect(await clear()).toBe(false);
  });

  it('when a major finding is open, then the asset stays cleared', async () => {
    const asset = await createAsset(t, world);
    await fileFinding(t, world, { assetId: asset.id, severity: 'major' });
    expect((await request(t.app).get(`/api/assets/${asset.id}`).set(world.auth('driver'))).body.cleared).toBe(true);
  });
});

describe('the list: filters, sorts, keyset pages and counts per severity', () => {
  let mine: FindingWorld;
  let found: Record<string, Finding>;
  const listMine = async (query: string, role: 'technician' | 'lead' = 'lead') => {
    const res = await request(t.app).get(`/api/findings?programId=${mine.program.id}&${query}`).set(mine.auth(role));
    expect(res.status).toBe(200);
    return FindingListSchema.parse(res.body);
  };
  const titles = (l: FindingList) => l.items.map((f) => f.title);

  beforeAll(async () => {
    mine = await makeFindingWorld(t);
    await muteFindingMail(t, mine);
    const second = await createAsset(t, mine);
    const file = (fields: object, role: 'technician' | 'engineer' = 'technician') => fileFinding(t, mine, fields, role);
    found = {
      a: await file({ title: 'A safety', severity: 'safety', system: 'high-voltage', dueDate: dateIn(1), ownerId: mine.users.engineer.id }),
      b: await file({ title: 'B blocking', severity: 'blocking', system: 'software', dueDate: dateIn(5), ownerId: mine.users.technician.id }),
      c: await file({ title: 'C major', severity: 'major', system: 'thermal', dueDate: dateIn(3), watcherIds: [mine.users.technician.id] }, 'engineer'),
      d: await file({ title: 'D minor', severity: 'minor', system: 'body' }),
      e: await file({ title: 'E major late', severity: 'major', system: 'thermal', dueDate: dateIn(2), ownerId: mine.users.engineer.id, assetId: second.id }),
      f: await file({ title: 'F minor verified', severity: 'minor', system: 'body', dueDate: dateIn(4), ownerId: mine.users.engineer.id }),
    };
    await t.sequelize.query(`UPDATE findings SET due_date = current_date - 2 WHERE id = $1`, { bind: [found.e.id] });
    found.f = await walk(t, mine, found.f, [['fixed', 'engineer'], ['verified', 'engineer']]);
  });

  it('when listed by due date, then the earliest first and findings without a date last, in either direction', async () => {
    expect(titles(await listMine('sort=due'))).toEqual(['E major late', 'A safety', 'C major', 'F minor verified', 'B blocking', 'D minor']);
    expect(titles(await listMine('sort=due&dir=desc'))).toEqual(['B blocking', 'F minor verified', 'C major', 'A safety', 'E major late', 'D minor']);
  });

  it('when listed by age, then oldest first (asc) or newest first (desc)', async () => {
    expect(titles(await listMine('sort=age'))).toEqual(['A safety', 'B blocking', 'C major', 'D minor', 'E major late', 'F minor verified']);
    expect(titles(await listMine('sort=age&dir=desc'))).toEqual(['F minor verified', 'E major late', 'D minor', 'C major', 'B blocking', 'A safety']);
  });

  it('when listed by last change, then the verified one (changed last) comes last ascending', async () => {
    expect(titles(await listMine('sort=updated')).at(-1)).toBe('F minor verified');
  });

  it.each([
    ['severity=major', ['C major', 'E major late']],
    ['status=active', ['A safety', 'B blocking', 'C major', 'D minor', 'E major late']],
    ['status=verified', ['F minor verified']],
    ['system=thermal', ['C major', 'E major late']],
    ['overdue=true', ['E major late']],
    ['overdue=false&severity=minor', ['D minor', 'F minor verified']],
    ['ownerId=none', ['C major', 'D minor']],
    ['mine=owner', ['B blocking']],
    ['mine=watching', ['C major']],
    ['mine=created', ['A safety', 'B blocking', 'D minor', 'E major late', 'F minor verified']],
  ])('when filtered by %s, then only the matching findings come', async (query, expected) => {
    expect(titles(await listMine(`${query}&sort=age`, 'technician'))).toEqual(expected);
  });

  it('when filtered by asset or owner, then only theirs come', async () => {
    expect(titles(await listMine(`assetId=${found.e.assetId}`))).toEqual(['E major late']);
    expect(titles(await listMine(`ownerId=${mine.users.engineer.id}&sort=age`))).toEqual(['A safety', 'E major late', 'F minor verified']);
  });

  it('when counted, then open findings per severity for the filter, ignoring the severity filter itself and closed findings', async () => {
    expect((await listMine('')).counts).toEqual({ safety: 1, blocking: 1, major: 2, minor: 1 });
    expect((await listMine('severity=minor')).counts).toEqual({ safety: 1, blocking: 1, major: 2, minor: 1 });
    expect((await listMine('system=thermal')).counts).toEqual({ safety: 0, blocking: 0, major: 2, minor: 0 });
  });

  it.each(['due', 'age', 'updated'])('when paged two at a time by %s, then every finding comes once, in the full order', async (sort) => {
    for (const dir of ['asc', 'desc']) {
      const full = titles(await listMine(`sort=${sort}&dir=${dir}`));
      const seen: string[] = [];
      let cursor: string | null = null;
      do {
        const page: FindingList = await listMine(`sort=${sort}&dir=${dir}&limit=2${cursor ? `&cursor=${cursor}` : ''}`);
        expect(page.items.length).toBeLessThanOrEqual(2);
        seen.push(...titles(page));
        cursor = page.nextCursor;
      } while (cursor);
      expect(seen).toEqual(full);
    }
  });

  it('when a cursor of one sort is used with another, then 400 naming cursor', async () => {
    const page = await listMine('sort=due&limit=1');
    const res = await request(t.app).get(`/api/findings?programId=${mine.program.id}&sort=age&cursor=${page.nextCursor}`).set(mine.auth('lead'));
    expect(res.status).toBe(400);
  });

  it('when a filter value is unknown, then 400 naming it', async () => {
    for (const [query, field] of [['status=closed', 'status'], ['mine=everyone', 'mine'], ['overdue=maybe', 'overdue'], ['sort=priority', 'sort']]) {
      const res = await request(t.app).get(`/api/findings?programId=${mine.program.id}&${query}`).set(mine.auth('lead'));
      expect({ query, status: res.status, fields: Object.keys(res.body.error.details.fields) }).toEqual({ query, status: 400, fields: [field] });
    }
  });
});

describe('comments and photos', () => {
  it('when members comment, then the comments list in order with their authors and the count shows on the finding', async () => {
    const finding = await fileFinding(t, world);
    for (const [role, body] of [['driver', 'Seen on the loop.'], ['engineer', 'Parts ordered, due Thursday.']] as const) {
      const res = await request(t.app).post(`/api/findings/${finding.id}/comments`).set(world.auth(role)).send({ body });
      expect(res.status).toBe(201);
    }
    const res = await request(t.app).get(`/api/findings/${finding.id}/comments`).set(world.auth('technician'));
    const comments = CommentListSchema.parse(res.body).items;
    expect(comments.map((c) => [c.author?.name, c.body])).toEqual([
      [world.users.driver.name, 'Seen on the loop.'],
      [world.users.engineer.name, 'Parts ordered, due Thursday.'],
    ]);
    expect((await request(t.app).get(`/api/findings/${finding.id}`).set(world.auth('lead'))).body.commentCount).toBe(2);
  });

  it('when a comment is empty or too long, then 400 naming body', async () => {
    const finding = await fileFinding(t, world);
    for (const body of ['   ', 'x'.repeat(4001)]) {
      const res = await request(t.app).post(`/api/findings/${finding.id}/comments`).set(world.auth('driver')).send({ body });
      expect(res.status).toBe(400);
      expect(Object.keys(res.body.error.details.fields)).toEqual(['body']);
    }
  });

  it('when a photo is added to a finding, then it is stored with the finding and its asset, readable, and in the history', async () => {
    const finding = await fileFinding(t, world);
    const res = await request(t.app).post(`/api/findings/${finding.id}/photos`).set(world.auth('driver')).attach('photo', await jpeg(), 'leak.jpg');
    expect(res.status).toBe(201);
    const photo = PhotoSchema.parse(res.body);
    expect(photo).toMatchObject({ findingId: finding.id, assetId: world.asset.id, contentType: 'image/jpeg', width: 64, height: 48 });
    const read = await request(t.app).get(`/api/findings/${finding.id}`).set(world.auth('lead'));
    expect(read.body.photos.map((p: { id: string }) => p.id)).toEqual([photo.id]);
    const image = await request(t.app).get(photo.url);
    expect(image.status).toBe(200);
    expect(image.headers['content-type']).toBe('image/jpeg');
    const history = FindingHistorySchema.parse((await request(t.app).get(`/api/findings/${finding.id}/history`).set(world.auth('lead'))).body);
    expect(history.entries[0]).toMatchObject({ action: 'photo-added', after: { photoId: photo.id } });
  });

  it('when the upload is not a photo or has no file, then 415 or 400 and nothing is stored', async () => {
    const finding = await fileFinding(t, world);
    const text = await request(t.app).post(`/api/findings/${finding.id}/photos`).set(world.auth('driver')).attach('photo', Buffer.from('not a photo'), 'x.jpg');
    expect(text.status).toBe(415);
    const none = await request(t.app).post(`/api/findings/${finding.id}/photos`).set(world.auth('driver')).field('note', 'no file');
    expect(none.status).toBe(400);
    expect((await request(t.app).get(`/api/findings/${finding.id}`).set(world.auth('lead'))).body.photos).toEqual([]);
  });
});

describe('e-mail preferences', () => {
  it('when a user reads them first, then every kind is on; after a change, then the change is kept', async () => {
    const user = await makeUser({ role: 'driver', programIds: [world.program.id] });
    const auth = { Authorization: `Bearer ${signToken(t.deps, user)}` };
    expect((await request(t.app).get('/api/me/email-prefs').set(auth)).body).toEqual({ assigned: true, status: true, digest: true, fleet: true });
    const put = await request(t.app).put('/api/me/email-prefs').set(auth).send({ assigned: true, status: false, digest: false, fleet: false });
    expect(put.status).toBe(200);
    expect((await request(t.app).get('/api/me/email-prefs').set(auth)).body).toEqual({ assigned: true, status: false, digest: false, fleet: false });
  });

  it('when the body misses a kind or has an unknown one, then 400 naming it', async () => {
    const missing = await request(t.app).put('/api/me/email-prefs').set(world.auth('driver')).send({ assigned: true, status: true });
    expect(Object.keys(missing.body.error.details.fields)).toEqual(['digest', 'fleet']);
    const unknown = await request(t.app).put('/api/me/email-prefs').set(world.auth('driver')).send({ assigned: true, status: true, digest: true, fleet: true, gate: false });
    expect(Object.keys(unknown.body.error.details.fields)).toEqual(['gate']);
  });
});
