import request from 'supertest';
import { TemplateItem } from '../../server/db/models';
import { signToken } from '../../server/middleware/auth';
import { createDefaultStages } from '../../server/services/stages';
import type { Role } from '../../shared/schemas/auth';
import type { AssetDetail, System } from '../../shared/schemas/assets';
import { makeProgram, makeUser, uid, type makeTestApp } from './test-app';

type TestApp = ReturnType<typeof makeTestApp>;
export const WORKING_ROLES = ['technician', 'engineer', 'coordinator', 'driver', 'lead'] as const;

/** Template items the tests put on the first two stages: systems out of order on purpose. */
export const BENCH_TEMPLATE: Array<{ system: System; title: string; requiredForGate?: boolean; hvQualified?: boolean }> = [
  { system: 'software', title: 'ECU flash confirm' },
  { system: 'high-voltage', title: 'HV interlock loop check', hvQualified: true },
  { system: 'safety', title: 'Emergency stop labelled' },
  { system: 'high-voltage', title: 'Isolation resistance measurement', hvQualified: true },
  { system: 'body', title: 'Rig enclosure closed', requiredForGate: false },
];
export const CAR_TEMPLATE: Array<{ system: System; title: string }> = [
  { system: 'chassis', title: 'Brake bleed and pedal feel' },
  { system: 'chassis', title: 'Steering column torque' },
  { system: 'thermal', title: 'Coolant fill and bleed' },
];

/**
 * A program of its own with the default stages, a small checklist template on the first two
 * stages, one member per role and their tokens (signed directly: sign-in has its own tests).
 */
export async function makeWorld(t: TestApp) {
  const program = await makeProgram('Asset test program');
  const stages = await t.sequelize.transaction((transaction) => createDefaultStages(program.id, transaction));
  await TemplateItem.bulkCreate([
    ...BENCH_TEMPLATE.map((item, position) => ({
      programId: program.id,
      stageId: stages[0].id,
      instructions: '',
      expectedPartNumber: `T-${position}`,
      expectedRevision: 'A',
      requiredForGate: item.requiredForGate ?? true,
      hvQualified: item.hvQualified ?? false,
      position,
      system: item.system,
      title: item.title,
    })),
    ...CAR_TEMPLATE.map((item, position) => ({
      programId: program.id,
      stageId: stages[1].id,
      instructions: '',
      expectedPartNumber: '',
      expectedRevision: '',
      requiredForGate: true,
      hvQualified: false,
      position,
      ...item,
    })),
  ]);
  const users = {} as Record<Role, Awaited<ReturnType<typeof makeUser>>>;
  const tokens = {} as Record<Role, string>;
  for (const role of [...WORKING_ROLES, 'admin'] as const) {
    users[role] = await makeUser({ role, programIds: [program.id] });
    tokens[role] = signToken(t.deps, users[role]);
  }
  const auth = (role: Role) => ({ Authorization: `Bearer ${tokens[role]}` });
  return { program, stages, users, tokens, auth };
}
export type World = Awaited<ReturnType<typeof makeWorld>>;

/** Creates an asset through the API (as the lead unless told) and returns its detail. */
export async function createAsset(t: TestApp, world: World, fields: Record<string, unknown> = {}, role: Role = 'lead'): Promise<AssetDetail> {
  const res = await request(t.app)
    .post('/api/assets')
    .set(world.auth(role))
    .send({ programId: world.program.id, tag: `T-${uid()}`, kind: 'vehicle', stageId: world.stages[0].id, ...fields });
  if (res.status !== 201) throw new Error(`asset create failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as AssetDetail;
}
