import request from 'supertest';
import type { Role } from '../../shared/schemas/auth';
import type { Campaign, CreateCampaign, CreateValidationTest, ValidationTest } from '../../shared/schemas/validation';
import type { World } from './assets';
import { uid, type makeTestApp } from './test-app';

type TestApp = ReturnType<typeof makeTestApp>;

/** Plans a validation test on the world's third stage (as the engineer unless told); R 0.9, C 0.9 unless given. */
export async function planTest(t: TestApp, world: World, fields: Partial<CreateValidationTest> = {}, role: Role = 'engineer'): Promise<ValidationTest> {
  const res = await request(t.app)
    .post('/api/validation/tests')
    .set(world.auth(role))
    .send({
      stageId: world.stages[2].id,
      name: `Damp heat cyclic ${uid()}`,
      procedureRef: 'IEC 60068-2-30 Db',
      reliability: 0.9,
      confidence: 0.9,
      ...fields,
    });
  if (res.status !== 201) throw new Error(`test create failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as ValidationTest;
}

/** Allocates an asset to a test as the engineer; answers the whole test. */
export async function allocate(t: TestApp, world: World, testId: string, assetId: string): Promise<ValidationTest> {
  const res = await request(t.app).post(`/api/validation/tests/${testId}/allocations`).set(world.auth('engineer')).send({ assetId });
  if (res.status !== 201) throw new Error(`allocation failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as ValidationTest;
}

/** The demo's climate sequence, shortened: soak, ramp, damp heat, a cold step after it. */
export const CLIMATE_STEPS: CreateCampaign['steps'] = [
  { name: 'Cold soak -20 °C', durationHours: 12, temperatureC: -20 },
  { name: 'Ramp to 40 °C', durationHours: 2, temperatureC: 40 },
  { name: 'Damp heat 40 °C 85 %RH', durationHours: 48, temperatureC: 40, humidityPct: 85 },
  { name: 'Cold step -10 °C', durationHours: 8, temperatureC: -10 },
];

/** Creates a campaign on an asset (as the technician unless told). */
export async function startCampaign(
  t: TestApp,
  world: World,
  assetId: string,
  fields: Partial<CreateCampaign> = {},
  role: Role = 'technician',
): Promise<Campaign> {
  const res = await request(t.app)
    .post(`/api/assets/${assetId}/campaigns`)
    .set(world.auth(role))
    .send({ name: 'Drive unit climate sequence', kind: 'climate', steps: CLIMATE_STEPS, ...fields });
  if (res.status !== 201) throw new Error(`campaign create failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as Campaign;
}
