import request from 'supertest';
import type { Checklist } from '../../shared/schemas/assets';
import type { Role } from '../../shared/schemas/auth';
import type { Finding } from '../../shared/schemas/findings';
import type { GateReview } from '../../shared/schemas/readiness';
import { addDays } from '../../shared/domain/trend';
import type { World } from './assets';
import type { makeTestApp } from './test-app';

type TestApp = ReturnType<typeof makeTestApp>;

/** Mutes every finding e-mail of the world's people (gate decisions go to all members whatever the preferences). */
export async function muteWorld(t: TestApp, world: World) {
  await t.sequelize.query(`UPDATE users SET email_prefs = '{"assigned": false, "status": false, "digest": false, "fleet": false}' WHERE id = ANY($1::uuid[])`, {
    bind: [Object.values(world.users).map((u) => u.id)],
  });
}

/**
 * Drops the world's queued gate-decision mail before the outbox loop sees it: tests that do not
 * check mail keep the shared SMTP fake quiet (it delivers a few messages a second).
 */
export async function dropGateMail(t: TestApp, world: World) {
  await t.sequelize.query(`DELETE FROM outbox_messages WHERE kind = 'gate-decision' AND status = 'pending' AND to_address = ANY($1::text[])`, {
    bind: [Object.values(world.users).map((u) => u.email)],
  });
}

/** Files a finding through the API as the technician (no owner: no mail) and returns it. */
export async function addFinding(t: TestApp, world: World, assetId: string, severity: Finding['severity'], title = `${severity} finding`): Promise<Finding> {
  const res = await request(t.app).post('/api/findings').set(world.auth('technician')).send({ assetId, title, severity });
  if (res.status !== 201) throw new Error(`finding create failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as Finding;
}

/** Sets a finding's due date directly (the API refuses past dates, rightly). */
export async function setDueDate(t: TestApp, findingId: string, dueDate: string | null) {
  await t.sequelize.query(`UPDATE findings SET due_date = $2 WHERE id = $1`, { bind: [findingId, dueDate] });
}

/** Marks the first `n` required items of the asset's open checklist passed, through the API. */
export async function passRequired(t: TestApp, world: World, assetId: string, n: number) {
  const checklist = (await request(t.app).get(`/api/assets/${assetId}/checklist`).set(world.auth('technician'))).body as Checklist;
  const required = checklist.groups.flatMap((g) => g.items).filter((i) => i.requiredForGate).slice(0, n);
  for (const item of required) {
    const res = await request(t.app).patch(`/api/checklist-items/${item.id}`).set(world.auth('technician')).send({ state: 'passed', version: item.version });
    if (res.status !== 200) throw new Error(`checklist item failed: ${res.status} ${JSON.stringify(res.body)}`);
  }
  return checklist.groups.flatMap((g) => g.items).filter((i) => i.requiredForGate);
}

/** Daily stage snapshot rows written directly: `loads[i]` on the day `loads.length - 1 - i` days before `today`. */
export async function insertStageSeries(t: TestApp, world: World, stageId: string, today: string, loads: number[]) {
  await t.sequelize.query(
    `INSERT INTO readiness_snapshots (snapshot_date, program_id, stage_id, asset_id, score, open_findings_load, asset_count, counts)
     SELECT d::date, $1, $2, NULL, 70, l, 2, '{"go":0,"conditional":1,"noGo":1}'::jsonb FROM unnest($3::text[], $4::float8[]) AS t(d, l)
     ON CONFLICT (snapshot_date, stage_id) WHERE asset_id IS NULL DO UPDATE SET open_findings_load = EXCLUDED.open_findings_load`,
    { bind: [world.program.id, stageId, loads.map((_, i) => addDays(today, i - (loads.length - 1))), loads] },
  );
}

/** Opens a gate review of `stageId` as the lead (unless told) and returns it. */
export async function openReview(t: TestApp, world: World, stageId: string, fields: object = {}, role: Role = 'lead'): Promise<GateReview> {
  const res = await request(t.app).post('/api/gate-reviews').set(world.auth(role)).send({ stageId, ...fields });
  if (res.status !== 201) throw new Error(`review open failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as GateReview;
}
