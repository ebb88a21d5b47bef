import request from 'supertest';
import type { Role } from '../../shared/schemas/auth';
import type { AssetDetail } from '../../shared/schemas/assets';
import type { Assignment, CreateAssignment } from '../../shared/schemas/fleet';
import { createAsset, makeWorld, type World } from './assets';
import { makeUser, uid, type makeTestApp } from './test-app';
import { signToken } from '../../server/middleware/auth';

type TestApp = ReturnType<typeof makeTestApp>;

const HOUR = 3600_000;
/** An ISO instant `hours` from now. */
export const inHours = (hours: number) => new Date(Date.now() + hours * HOUR).toISOString();
/** An ISO date `days` from today (UTC). */
export const dayIn = (days: number) => new Date(Date.now() + days * 24 * HOUR).toISOString().slice(0, 10);

/**
 * A program of its own (makeWorld: one member per role) with vehicles on the early-prototype
 * stage (level 2 needed), all available, and the world's driver at level 2 with a licence valid
 * for years. Fleet and finding e-mails are muted unless `mail` is true (the shared SMTP fake is slow).
 */
export async function makeFleetWorld(t: TestApp, opts: { mail?: boolean; vehicles?: number } = {}) {
  const world = await makeWorld(t);
  const vehicles: AssetDetail[] = [];
  for (let i = 0; i < (opts.vehicles ?? 3); i += 1) {
    vehicles.push(await createAsset(t, world, { stageId: world.stages[2].id, status: 'available', odometerKm: 1000 + i * 100, tag: `FL-${uid()}` }));
  }
  await setProfile(t, world, world.users.driver.id, { drivingLevel: 2, licenceExpiry: dayIn(900) });
  if (!opts.mail) await muteMail(t, Object.values(world.users).map((u) => u.id));
  return { ...world, vehicles };
}
export type FleetWorld = Awaited<ReturnType<typeof makeFleetWorld>>;

export async function muteMail(t: TestApp, ids: string[]) {
  await t.sequelize.query(
    `UPDATE users SET email_prefs = '{"assigned": false, "status": false, "digest": false, "fleet": false}' WHERE id = ANY($1::uuid[])`,
    { bind: [ids] },
  );
}

/** Another person of the world's program who drives, with a profile. */
export async function addDriver(t: TestApp, world: World, profile: Partial<{ drivingLevel: number; licenceExpiry: string | null }> = {}, mute = true) {
  const user = await makeUser({ role: 'driver', programIds: [world.program.id] });
  await setProfile(t, world, user.id, { drivingLevel: 2, licenceExpiry: dayIn(900), ...profile });
  if (mute) await muteMail(t, [user.id]);
  return { user, token: signToken(t.deps, user), auth: { Authorization: `Bearer ${signToken(t.deps, user)}` } };
}

/** Creates or replaces a driver profile directly (the API has its own tests). */
export async function setProfile(t: TestApp, _world: World, userId: string, p: { drivingLevel: number; licenceExpiry: string | null }) {
  await t.sequelize.query(
    `INSERT INTO driver_profiles (user_id, driving_level, licence_expiry, version) VALUES ($1, $2, $3, 1)
     ON CONFLICT (user_id) DO UPDATE SET driving_level = $2, licence_expiry = $3, version = driver_profiles.version + 1`,
    { bind: [userId, p.drivingLevel, p.licenceExpiry] },
  );
}

export function book(t: TestApp, world: FleetWorld, fields: Partial<CreateAssignment> = {}, role: Role = 'coordinator') {
  return request(t.app)
    .post('/api/assignments')
    .set(world.auth(role))
    .send({
      programId: world.program.id,
      assetId: world.vehicles[0].id,
      driverId: world.users.driver.id,
      startsAt: inHours(48),
      endsAt: inHours(56),
      purpose: 'ride-handling',
      ...fields,
    });
}

/** Books through the API and returns the assignment (fails the test on any other answer). */
export async function booked(t: TestApp, world: FleetWorld, fields: Partial<CreateAssignment> = {}): Promise<Assignment> {
  const res = await book(t, world, fields);
  if (res.status !== 201) throw new Error(`booking failed: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as Assignment;
}

export const reasonCodes = (body: { error?: { details?: { reasons?: Array<{ code: string }> } } }) =>
  (body.error?.details?.reasons ?? []).map((r) => r.code);
