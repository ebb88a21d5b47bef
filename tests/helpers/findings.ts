import request from 'supertest';
import type { Role } from '../../shared/schemas/auth';
import type { AssetDetail } from '../../shared/schemas/assets';
import type { CreateFinding, Finding } from '../../shared/schemas/findings';
import { createAsset, makeWorld, type World } from './assets';
import { type makeTestApp } from './test-app';

type TestApp = ReturnType<typeof makeTestApp>;

/** A program of its own (one member per role, see makeWorld) with one vehicle asset. */
export async function makeFindingWorld(t: TestApp): Promise<World & { asset: AssetDetail }> {
  const world = await makeWorld(t);
  const asset = await createAsset(t, world);
  return { ...world, asset };
}
export type FindingWorld = Awaited<ReturnType<typeof makeFindingWorld>>;

/** Files a finding through the API (as the technician unless told) and returns it. */
export async function fileFinding(
  t: TestApp,
  world: FindingWorld,
  fields: Partial<CreateFinding> = {},
  role: Role = 'technician',
): Promise<Finding> {
  const res = await request(t.app)
    .post('/api/findings')
    .set(world.auth(role))
    .send({ assetId: world.asset.id, title: 'Coolant weep at rear chiller union', severity: 'major', ...fields });
  if (res.status !== 201) throw new Error(`finding create failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as Finding;
}

/** PATCHes a finding with its current version and the changes. */
export function patchFinding(t: TestApp, world: FindingWorld, finding: Pick<Finding, 'id' | 'version'>, changes: object, role: Role) {
  return request(t.app).patch(`/api/findings/${finding.id}`).set(world.auth(role)).send({ version: finding.version, ...changes });
}

/** Moves a finding along `steps` (each as the given role), returning the last answer's body. */
export async function walk(t: TestApp, world: FindingWorld, finding: Finding, steps: Array<[string, Role, string?]>): Promise<Finding> {
  let current = finding;
  for (const [status, role, reason] of steps) {
    const res = await patchFinding(t, world, current, { status, ...(reason ? { reason } : {}) }, role);
    if (res.status !== 200) throw new Error(`move to ${status} as ${role} failed: ${res.status} ${JSON.stringify(res.body)}`);
    current = res.body as Finding;
  }
  return current;
}

export async function historyOf(t: TestApp, findingId: string): Promise<Array<{ action: string; before: Record<string, unknown> | null; after: Record<string, unknown> | null; note: string | null; actor_id: string }>> {
  const [rows] = (await t.sequelize.query(
    `SELECT action, before, after, note, actor_id FROM history_entries WHERE entity_type = 'finding' AND entity_id = $1 ORDER BY id`,
    { bind: [findingId] },
  )) as [Array<{ action: string; before: Record<string, unknown> | null; after: Record<string, unknown> | null; note: string | null; actor_id: string }>, unknown];
  return rows;
}

/** Mail queued in the outbox to `to` (the decision to send; delivery is the outbox loop's job). */
export async function queuedMail(t: TestApp, to: string, kind?: string): Promise<Array<{ subject: string; text: string; kind: string }>> {
  const [rows] = (await t.sequelize.query(
    `SELECT subject, text, kind FROM outbox_messages WHERE to_address = $1 ${kind ? 'AND kind = $2' : ''} ORDER BY created_at`,
    { bind: kind ? [to, kind] : [to] },
  )) as [Array<{ subject: string; text: string; kind: string }>, unknown];
  return rows;
}

/**
 * Turns every finding e-mail off for the world's people: tests that do not check mail keep the
 * shared outbox short (the SMTP fake delivers a few per second, and other tests wait behind it).
 */
export async function muteFindingMail(t: TestApp, world: FindingWorld) {
  await t.sequelize.query(`UPDATE users SET email_prefs = '{"assigned": false, "status": false, "digest": false}' WHERE id = ANY($1::uuid[])`, {
    bind: [Object.values(world.users).map((u) => u.id)],
  });
}

/** An ISO date `days` from today (UTC). */
export const dateIn = (days: number) => new Date(Date.now() + days * 24 * 3600 * 1000).toISOString().slice(0, 10);
