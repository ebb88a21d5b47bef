import request from 'supertest';
import { signToken } from '../../server/middleware/auth';
import type { Role } from '../../shared/schemas/auth';
import type { AssetDetail } from '../../shared/schemas/assets';
import type { Baseline, Ecu } from '../../shared/schemas/software';
import { createAsset, makeWorld, type World } from './assets';
import type { makeTestApp } from './test-app';

type TestApp = ReturnType<typeof makeTestApp>;

/** The product's own example rule (PRODUCT.md section 3D): FZC at 4.2.0 or later needs BCM within >=3.1.0 <4. */
export const EXAMPLE_RULE = { when: 'FZC', whenMinVersion: '4.2.0', then: 'BCM', range: '>=3.1.0 <4' };
export const TARGETS: Record<string, string> = { FZC: '4.2.1', BCM: '3.2.0', INV: '2.3.0', CAM: 'CAM_SW_0412' };

/**
 * A program of its own (one member per role, see makeWorld) with four ECUs (CAM only on
 * vehicles) and a released baseline on the integration car stage (stages[1]) holding TARGETS and
 * EXAMPLE_RULE.
 */
export async function makeSoftwareWorld(t: TestApp) {
  const world = await makeWorld(t);
  const ecus: Record<string, Ecu> = {};
  for (const code of ['FZC', 'BCM', 'INV', 'CAM']) {
    const res = await request(t.app)
      .post('/api/ecus')
      .set(world.auth('engineer'))
      .send({ programId: world.program.id, code, name: `${code} controller`, supplier: 'Test supplier', assetKinds: code === 'CAM' ? ['vehicle'] : ['vehicle', 'bench-rig'] });
    if (res.status !== 201) throw new Error(`ECU create failed: ${res.status} ${JSON.stringify(res.body)}`);
    ecus[code] = res.body as Ecu;
  }
  const baseline = await makeBaseline(t, world, ecus, world.stages[1].id, TARGETS, true);
  return { ...world, ecus, baseline, stage: world.stages[1] };
}
export type SoftwareWorld = Awaited<ReturnType<typeof makeSoftwareWorld>>;

export async function makeBaseline(
  t: TestApp,
  world: World,
  ecus: Record<string, Ecu>,
  stageId: string,
  targets: Record<string, string>,
  release: boolean,
  name = 'Test release',
): Promise<Baseline> {
  const res = await request(t.app)
    .post('/api/baselines')
    .set(world.auth('engineer'))
    .send({
      programId: world.program.id,
      stageId,
      name,
      releaseLabel: 'R1',
      date: '2026-11-30',
      targets: Object.entries(targets).map(([code, version]) => ({ ecuId: ecus[code].id, version })),
      rules: [{ whenEcuId: ecus[EXAMPLE_RULE.when].id, whenMinVersion: EXAMPLE_RULE.whenMinVersion, thenEcuId: ecus[EXAMPLE_RULE.then].id, range: EXAMPLE_RULE.range }],
    });
  if (res.status !== 201) throw new Error(`baseline create failed: ${res.status} ${JSON.stringify(res.body)}`);
  if (!release) return res.body as Baseline;
  const released = await request(t.app).post(`/api/baselines/${res.body.id}/release`).set(world.auth('engineer')).send({ version: res.body.version });
  if (released.status !== 200) throw new Error(`baseline release failed: ${released.status} ${JSON.stringify(released.body)}`);
  return released.body as Baseline;
}

/** A vehicle on the integration car stage (the one with the released baseline). */
export function softwareAsset(t: TestApp, world: SoftwareWorld, fields: Record<string, unknown> = {}): Promise<AssetDetail> {
  return createAsset(t, world, { stageId: world.stage.id, kind: 'vehicle', ...fields });
}

/** Records versions on an asset (ECU code -> version) through the manual flash route. */
export async function flash(t: TestApp, world: SoftwareWorld, assetId: string, versions: Record<string, string>, role: Role = 'technician') {
  let last: request.Response | undefined;
  for (const [code, softwareVersion] of Object.entries(versions)) {
    last = await request(t.app).put(`/api/assets/${assetId}/software/${world.ecus[code].id}`).set(world.auth(role)).send({ softwareVersion });
    if (last.status !== 200) throw new Error(`flash failed: ${last.status} ${JSON.stringify(last.body)}`);
  }
  return last!;
}

/** A bearer token of a demo account and its first program (the demo data is loaded once before the tests). */
export async function demoSession(t: TestApp, email: string) {
  const [rows] = (await t.sequelize.query(
    `SELECT u.id, u.token_version, pm.program_id FROM users u JOIN program_members pm ON pm.user_id = u.id WHERE u.email = $1`,
    { bind: [email] },
  )) as [Array<{ id: string; token_version: number; program_id: string }>, unknown];
  if (!rows.length) throw new Error(`no demo account ${email}: the demo data is not loaded (npm test loads it before the tests)`);
  return { programId: rows[0].program_id, auth: { Authorization: `Bearer ${signToken(t.deps, { id: rows[0].id, tokenVersion: rows[0].token_version })}` } };
}
