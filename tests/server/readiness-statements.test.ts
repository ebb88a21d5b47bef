import request from 'supertest';
import type { ProgramReadiness } from '../../shared/schemas/readiness';
import { createAsset } from '../helpers/assets';
import { muteWorld } from '../helpers/readiness';
import { makeSoftwareWorld, type SoftwareWorld } from '../helpers/software';
import { countStatements, makeTestApp, uid } from '../helpers/test-app';
import { planTest } from '../helpers/validation';

const t = makeTestApp();
afterAll(() => t.close());

/**
 * A program with `n` vehicles over two stages, each with a worked checklist, open findings of every
 * severity (one past due), installed software and a validation allocation. The bulk rows go in
 * with SQL: the statement count of the roll-up is under test, not the write paths.
 */
async function programWith(n: number): Promise<SoftwareWorld> {
  const world = await makeSoftwareWorld(t);
  await muteWorld(t, world);
  const tests = [await planTest(t, world, { stageId: world.stages[1].id }), await planTest(t, world, { stageId: world.stages[2].id })];
  const ids: string[] = [];
  for (let i = 0; i < n; i += 1) {
    const stage = world.stages[1 + (i % 2)];
    ids.push((await createAsset(t, world, { stageId: stage.id, tag: `ST-${uid()}` })).id);
  }
  const q = (sql: string, bind: unknown[]) => t.sequelize.query(sql, { bind });
  await q(`UPDATE checklist_items SET state = 'passed' WHERE asset_id = ANY($1::uuid[]) AND position = 0`, [ids]);
  await q(
    `INSERT INTO findings (program_id, asset_id, title, severity, status, due_date, created_by)
     SELECT $1, a.id, 'Finding ' || s.sev, s.sev::enum_findings_severity, 'open', CASE WHEN s.sev = 'major' THEN current_date - 3 END, $3
       FROM unnest($2::uuid[]) AS a(id) CROSS JOIN (VALUES ('blocking'), ('major'), ('minor'), ('safety')) AS s(sev)
      WHERE s.sev <> 'safety' OR a.id = ($2::uuid[])[1]`,
    [world.program.id, ids, world.users.technician.id],
  );
  await q(
    `INSERT INTO installed_software (asset_id, ecu_id, program_id, software_version, flashed_at, source)
     SELECT a.id, e.id, $1, CASE WHEN e.code = 'INV' THEN '2.2.0' ELSE t.version END, now(), 'manual'
       FROM unnest($2::uuid[]) AS a(id) CROSS JOIN ecus e JOIN baseline_targets t ON t.ecu_id = e.id AND t.baseline_id = $3
      WHERE e.program_id = $1`,
    [world.program.id, ids, world.baseline.id],
  );
  await q(
    `INSERT INTO test_allocations (program_id, test_id, asset_id, status, updated_by)
     SELECT $1, CASE WHEN a.stage_id = $3 THEN $4::uuid ELSE $5::uuid END, a.id, CASE WHEN row_number() OVER (ORDER BY a.id) % 2 = 0 THEN 'passed' ELSE 'running' END::enum_test_allocations_status, $6
       FROM assets a WHERE a.id = ANY($2::uuid[])`,
    [world.program.id, ids, world.stages[1].id, tests[0].id, tests[1].id, world.users.engineer.id],
  );
  return world;
}

describe('the roll-up reads a fixed number of SQL statements', () => {
  it('when a program has 5 and then 25 assets with checklists, findings, software and tests, then the roll-up sends as many statements for both', async () => {
    const small = await programWith(5);
    const large = await programWith(25);
    const counted = async (world: SoftwareWorld) => {
      let body: ProgramReadiness | undefined;
      const { count, statements } = await countStatements(t, async () => {
        const res = await request(t.app).get(`/api/programs/${world.program.id}/readiness`).set(world.auth('lead'));
        expect(res.status).toBe(200);
        body = res.body;
      });
      return { count, statements, body: body! };
    };
    const five = await counted(small);
    const twentyFive = await counted(large);
    expect(five.body.stages.reduce((s, x) => s + x.assetCount, 0)).toBe(5);
    expect(twentyFive.body.stages.reduce((s, x) => s + x.assetCount, 0)).toBe(25);
    // Every part is present in the figures, so no statement was skipped for want of rows.
    const car = twentyFive.body.stages.find((s) => s.name === 'Integration car')!;
    expect(car.blockers.map((b) => b.kind)).toEqual(['not-cleared', 'blocking-findings', 'required-items', 'ecus-off-baseline', 'tests-not-passed']);
    expect(twentyFive.count).toBe(five.count);
    // Authentication (1), stages, assets, findings, ECU catalogue, baselines, validation, stage snapshots (7).
    expect(five.count).toBe(8);
  });

  it('when one asset\'s readiness is asked, then it takes the same fixed statements (no per-item queries)', async () => {
    const world = await programWith(5);
    const [asset] = (await t.sequelize.query(`SELECT id FROM assets WHERE program_id = $1 LIMIT 1`, { bind: [world.program.id] }))[0] as Array<{ id: string }>;
    const { count } = await countStatements(t, () => request(t.app).get(`/api/assets/${asset.id}/readiness`).set(world.auth('lead')));
    // Authentication, the asset lookup (404 check), then the six figure statements.
    expect(count).toBe(8);
  });
});
