// Demo ECU software of the fictional FW3 program (PRODUCT.md section 8, issue 5): a dozen ECUs
// from invented suppliers, baselines for the integration car and early prototype stages (one
// superseded) and a draft for the validation build, compatibility rules, and what is flashed on
// every vehicle and bench rig, with earlier flashes in the history. The mix is set by hand so
// that the walkthrough finds each status: behind, ahead, missing, not comparable and broken
// rules. Everything here is invented; the same plan builds assets/demo/ecu-readout-sample.*.
import crypto from 'node:crypto';
import { QueryTypes, type Transaction } from 'sequelize';
import type { AssetKind } from '../../../shared/schemas/assets';
import { Asset, Baseline, BaselineRule, BaselineTarget, Ecu, HistoryEntry, Stage, type Program, type User } from '../models';

const BENCH_AND_VEHICLE: AssetKind[] = ['bench-rig', 'vehicle'];
const VEHICLE: AssetKind[] = ['vehicle'];

export const DEMO_ECUS: Array<{ code: string; name: string; supplier: string; kinds: AssetKind[]; notes?: string }> = [
  { code: 'FZC', name: 'Front zone controller', supplier: 'Harrowgate Electronics', kinds: BENCH_AND_VEHICLE },
  { code: 'RZC', name: 'Rear zone controller', supplier: 'Harrowgate Electronics', kinds: BENCH_AND_VEHICLE },
  { code: 'BCM', name: 'Body controller', supplier: 'Lindqvarn Kontroll', kinds: BENCH_AND_VEHICLE },
  { code: 'INV', name: 'Drive inverter', supplier: 'Corrinbay Power Systems', kinds: BENCH_AND_VEHICLE },
  { code: 'BMS', name: 'Battery management', supplier: 'Veldmoor Energy', kinds: BENCH_AND_VEHICLE },
  { code: 'BRK', name: 'Brake controller', supplier: 'Stannock Braking', kinds: VEHICLE, notes: 'Safety relevant: flash only with the vehicle on stands and the brake bleed tool ready.' },
  { code: 'EPS', name: 'Electric power steering', supplier: 'Kestrelmoor Steering Works', kinds: VEHICLE, notes: 'Safety relevant: run the end-stop learn after every flash.' },
  { code: 'CCU', name: 'Cockpit compute', supplier: 'Tarnbeck Silicon', kinds: VEHICLE },
  { code: 'TMM', name: 'Thermal manager', supplier: 'Pellworth Thermal', kinds: BENCH_AND_VEHICLE },
  { code: 'OBC', name: 'On-board charger', supplier: 'Corrinbay Power Systems', kinds: VEHICLE },
  { code: 'GWY', name: 'Central gateway', supplier: 'Harrowgate Electronics', kinds: BENCH_AND_VEHICLE },
  { code: 'ACM', name: 'ADAS front camera', supplier: 'Skerrow Vision', kinds: VEHICLE, notes: "The supplier's own release names (ACM_SW_nnnn) are not semantic versions." },
];

type Targets = Record<string, string>;
type Rule = [when: string, min: string, then: string, range: string, note: string];

const EP_R6: Targets = { FZC: '4.1.3', RZC: '4.0.2', BCM: '3.1.0', INV: '2.2.0', BMS: '5.5.0', BRK: '1.8.4', EPS: '2.0.1', CCU: '7.3.1', TMM: '1.5.0', OBC: '2.9.1', GWY: '1.7.0', ACM: 'ACM_SW_0398' };
const EP_R7: Targets = { FZC: '4.2.1', RZC: '4.1.0', BCM: '3.2.0', INV: '2.3.0', BMS: '5.6.1', BRK: '1.9.0', EPS: '2.0.3', CCU: '7.4.0', TMM: '1.5.2', OBC: '3.0.0', GWY: '1.8.2', ACM: 'ACM_SW_0412' };
const IC_R12: Targets = { FZC: '4.3.0-rc.2', RZC: '4.2.0-rc.1', BCM: '3.3.0', INV: '2.4.0-beta.3', BMS: '5.7.0', BRK: '1.9.2', EPS: '2.1.0', CCU: '8.0.0-alpha.4', TMM: '1.6.0', OBC: '3.0.1', GWY: '1.9.0', ACM: 'ACM_SW_0430' };
const VB_R1: Targets = { ...EP_R7, FZC: '4.2.3', CCU: '7.4.2', GWY: '1.8.3' };

const FZC_BCM: Rule = ['FZC', '4.2.0', 'BCM', '>=3.1.0 <4', 'The 4.2 zone controller sends the new door-lock frames only BCM 3.1 or later reads.'];
const EP_R6_RULES: Rule[] = [['INV', '2.2.0', 'BMS', '>=5.5.0', 'Inverter 2.2 asks for the new current limits.']];
const EP_R7_RULES: Rule[] = [FZC_BCM, ['INV', '2.3.0', 'BMS', '>=5.6.0', 'Inverter 2.3 derates on the BMS 5.6 current limits.'], ['GWY', '1.8.0', 'CCU', '^7.3.0', 'Gateway 1.8 routes the 7.x cockpit signals.']];
const IC_R12_RULES: Rule[] = [
  ['FZC', '4.2.0', 'BCM', '>=3.2.0 <4', 'Door-lock frames, second revision.'],
  ['CCU', '8.0.0-0', 'GWY', '>=1.9.0', 'Cockpit 8 needs the gateway that routes its diagnostics.'],
  ['INV', '2.4.0-0', 'BMS', '>=5.7.0', 'Inverter 2.4 pre-releases need BMS 5.7 current limits.'],
];

/**
 * What differs from the stage's target on given assets (null: nothing recorded). The rest of
 * each vehicle or bench rig carries its stage's targets (bench rigs and validation builds, which
 * have no released baseline yet, carry early prototype release 7).
 */
export const DEMO_DEVIATIONS: Record<string, Record<string, string | null>> = {
  'FW3-EP-005': { FZC: '4.1.3' }, // behind: the flash aborted at 80 % (see its finding)
  'FW3-EP-006': { BMS: '5.5.0', INV: '2.2.0' }, // still on release 6 for the drive unit
  'FW3-EP-007': { BCM: '3.0.4' }, // FZC 4.2.1 needs BCM >=3.1.0 <4: rule broken
  'FW3-EP-009': { BMS: '5.5.0' }, // INV 2.3.0 needs BMS >=5.6.0: rule broken
  'FW3-EP-010': { BCM: 'B07_RC2' }, // supplier's engineering build: not comparable
  'FW3-EP-011': { FZC: '4.2.2' }, // ahead, no rule broken
  'FW3-EP-013': { OBC: null }, // missing
  'FW3-EP-014': { INV: null, ACM: 'ACM_SW_0398' }, // waiting for its drive unit; camera not comparable
  'FW3-EP-015': { CCU: '7.4.1' }, // ahead
  'FW3-IC-003': { RZC: '4.1.0' }, // behind the 4.2.0 pre-release
  'FW3-IC-004': { CCU: '8.0.0-alpha.3' }, // behind: alpha.3 < alpha.4
  'FW3-IC-006': { BCM: '3.1.5' }, // FZC 4.3.0-rc.2 needs BCM >=3.2.0 <4: rule broken
  'FW3-IC-008': { TMM: 'TMM-1.6.0-dev' }, // not comparable
  'FW3-IC-009': { GWY: null }, // missing
  'FW3-IC-010': { INV: '2.4.0' }, // ahead of 2.4.0-beta.3
  'FW3-VB-019': { FZC: '4.2.3' },
  'FW3-BN-003': { INV: '2.4.0-beta.3' },
};

/** Assets whose ECUs were first flashed with early prototype release 6 (their history shows two flashes). */
const FLASHED_WITH_R6 = ['FW3-EP-005', 'FW3-EP-006', 'FW3-EP-007', 'FW3-EP-009', 'FW3-EP-011', 'FW3-EP-013', 'FW3-EP-015'];

/** Deterministic identification values of a demo ECU (F188 software number, F191 hardware number, F18C serial). */
export function demoIdent(tag: string, code: string, version: string) {
  const digest = crypto.createHash('sha256').update(`${tag}/${code}`).digest('hex');
  return {
    softwareNumber: `FW3S-${code}-${version.replace(/[^0-9A-Za-z]/g, '').toUpperCase().slice(0, 16)}`,
    hardwareNumber: `FW3H-${code}-${tag.includes('-IC-') || tag.includes('-BN-') ? 'A3' : 'B1'}`,
    ecuSerial: `${code}${parseInt(digest.slice(0, 8), 16).toString().padStart(10, '0').slice(0, 10)}`,
  };
}

/** The version each demo asset carries per ECU code, null for an ECU it carries with nothing recorded. */
export function demoInstalled(tag: string, kind: AssetKind): Record<string, string | null> {
  const stage = tag.split('-')[1];
  const base = stage === 'IC' ? IC_R12 : EP_R7;
  const out: Record<string, string | null> = {};
  for (const ecu of DEMO_ECUS) if (ecu.kinds.includes(kind)) out[ecu.code] = base[ecu.code];
  return { ...out, ...DEMO_DEVIATIONS[tag] };
}

type Ctx = { transaction: Transaction; now: number };

export async function seedSoftware(ctx: Ctx, program: Program, people: User[]) {
  const { transaction } = ctx;
  const day = 24 * 3600 * 1000;
  const engineers = people.filter((p) => p.role === 'engineer');
  const technicians = people.filter((p) => p.role === 'technician');
  const engineer = engineers[0] ?? people[0];
  const stages = await Stage.findAll({ where: { programId: program.id }, order: [['position', 'ASC']], transaction });
  const [, integration, early, validation] = stages;

  const ecus = await Ecu.bulkCreate(
    DEMO_ECUS.map((e) => ({ programId: program.id, code: e.code, name: e.name, supplier: e.supplier, assetKinds: e.kinds, stageIds: [], notes: e.notes ?? '' })),
    { transaction, returning: true },
  );
  const ecuByCode = new Map(ecus.map((e) => [e.code, e]));

  const at = (daysAgo: number) => new Date(ctx.now - daysAgo * day);
  const dateOf = (daysAgo: number) => at(daysAgo).toISOString().slice(0, 10);
  const plans = [
    { stage: early, name: 'FW3 EP release 6', label: 'R6', daysAgo: 62, targets: EP_R6, rules: [FZC_BCM, ...EP_R6_RULES], status: 'superseded' as const },
    { stage: early, name: 'FW3 EP release 7', label: 'R7', daysAgo: 18, targets: EP_R7, rules: EP_R7_RULES, status: 'released' as const },
    { stage: integration, name: 'FW3 IC release 12', label: 'R12', daysAgo: 25, targets: IC_R12, rules: IC_R12_RULES, status: 'released' as const },
    { stage: validation, name: 'FW3 VB release 1', label: 'R1', daysAgo: 3, targets: VB_R1, rules: EP_R7_RULES, status: 'draft' as const },
  ];
  const baselines = await Baseline.bulkCreate(
    plans.map((p) => ({
      programId: program.id,
      stageId: p.stage.id,
      name: p.name,
      releaseLabel: p.label,
      date: dateOf(p.daysAgo),
      status: p.status,
      notes: p.status === 'draft' ? 'Draft for the validation build: zone controller and cockpit fixes from the EP loop.' : '',
      releasedAt: p.status === 'draft' ? null : at(p.daysAgo),
      releasedBy: p.status === 'draft' ? null : engineer.id,
      createdBy: engineer.id,
    })),
    { transaction, returning: true },
  );
  // Release 7 superseded release 6.
  await Baseline.update({ supersededAt: at(plans[1].daysAgo), supersededById: baselines[1].id }, { where: { id: baselines[0].id }, transaction });
  await BaselineTarget.bulkCreate(
    plans.flatMap((p, i) => Object.entries(p.targets).map(([code, version]) => ({ baselineId: baselines[i].id, ecuId: ecuByCode.get(code)!.id, version }))),
    { transaction },
  );
  await BaselineRule.bulkCreate(
    plans.flatMap((p, i) =>
      p.rules.map(([when, min, then, range, note], position) => ({
        baselineId: baselines[i].id,
        position,
        whenEcuId: ecuByCode.get(when)!.id,
        whenMinVersion: min,
        thenEcuId: ecuByCode.get(then)!.id,
        range,
        note,
      })),
    ),
    { transaction },
  );

  // Flashes: every vehicle and bench rig gets its versions; some early prototypes first had release 6.
  const assets = await Asset.findAll({ where: { programId: program.id }, order: [['tag', 'ASC']], transaction });
  type FlashRow = { assetId: string; ecuId: string; code: string; version: string; at: Date; by: string; source: 'manual' | 'import'; tag: string };
  const flashes: FlashRow[] = [];
  assets.forEach((asset, n) => {
    if (asset.kind === 'component') return;
    const versions = demoInstalled(asset.tag, asset.kind);
    const who = technicians.length ? technicians[n % technicians.length] : engineer;
    const releaseDay = asset.tag.includes('-IC-') ? 20 : 12;
    for (const [code, version] of Object.entries(versions)) {
      const ecu = ecuByCode.get(code)!;
      if (version === null) continue;
      if (FLASHED_WITH_R6.includes(asset.tag) && EP_R6[code]) {
        flashes.push({ assetId: asset.id, ecuId: ecu.id, code, version: EP_R6[code], at: at(55 - (n % 5)), by: who.id, source: 'import', tag: asset.tag });
      }
      if (FLASHED_WITH_R6.includes(asset.tag) && version === EP_R6[code]) continue;
      flashes.push({ assetId: asset.id, ecuId: ecu.id, code, version, at: new Date(at(releaseDay - (n % 7)).getTime() + (n % 9) * 3600 * 1000), by: who.id, source: n % 3 ? 'import' : 'manual', tag: asset.tag });
    }
  });
  if (!flashes.length) return { ecus: ecus.length, baselines: baselines.length, flashes: 0 };
  const col = <K extends keyof FlashRow>(key: K) => flashes.map((f) => f[key]);
  const idents = flashes.map((f) => demoIdent(f.tag, f.code, f.version));
  await Ecu.sequelize!.query(
    `INSERT INTO software_flashes (program_id, asset_id, ecu_id, software_version, software_number, hardware_number, ecu_serial,
                                   flashed_at, flashed_by, source, note, recorded_by, recorded_at)
     SELECT $1, f.asset_id, f.ecu_id, f.v, f.sn, f.hn, f.es, f.at, f.by, f.src::enum_software_source,
            CASE WHEN f.src = 'import' THEN 'Imported from a workshop read-out.' ELSE '' END, f.by, f.at + interval '10 minutes'
       FROM unnest($2::uuid[], $3::uuid[], $4::text[], $5::text[], $6::text[], $7::text[], $8::timestamptz[], $9::uuid[], $10::text[])
            AS f(asset_id, ecu_id, v, sn, hn, es, at, by, src)`,
    {
      bind: [
        program.id,
        col('assetId'),
        col('ecuId'),
        col('version'),
        idents.map((i) => i.softwareNumber),
        idents.map((i) => i.hardwareNumber),
        idents.map((i) => i.ecuSerial),
        col('at'),
        col('by'),
        col('source'),
      ],
      transaction,
      type: QueryTypes.INSERT,
    },
  );
  // The installed row of each asset and ECU is its newest flash.
  await Ecu.sequelize!.query(
    `INSERT INTO installed_software (asset_id, ecu_id, program_id, software_version, software_number, hardware_number, ecu_serial,
                                     flashed_at, flashed_by, source, version, updated_at)
     SELECT DISTINCT ON (f.asset_id, f.ecu_id) f.asset_id, f.ecu_id, f.program_id, f.software_version, f.software_number,
            f.hardware_number, f.ecu_serial, f.flashed_at, f.flashed_by, f.source,
            count(*) OVER (PARTITION BY f.asset_id, f.ecu_id) - 1, f.recorded_at
       FROM software_flashes f WHERE f.program_id = $1
      ORDER BY f.asset_id, f.ecu_id, f.flashed_at DESC`,
    { bind: [program.id], transaction, type: QueryTypes.INSERT },
  );
  await HistoryEntry.bulkCreate(
    [
      ...plans.map((p, i) => ({
        programId: program.id,
        entityType: 'baseline',
        entityId: baselines[i].id,
        action: 'created',
        actorId: engineer.id,
        at: at(p.daysAgo + 2),
        after: { name: p.name, stage: p.stage.name, targets: Object.keys(p.targets).length },
      })),
      ...plans
        .filter((p) => p.status !== 'draft')
        .map((p) => ({ programId: program.id, entityType: 'baseline', entityId: baselines[plans.indexOf(p)].id, action: 'released', actorId: engineer.id, at: at(p.daysAgo), before: { status: 'draft' }, after: { status: 'released' } })),
      ...flashes.map((f) => ({
        programId: program.id,
        entityType: 'asset',
        entityId: f.assetId,
        action: 'software-flashed',
        actorId: f.by,
        at: new Date(f.at.getTime() + 10 * 60 * 1000),
        after: { ecuId: f.ecuId, ecu: f.code, softwareVersion: f.version, source: f.source },
      })),
    ],
    { transaction },
  );
  return { ecus: ecus.length, baselines: baselines.length, flashes: flashes.length };
}
