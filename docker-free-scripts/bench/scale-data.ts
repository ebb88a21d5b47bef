// Scale data for `npm run bench`: a program with 5,000 assets and a small one with 50, in the
// bench's own throwaway database (never the user's). Rows go in set-based (generate_series,
// INSERT ... SELECT), so the whole set takes well under two minutes. The spread of values comes
// from hashes of the row ids, so it needs no random seed. Parts whose tables a migration has not
// created yet are skipped and say so.
import bcrypt from 'bcrypt';
import { QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { withCheckDigit } from '../../shared/domain/vin';
import { Program, type Stage } from '../../server/db/models';
import { createDefaultStages } from '../../server/services/stages';

export const BENCH_PASSWORD = 'proofyard-bench';
export const BENCH_EMAIL_DOMAIN = 'bench.example';

export type ProgramData = {
  id: string;
  code: string;
  assets: number;
  stageIds: string[];
  /** A vehicle in the program's middle with findings, software and allocations: the asset measured. */
  sampleAssetId: string;
};

export type ScaleData = {
  big: ProgramData;
  small: ProgramData;
  /** The sign-in of one user per role (all members of both programs). */
  emails: Record<'technician' | 'engineer' | 'coordinator' | 'driver' | 'lead' | 'admin', string>;
  password: string;
  counts: Record<string, number>;
  skipped: string[];
  seconds: number;
};

// ~35 checklist titles per system mix; template items pick from these by position.
const TITLES: Array<[system: string, title: string]> = [
  ['safety', 'Fire extinguisher present and in date'],
  ['safety', 'Emergency stop labelled and tested'],
  ['safety', 'Prototype and HV warning labels fitted'],
  ['safety', 'Seat belts and pretensioners connected'],
  ['high-voltage', 'HV battery pack mounting bolt torque'],
  ['high-voltage', 'HV interlock loop check'],
  ['high-voltage', 'Isolation resistance measurement'],
  ['high-voltage', 'HV connectors seated, secondary locks engaged'],
  ['high-voltage', 'Service disconnect fitted and accessible'],
  ['high-voltage', 'Pre-charge time within limits'],
  ['low-voltage-harness', 'LV harness connector seating (all ECUs)'],
  ['low-voltage-harness', 'CAN bus termination measured'],
  ['low-voltage-harness', '12 V battery and fuse box check'],
  ['low-voltage-harness', 'Ground straps fitted and torqued'],
  ['low-voltage-harness', 'Harness routing and clipping'],
  ['software', 'ECU flash confirm (all ECUs at baseline)'],
  ['software', 'Fault memory read out and cleared'],
  ['software', 'Calibration dataset confirmed'],
  ['software', 'Data logger configuration loaded'],
  ['thermal', 'Coolant fill and bleed'],
  ['thermal', 'Battery coolant loop pressure test'],
  ['thermal', 'Radiator fan function'],
  ['thermal', 'Refrigerant charge'],
  ['chassis', 'Brake bleed and pedal feel'],
  ['chassis', 'Steering column pinch bolt torque'],
  ['chassis', 'Wheel nut torque'],
  ['chassis', 'Tyre pressures set'],
  ['chassis', 'Suspension bolts torqued at ride height'],
  ['chassis', 'Parking brake holds'],
  ['body', 'Lighting check'],
  ['body', 'Door, bonnet and tailgate latches'],
  ['body', 'Windscreen and wipers'],
  ['body', 'Seat rail bolts torque'],
  ['body', 'Underbody panels fitted'],
  ['body', 'Mirrors fitted and adjusted'],
];

const FINDING_TITLES = [
  'HV interlock loop open at rear junction box',
  'Connector CPA will not close',
  'Coolant weep at pump outlet hose',
  'ECU one release behind baseline',
  'Left indicator flashes fast',
  'Seat rail bolt torque mark missing',
  'Radiator fan does not reach 100 %',
  'Rattle from the tailgate at 60 km/h',
  'Long brake pedal travel after bleed',
  'Wiper parks above the cowl',
];

// ECU codes of the scale program; the first seven sit on bench rigs too.
const ECUS = ['FZC', 'RZC', 'BCM', 'INV', 'BMS', 'TMM', 'GWY', 'BRK', 'EPS', 'CCU', 'OBC', 'ACM'];
const BENCH_ECUS = 7;

const LOCATIONS = ['Bay 4', 'Bay 5', 'Climate lab', 'Test loop', 'Parts cage', 'Dyno cell 2'];

/** Which of these tables exist in the database now (the migrations list decides, not this file). */
async function presentTables(sequelize: Sequelize, names: string[]): Promise<Set<string>> {
  // The column is aliased: Sequelize reshapes the rows of a bare "SELECT table_name FROM information_schema.tables".
  const rows = await sequelize.query<{ name: string }>(
    `SELECT table_name::text AS name FROM information_schema.tables WHERE table_schema = 'public' AND table_name::text = ANY($1::text[])`,
    { bind: [names], type: QueryTypes.SELECT },
  );
  return new Set(rows.map((r) => r.name));
}

type Ctx = {
  sequelize: Sequelize;
  transaction: Transaction;
  tables: Set<string>;
  skipped: string[];
  counts: Record<string, number>;
  users: { technicians: string[]; engineers: string[]; drivers: string[]; leads: string[] };
};

const SOFTWARE_TABLES = ['ecus', 'baselines', 'baseline_targets', 'baseline_rules', 'installed_software', 'software_flashes'];
const FLEET_TABLES = ['assignments'];
const VALIDATION_TABLES = ['validation_tests', 'test_allocations'];

/** Runs `sql` and adds the rows it wrote to counts[key]. */
async function run(ctx: Ctx, key: string, sql: string, bind: unknown[]) {
  const started = Date.now();
  const [, affected] = (await ctx.sequelize.query(sql, { bind, transaction: ctx.transaction })) as [unknown, unknown];
  const n = typeof affected === 'number' ? affected : Number((affected as { rowCount?: number })?.rowCount ?? 0);
  ctx.counts[key] = (ctx.counts[key] ?? 0) + n;
  if (process.env.BENCH_VERBOSE) console.log(`bench: scale data: ${key} +${n} in ${Date.now() - started} ms`);
}

function requireTables(ctx: Ctx, part: string, names: string[]): boolean {
  const missing = names.filter((n) => !ctx.tables.has(n));
  if (!missing.length) return true;
  const line = `skipped: ${part} (table ${missing.join(', ')} not present)`;
  ctx.skipped.push(line);
  return false;
}

/** `seed` offsets VIN serials; `dayOffset` puts the program's planned bookings on days of their own (the drivers are shared). */
async function generateProgram(ctx: Ctx, code: string, name: string, nAssets: number, seed: number, dayOffset: number): Promise<ProgramData> {
  const { transaction } = ctx;
  const program = await Program.create({ code, name }, { transaction });
  const stages: Stage[] = await createDefaultStages(program.id, transaction);
  const stageIds = stages.map((s) => s.id);
  const p = program.id;

  // Template items: 26 to 35 per stage (about 30), as the product's template editor stores them.
  await run(
    ctx,
    'template_items',
    `INSERT INTO template_items (program_id, stage_id, system, title, instructions, expected_part_number, expected_revision,
                                 required_for_gate, hv_qualified, position)
     SELECT s.program_id, s.id, ($2::text[])[1 + g]::enum_system, ($3::text[])[1 + g],
            'Follow the work instruction for this item.',
            CASE WHEN g % 3 = 0 THEN '' ELSE $4 || '-' || (10000 + g * 37)::text || '-A' END,
            CASE WHEN g % 3 = 0 THEN '' ELSE lpad((1 + g % 5)::text, 2, '0') END,
            g % 9 <> 8, ($2::text[])[1 + g] = 'high-voltage', g
       FROM stages s CROSS JOIN LATERAL generate_series(0, 25 + s.position * 3) g
      WHERE s.program_id = $1`,
    [p, TITLES.map((t) => t[0]), TITLES.map((t) => t[1]), code],
  );

  // Assets: 70 % vehicles (with a VIN of valid check digit), 20 % bench rigs, 10 % components.
  const kinds = Array.from({ length: nAssets }, (_, i) => ((i + 1) % 10 === 0 ? 'component' : (i + 1) % 10 <= 2 ? 'bench-rig' : 'vehicle'));
  const vins = kinds.map((k, i) => (k === 'vehicle' ? withCheckDigit(`0BX${code.padEnd(5, 'X').slice(0, 5)}0TB${String(seed + i).padStart(6, '0')}`) : null));
  await run(
    ctx,
    'assets',
    `INSERT INTO assets (program_id, tag, kind, stage_id, status, location, vin, odometer_km, build_date, notes, created_by, updated_at)
     SELECT $1::uuid, $2 || '-' || lpad(g::text, 5, '0'), ($3::text[])[g]::enum_assets_kind,
            ($4::uuid[])[1 + (g * 7) % 4],
            (ARRAY['in-build','in-test','available','assigned','down','in-test','available','in-build'])[1 + g % 8]::enum_assets_status,
            ($5::text[])[1 + (g * 13) % ${LOCATIONS.length}],
            ($6::text[])[g],
            CASE WHEN ($3::text[])[g] = 'vehicle' THEN (g * 97) % 24000 ELSE 0 END,
            (now() - ((20 + g % 180) || ' days')::interval)::date,
            CASE WHEN g % 17 = 0 THEN 'Shared with the climate team on Tuesdays.' ELSE '' END,
            $7, now() - ((g * 7919) % (30 * 24 * 60) || ' minutes')::interval
       FROM generate_series(1, $8::int) g`,
    [p, code, kinds, stageIds, LOCATIONS, vins, ctx.users.technicians[0], nAssets],
  );

  // One open stage visit per asset; about one in seven (not on the first stage) also has a closed earlier visit.
  await run(
    ctx,
    'stage_visits',
    `INSERT INTO stage_visits (program_id, asset_id, stage_id, entered_at, left_at, entered_by)
     SELECT a.program_id, a.id, prev.id, now() - interval '90 days', now() - ((1 + (hashtext(a.id::text) & 2147483647) % 35) || ' days')::interval, $2
       FROM assets a JOIN stages s ON s.id = a.stage_id JOIN stages prev ON prev.program_id = s.program_id AND prev.position = s.position - 1
      WHERE a.program_id = $1 AND (hashtext(a.tag) & 2147483647) % 7 = 0`,
    [p, ctx.users.technicians[0]],
  );
  await run(
    ctx,
    'stage_visits',
    `INSERT INTO stage_visits (program_id, asset_id, stage_id, entered_at, entered_by)
     SELECT a.program_id, a.id, a.stage_id, now() - ((1 + (hashtext(a.id::text) & 2147483647) % 35) || ' days')::interval, $2
       FROM assets a WHERE a.program_id = $1`,
    [p, ctx.users.technicians[0]],
  );

  // Checklists, instantiated the way the product's enterStage does (INSERT ... SELECT from the
  // template), then worked: closed visits nearly all passed, open ones part way.
  await run(
    ctx,
    'checklist_items',
    `INSERT INTO checklist_items (id, program_id, asset_id, visit_id, stage_id, template_item_id, system, title, instructions,
                                  expected_part_number, expected_revision, required_for_gate, hv_qualified, position,
                                  state, fitted_part_number, fitted_revision, na_reason, updated_by, updated_at)
     SELECT gen_random_uuid(), t.program_id, v.asset_id, v.id, t.stage_id, t.id, t.system, t.title, t.instructions,
            t.expected_part_number, t.expected_revision, t.required_for_gate, t.hv_qualified, t.position,
            st.state::enum_checklist_items_state,
            CASE WHEN st.state = 'passed' THEN t.expected_part_number ELSE '' END,
            CASE WHEN st.state = 'passed' THEN t.expected_revision ELSE '' END,
            CASE WHEN st.state = 'not-applicable' THEN 'Not fitted on this build variant.' ELSE '' END,
            CASE WHEN st.state = 'open' THEN NULL ELSE ($2::uuid[])[1 + st.h % array_length($2::uuid[], 1)] END,
            v.entered_at + ((st.h % 96) || ' hours')::interval
       FROM stage_visits v
       JOIN template_items t ON t.stage_id = v.stage_id AND NOT t.retired
       CROSS JOIN LATERAL (
         SELECT h, CASE
                  WHEN v.left_at IS NOT NULL THEN CASE WHEN h % 100 < 96 THEN 'passed' ELSE 'not-applicable' END
                  WHEN h % 100 < 55 THEN 'passed'
                  WHEN h % 100 < 60 THEN 'not-applicable'
                  WHEN h % 100 < 63 THEN 'deviation'
                  ELSE 'open' END AS state
           FROM (SELECT (hashtext(v.id::text || t.id::text) & 2147483647) AS h) x
       ) st
      WHERE v.program_id = $1`,
    [p, ctx.users.technicians],
  );

  // Findings: one per deviation (linked to its item), plus one to three more per asset. About
  // three per asset in all, severities and statuses mixed; safety findings are rare and mostly closed.
  const findingCols = `program_id, asset_id, checklist_item_id, title, description, system, severity, status, reject_reason,
                       owner_id, due_date, created_by, created_at, updated_at`;
  const findingValues = (h: string) => `
            CASE WHEN ${h} % 100 < 2 THEN 'safety' WHEN ${h} % 100 < 12 THEN 'blocking' WHEN ${h} % 100 < 50 THEN 'major' ELSE 'minor' END::enum_findings_severity,
            CASE WHEN ${h} % 100 < 2 THEN (CASE WHEN ${h} % 1000 < 8 THEN 'open' ELSE 'verified' END)
                 ELSE (ARRAY['open','open','open','in-work','in-work','fixed','verified','verified','verified','rejected'])[1 + (${h} / 100) % 10] END::enum_findings_status,
            CASE WHEN ${h} % 100 >= 2 AND (${h} / 100) % 10 = 9 THEN 'Not reproducible on the second check.' END,
            ($2::uuid[])[1 + ${h} % array_length($2::uuid[], 1)],
            CASE WHEN (${h} / 7) % 3 = 0 THEN NULL ELSE (now() + (((${h} % 60) - 30) || ' days')::interval)::date END`;
  await run(
    ctx,
    'findings',
    `INSERT INTO findings (${findingCols})
     SELECT ci.program_id, ci.asset_id, ci.id, ($3::text[])[1 + x.h % array_length($3::text[], 1)], 'Found while working the checklist.',
            ci.system, ${findingValues('x.h')}, ci.updated_by, ci.updated_at, ci.updated_at
       FROM checklist_items ci CROSS JOIN LATERAL (SELECT (hashtext(ci.id::text) & 2147483647) AS h) x
      WHERE ci.program_id = $1 AND ci.state = 'deviation'`,
    [p, ctx.users.engineers, FINDING_TITLES],
  );
  await run(
    ctx,
    'findings',
    `INSERT INTO findings (${findingCols})
     SELECT a.program_id, a.id, NULL, ($3::text[])[1 + x.h % array_length($3::text[], 1)], 'Reported from a drive.',
            NULL, ${findingValues('x.h')}, $4, now() - ((x.h % 60) || ' days')::interval, now() - ((x.h % 20) || ' days')::interval
       FROM assets a CROSS JOIN LATERAL generate_series(1, 1 + (hashtext(a.tag) & 2147483647) % 3) g
       CROSS JOIN LATERAL (SELECT (hashtext(a.id::text || g::text) & 2147483647) AS h) x
      WHERE a.program_id = $1`,
    [p, ctx.users.engineers, FINDING_TITLES, ctx.users.technicians[0]],
  );
  await ctx.sequelize.query(
    `UPDATE checklist_items ci SET finding_id = f.id FROM findings f
      WHERE f.checklist_item_id = ci.id AND ci.program_id = $1 AND f.program_id = $1`,
    { bind: [p], transaction },
  );

  await run(
    ctx,
    'history_entries',
    `INSERT INTO history_entries (program_id, entity_type, entity_id, action, actor_id, at, after)
     SELECT a.program_id, 'asset', a.id::text, 'created', $2, now() - interval '200 days', jsonb_build_object('tag', a.tag, 'kind', a.kind)
       FROM assets a WHERE a.program_id = $1`,
    [p, ctx.users.technicians[0]],
  );

  // ECU software: 12 ECUs on vehicles (7 on bench rigs), a released baseline per stage, and
  // what is flashed on each asset: mostly on baseline, some behind, ahead, not comparable or missing.
  if (requireTables(ctx, `software records of ${code}`, SOFTWARE_TABLES)) {
    await run(
      ctx,
      'ecus',
      `INSERT INTO ecus (program_id, name, code, supplier, asset_kinds)
       SELECT $1::uuid, 'ECU ' || c, c, 'Invented supplier ' || (1 + i % 5),
              CASE WHEN i <= ${BENCH_ECUS} THEN ARRAY['bench-rig','vehicle'] ELSE ARRAY['vehicle'] END
         FROM unnest($2::text[]) WITH ORDINALITY AS e(c, i)`,
      [p, ECUS],
    );
    await run(
      ctx,
      'baselines',
      `INSERT INTO baselines (program_id, stage_id, name, release_label, date, status, released_at, released_by, created_by)
       SELECT s.program_id, s.id, s.name || ' release ' || (5 + s.position), 'R' || (5 + s.position),
              (now() - ((10 + s.position) || ' days')::interval)::date, 'released', now() - ((10 + s.position) || ' days')::interval, $2, $2
         FROM stages s WHERE s.program_id = $1`,
      [p, ctx.users.engineers[0]],
    );
    await run(
      ctx,
      'baseline_targets',
      `INSERT INTO baseline_targets (baseline_id, ecu_id, version)
       SELECT b.id, e.id, (1 + (hashtext(e.code) & 2147483647) % 7) || '.' || (2 + (SELECT position FROM stages WHERE id = b.stage_id)) || '.0'
         FROM baselines b JOIN ecus e ON e.program_id = b.program_id WHERE b.program_id = $1`,
      [p],
    );
    await run(
      ctx,
      'baseline_rules',
      `INSERT INTO baseline_rules (baseline_id, position, when_ecu_id, when_min_version, then_ecu_id, range, note)
       SELECT b.id, r.pos, w.id, '0.1.0', t.id, '>=0.1.0', 'Invented rule for the benchmark.'
         FROM baselines b
         CROSS JOIN (VALUES (0, 'FZC', 'BCM'), (1, 'INV', 'BMS')) AS r(pos, w_code, t_code)
         JOIN ecus w ON w.program_id = b.program_id AND w.code = r.w_code
         JOIN ecus t ON t.program_id = b.program_id AND t.code = r.t_code
        WHERE b.program_id = $1`,
      [p],
    );
    // Every flash: about one in five ECUs was flashed twice (the older one first).
    const versionFor = `CASE WHEN x.h % 100 < 85 THEN bt.version
                              WHEN x.h % 100 < 90 THEN split_part(bt.version, '.', 1) || '.' || (split_part(bt.version, '.', 2)::int - 1) || '.0'
                              WHEN x.h % 100 < 94 THEN split_part(bt.version, '.', 1) || '.' || split_part(bt.version, '.', 2) || '.1'
                              ELSE 'B07_RC' || (x.h % 9) END`;
    await run(
      ctx,
      'software_flashes',
      `INSERT INTO software_flashes (program_id, asset_id, ecu_id, software_version, software_number, hardware_number, ecu_serial,
                                     flashed_at, flashed_by, source, note, recorded_by, recorded_at)
       SELECT a.program_id, a.id, e.id, v.version, 'SW-' || e.code || '-' || replace(v.version, '.', ''), 'HW-' || e.code || '-B1',
              e.code || lpad((x.h % 10000000)::text, 10, '0'), v.at, $2, CASE WHEN x.h % 3 = 0 THEN 'manual' ELSE 'import' END::enum_software_source,
              '', $2, v.at + interval '10 minutes'
         FROM assets a
         JOIN ecus e ON e.program_id = a.program_id AND a.kind::text = ANY(e.asset_kinds)
         JOIN baselines b ON b.stage_id = a.stage_id AND b.status = 'released'
         JOIN baseline_targets bt ON bt.baseline_id = b.id AND bt.ecu_id = e.id
         CROSS JOIN LATERAL (SELECT (hashtext(a.id::text || e.code) & 2147483647) AS h) x
         CROSS JOIN LATERAL (
           SELECT ${versionFor} AS version, now() - ((1 + x.h % 20) || ' days')::interval AS at
           UNION ALL
           SELECT split_part(bt.version, '.', 1) || '.0.0', now() - ((30 + x.h % 20) || ' days')::interval WHERE x.h % 5 = 0
         ) v
        WHERE a.program_id = $1 AND x.h % 100 < 97`,
      [p, ctx.users.technicians[0]],
    );
    await run(
      ctx,
      'installed_software',
      `INSERT INTO installed_software (asset_id, ecu_id, program_id, software_version, software_number, hardware_number, ecu_serial,
                                       flashed_at, flashed_by, source, version, updated_at)
       SELECT DISTINCT ON (f.asset_id, f.ecu_id) f.asset_id, f.ecu_id, f.program_id, f.software_version, f.software_number,
              f.hardware_number, f.ecu_serial, f.flashed_at, f.flashed_by, f.source,
              count(*) OVER (PARTITION BY f.asset_id, f.ecu_id) - 1, f.recorded_at
         FROM software_flashes f WHERE f.program_id = $1
        ORDER BY f.asset_id, f.ecu_id, f.flashed_at DESC`,
      [p],
    );
  }

  // Fleet: driver profiles, two returned assignments per vehicle in the past month and a planned
  // one ahead for some, one slot per driver and day so that no booking overlaps.
  if (requireTables(ctx, `assignments of ${code}`, FLEET_TABLES)) {
    await run(
      ctx,
      'assignments',
      `INSERT INTO assignments (program_id, asset_id, driver_id, starts_at, ends_at, purpose, status, created_by)
       SELECT a.program_id, a.id, ($2::uuid[])[1 + (x.h + g) % array_length($2::uuid[], 1)],
              date_trunc('day', now()) - ((g * 9 + x.h % 8) || ' days')::interval + interval '8 hours',
              date_trunc('day', now()) - ((g * 9 + x.h % 8) || ' days')::interval + interval '15 hours',
              (ARRAY['durability-route','ride-handling','climate','demonstration','other'])[1 + (x.h + g) % 5]::enum_assignments_purpose,
              'returned', $3
         FROM assets a CROSS JOIN generate_series(1, 2) g CROSS JOIN LATERAL (SELECT (hashtext(a.id::text) & 2147483647) AS h) x
        WHERE a.program_id = $1 AND a.kind = 'vehicle'`,
      [p, ctx.users.drivers, ctx.users.leads[0]],
    );
    await run(
      ctx,
      'assignments',
      `INSERT INTO assignments (program_id, asset_id, driver_id, starts_at, ends_at, purpose, status, created_by)
       SELECT program_id, id, ($2::uuid[])[1 + rn % array_length($2::uuid[], 1)],
              date_trunc('day', now()) + ((1 + $4::int + rn / array_length($2::uuid[], 1)) || ' days')::interval + interval '8 hours',
              date_trunc('day', now()) + ((1 + $4::int + rn / array_length($2::uuid[], 1)) || ' days')::interval + interval '12 hours',
              'durability-route', 'planned', $3
         FROM (SELECT a.program_id, a.id, (row_number() OVER (ORDER BY a.tag) - 1)::int AS rn
                 FROM assets a WHERE a.program_id = $1 AND a.kind = 'vehicle' AND a.status = 'available') v
        WHERE rn < 600`,
      [p, ctx.users.drivers, ctx.users.leads[0], dayOffset],
    );
  }

  // Validation: a dozen tests per stage; each asset allocated to two tests of its stage.
  if (requireTables(ctx, `validation tests of ${code}`, VALIDATION_TABLES)) {
    await run(
      ctx,
      'validation_tests',
      `INSERT INTO validation_tests (program_id, stage_id, name, procedure_ref, verifies, reliability, confidence, required_samples, created_by)
       SELECT s.program_id, s.id, 'Test ' || lpad(g::text, 2, '0') || ' at ' || s.name, 'PV-' || (100 + g), 'Invented requirement',
              0.9, 0.9, 22, $2
         FROM stages s CROSS JOIN generate_series(1, 12) g WHERE s.program_id = $1`,
      [p, ctx.users.engineers[0]],
    );
    await run(
      ctx,
      'test_allocations',
      `INSERT INTO test_allocations (program_id, test_id, asset_id, status, updated_by)
       SELECT a.program_id, t.id, a.id,
              (ARRAY['planned','running','passed','passed','passed','failed'])[1 + (hashtext(a.id::text || t.id::text) & 2147483647) % 6]::enum_test_allocations_status,
              $2
         FROM assets a
         JOIN LATERAL (SELECT id, row_number() OVER (ORDER BY name) - 1 AS i FROM validation_tests WHERE stage_id = a.stage_id) t
           ON t.i IN ((hashtext(a.tag) & 2147483647) % 12, ((hashtext(a.tag) & 2147483647) + 5) % 12)
        WHERE a.program_id = $1`,
      [p, ctx.users.technicians[0]],
    );
  }

  const [sample] = await ctx.sequelize.query<{ id: string }>(
    `SELECT a.id FROM assets a WHERE a.program_id = $1 AND a.kind = 'vehicle'
        AND EXISTS (SELECT 1 FROM findings f WHERE f.asset_id = a.id)
      ORDER BY a.tag OFFSET $2 LIMIT 1`,
    { bind: [p, Math.floor(nAssets / 2)], type: QueryTypes.SELECT, transaction },
  );
  const [fallback] = sample ? [sample] : await ctx.sequelize.query<{ id: string }>(
    `SELECT id FROM assets WHERE program_id = $1 AND kind = 'vehicle' ORDER BY tag LIMIT 1`,
    { bind: [p], type: QueryTypes.SELECT, transaction },
  );
  return { id: p, code, assets: nAssets, stageIds, sampleAssetId: fallback.id };
}

/**
 * Fills a migrated, empty database. bcryptRounds comes from the bench's configuration (one
 * hash for every bench user).
 */
export async function generateScaleData(sequelize: Sequelize, opts: { bigAssets?: number; smallAssets?: number; bcryptRounds: number }): Promise<ScaleData> {
  const started = Date.now();
  const tables = await presentTables(sequelize, [...SOFTWARE_TABLES, ...FLEET_TABLES, ...VALIDATION_TABLES, 'driver_profiles']);
  const skipped: string[] = [];
  const counts: Record<string, number> = {};
  const passwordHash = await bcrypt.hash(BENCH_PASSWORD, opts.bcryptRounds);

  const result = await sequelize.transaction(async (transaction) => {
    // Bulk statements here may run past the product's 30 s statement timeout on a slow machine.
    await sequelize.query('SET LOCAL statement_timeout = 0', { transaction });
    // The cluster is the bench's own, and its owner a superuser: foreign-key triggers are skipped
    // while generating (every id comes from a join on its parent table, so the rows are consistent
    // by construction), which makes the checklist insert several times faster. Unique and
    // exclusion constraints still hold.
    const [{ rolsuper }] = await sequelize.query<{ rolsuper: boolean }>('SELECT rolsuper FROM pg_roles WHERE rolname = current_user', {
      type: QueryTypes.SELECT,
      transaction,
    });
    if (rolsuper) await sequelize.query("SET LOCAL session_replication_role = 'replica'", { transaction });
    // People: the six role accounts plus a crew big enough for the owners, drivers and bookings.
    const crew: Array<[role: string, n: number]> = [
      ['technician', 12],
      ['engineer', 8],
      ['coordinator', 2],
      ['driver', 40],
      ['lead', 3],
      ['admin', 1],
    ];
    const users = await sequelize.query<{ id: string; role: string; email: string }>(
      `INSERT INTO users (id, email, name, role, password_hash, created_at, updated_at)
       SELECT gen_random_uuid(), CASE WHEN g = 1 THEN c.role ELSE c.role || g END || '@${BENCH_EMAIL_DOMAIN}',
              initcap(c.role) || ' ' || g, c.role::enum_users_role, $3, now(), now()
         FROM unnest($1::text[], $2::int[]) AS c(role, n) CROSS JOIN LATERAL generate_series(1, c.n) g
       RETURNING id, role, email`,
      { bind: [crew.map((c) => c[0]), crew.map((c) => c[1]), passwordHash], type: QueryTypes.SELECT, transaction },
    );
    counts.users = users.length;
    const byRole = (role: string) => users.filter((u) => u.role === role).map((u) => u.id);
    const ctx: Ctx = {
      sequelize,
      transaction,
      tables,
      skipped,
      counts,
      users: { technicians: byRole('technician'), engineers: byRole('engineer'), drivers: byRole('driver'), leads: byRole('lead') },
    };
    if (tables.has('driver_profiles')) {
      await run(
        ctx,
        'driver_profiles',
        `INSERT INTO driver_profiles (user_id, driving_level, hv_awareness, hv_awareness_date, licence_expiry)
         SELECT id, 1 + (hashtext(id::text) & 2147483647) % 3, true, (now() - interval '200 days')::date, (now() + interval '400 days')::date
           FROM users WHERE role = 'driver'`,
        [],
      );
    } else skipped.push('skipped: driver profiles (table driver_profiles not present)');

    const big = await generateProgram(ctx, 'BX', 'Bench scale program (5,000 assets)', opts.bigAssets ?? 5000, 100, 0);
    const small = await generateProgram(ctx, 'BS', 'Bench small program (50 assets)', opts.smallAssets ?? 50, 900_000, 60);
    // Everyone works on the big program; the role accounts belong to the small one too.
    await sequelize.query(
      `INSERT INTO program_members (program_id, user_id, created_at) SELECT $1::uuid, id, now() FROM users
       UNION ALL SELECT $2::uuid, id, now() FROM users WHERE email LIKE '%@${BENCH_EMAIL_DOMAIN}' AND email !~ '[0-9]@'`,
      { bind: [big.id, small.id], transaction },
    );
    const emails = Object.fromEntries(crew.map(([role]) => [role, `${role}@${BENCH_EMAIL_DOMAIN}`])) as ScaleData['emails'];
    return { big, small, emails };
  });
  // Fresh statistics, as autovacuum would have gathered on a database that grew to this size.
  await sequelize.query('ANALYZE');
  return { ...result, password: BENCH_PASSWORD, counts, skipped, seconds: (Date.now() - started) / 1000 };
}
