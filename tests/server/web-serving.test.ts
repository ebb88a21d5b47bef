import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { createApp } from '../../server/app';
import { makeTestApp } from '../helpers/test-app';

const t = makeTestApp();
afterAll(() => t.close());

describe('serving the web app', () => {
  const dist = fs.mkdtempSync(path.join(os.tmpdir(), 'proofyard-dist-'));
  fs.writeFileSync(path.join(dist, 'index.html'), '<!doctype html><title>Proofyard</title>');
  fs.mkdirSync(path.join(dist, 'assets'));
  fs.writeFileSync(path.join(dist, 'assets', 'font.ttf'), 'font');
  const { app } = createApp(t.deps, { webDist: dist });

  it('when /assets is opened (a route and also a build folder), then the app page answers at once without a redirect', async () => {
    const res = await request(app).get('/assets');
    expect(res.status).toBe(200);
    expect(res.text).toContain('<title>Proofyard</title>');
  });

  it('when a deep link is opened, then the app page answers and an unknown API path still answers JSON 404', async () => {
    expect((await request(app).get('/assets/abc/checklist')).text).toContain('Proofyard');
    const api = await request(app).get('/api/not-a-route');
    expect(api.status).toBe(404);
    expect(api.body.error.code).toBe('request/no-route');
  });

  it('when a built file is asked for, then it is served', async () => {
    const res = await request(app).get('/assets/font.ttf');
    expect(res.status).toBe(200);
  });
});
