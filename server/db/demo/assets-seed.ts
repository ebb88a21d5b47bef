// Demo assets, stages, checklist templates, worked checklists, findings and photos of the
// fictional programs (PRODUCT.md section 8). Everything here is invented. Rows go in with bulk
// inserts; a seeded random generator keeps the demo the same on every machine.
import crypto from 'node:crypto';
import sharp from 'sharp';
import type { CreationAttributes, Transaction } from 'sequelize';
import { withCheckDigit } from '../../../shared/domain/vin';
import type { AssetKind, AssetStatus, ItemState, System } from '../../../shared/schemas/assets';
import type { FindingSeverity, FindingStatus } from '../../../shared/schemas/findings';
import type { Storage } from '../../integrations/storage';
import { Asset, ChecklistItem, Finding, HistoryEntry, Photo, StageVisit, TemplateItem, type Program, type User } from '../models';
import { createDefaultStages } from '../../services/stages';
import { THUMB_LONG_SIDE } from '../../services/photos';

/** mulberry32: a small seeded generator (common practice, no source needed for a demo). */
function rng(seed: number) {
  let a = seed >>> 0;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return {
    next,
    int: (min: number, max: number) => min + Math.floor(next() * (max - min + 1)),
    pick: <T,>(list: readonly T[]): T => list[Math.floor(next() * list.length)],
  };
}

const STAGE_CODES = ['BN', 'IC', 'EP', 'VB'] as const;
type StageCode = (typeof STAGE_CODES)[number];

type CatalogItem = {
  system: System;
  title: string;
  instructions: string;
  part: string;
  rev: string;
  hv?: boolean;
  optional?: boolean;
  /** Stages that carry the item: B bench, I integration car, E early prototype, V validation build. */
  in: string;
};

const HV_NOTE = 'High-voltage work: qualified people only, with the vehicle made safe per the site procedure.';

// Part numbers are invented: <program>-<5 digits>-<variant>, revision two digits.
const CATALOG: CatalogItem[] = [
  { system: 'safety', title: 'Fire extinguisher present and in date', instructions: 'Check the seal and the date tag; CO2 type at the bench, powder in the vehicle.', part: '', rev: '', in: 'BIEV' },
  { system: 'safety', title: 'Emergency stop labelled and tested', instructions: 'Press the emergency stop: the HV contactors open within one second. Label must read EMERGENCY STOP.', part: '{P}-61010-A', rev: '02', in: 'BI' },
  { system: 'safety', title: 'Rig guarding and frame fixings in place', instructions: 'Guards closed and interlocked; frame bolts torque-marked.', part: '{P}-90100-A', rev: '01', in: 'B' },
  { system: 'safety', title: 'Prototype and HV warning labels fitted', instructions: 'Labels on bonnet, tailgate, HV battery cover and service disconnect.', part: '{P}-61030-B', rev: '01', in: 'IEV' },
  { system: 'safety', title: 'Crash disconnect (pyro fuse) connected', instructions: HV_NOTE, part: '{P}-61220-A', rev: '03', hv: true, in: 'EV' },
  { system: 'safety', title: 'Seat belts and pretensioners connected', instructions: 'Check each buckle latches; pretensioner connectors seated and locked.', part: '{P}-72110-C', rev: '02', in: 'EV' },
  { system: 'safety', title: 'First-aid kit and warning triangle aboard', instructions: 'Stowed in the boot floor tray.', part: '', rev: '', optional: true, in: 'V' },
  { system: 'high-voltage', title: 'HV battery pack fit and mounting bolt torque', instructions: `Torque the pack bolts in the cross pattern on the drawing and mark them. ${HV_NOTE}`, part: '{P}-41220-C', rev: '04', hv: true, in: 'BIEV' },
  { system: 'high-voltage', title: 'HV interlock loop check', instructions: `Open each HVIL connector in turn: the BMS reports the loop open. ${HV_NOTE}`, part: '', rev: '', hv: true, in: 'BIEV' },
  { system: 'high-voltage', title: 'Isolation resistance measurement', instructions: `Measure HV+ and HV- to chassis with an insulation tester; record the values in the notes and compare with the site procedure's limit. ${HV_NOTE}`, part: '', rev: '', hv: true, in: 'BIEV' },
  { system: 'high-voltage', title: 'HV connectors seated, secondary locks engaged', instructions: HV_NOTE, part: '{P}-41510-A', rev: '02', hv: true, in: 'BIEV' },
  { system: 'high-voltage', title: 'Service disconnect fitted and accessible', instructions: HV_NOTE, part: '{P}-41600-B', rev: '01', hv: true, in: 'IEV' },
  { system: 'high-voltage', title: 'Drive inverter phase cables torque-marked', instructions: HV_NOTE, part: '{P}-43100-D', rev: '03', hv: true, in: 'BIE' },
  { system: 'high-voltage', title: 'Pre-charge time within limits', instructions: `Record the pre-charge time from the BMS log. ${HV_NOTE}`, part: '', rev: '', hv: true, in: 'BIE' },
  { system: 'high-voltage', title: 'On-board charger connection check', instructions: HV_NOTE, part: '{P}-44020-A', rev: '02', hv: true, in: 'EV' },
  { system: 'high-voltage', title: 'HV cable routing clear of sharp edges', instructions: `At least 10 mm from edges and hot parts, or sleeved. ${HV_NOTE}`, part: '', rev: '', hv: true, in: 'IEV' },
  { system: 'low-voltage-harness', title: 'LV harness connector seating (all ECUs)', instructions: 'Push-pull-push every ECU connector; CPA locks closed.', part: '{P}-52000-H', rev: '05', in: 'BIEV' },
  { system: 'low-voltage-harness', title: 'CAN bus termination measured', instructions: 'About 60 ohm between CAN-H and CAN-L with the bus unpowered (two 120 ohm ends).', part: '', rev: '', in: 'BIE' },
  { system: 'low-voltage-harness', title: '12 V battery and fuse box check', instructions: 'Fuse ratings against the fuse map; battery terminals torqued.', part: '{P}-53010-A', rev: '02', in: 'BIEV' },
  { system: 'low-voltage-harness', title: 'Bench power supply current limit set', instructions: 'Limit per the rig sheet before power-up.', part: '', rev: '', in: 'B' },
  { system: 'low-voltage-harness', title: 'Ground straps fitted and torqued', instructions: 'Body, subframe and motor ground straps.', part: '{P}-52210-B', rev: '01', in: 'IE' },
  { system: 'low-voltage-harness', title: 'Harness routing and clipping', instructions: 'Clips at every marked point; no tension at connectors.', part: '', rev: '', in: 'IE' },
  { system: 'low-voltage-harness', title: 'Diagnostic port accessible', instructions: 'Reachable with the driver seat in place.', part: '{P}-52400-A', rev: '01', optional: true, in: 'I' },
  { system: 'software', title: 'ECU flash confirm (all ECUs at baseline)', instructions: 'Read out every ECU and compare with the stage baseline; attach the read-out.', part: '', rev: '', in: 'BIEV' },
  { system: 'software', title: 'Fault memory read out and cleared', instructions: 'Save the read-out before clearing.', part: '', rev: '', in: 'BIEV' },
  { system: 'software', title: 'Restbus simulation configured', instructions: 'Restbus file matches the bench configuration sheet.', part: '', rev: '', in: 'B' },
  { system: 'software', title: 'Calibration dataset confirmed', instructions: 'Dataset ID in the read-out matches the build sheet.', part: '', rev: '', in: 'IEV' },
  { system: 'software', title: 'VIN written to all ECUs', instructions: 'Read the VIN back from every ECU that stores it.', part: '', rev: '', in: 'EV' },
  { system: 'software', title: 'Data logger configuration loaded', instructions: 'Logger channels per the test request.', part: '{P}-80500-A', rev: '02', in: 'IEV' },
  { system: 'thermal', title: 'Coolant fill and bleed', instructions: 'Fill with the specified coolant, run the bleed routine, top up cold.', part: '{P}-35100-A', rev: '03', in: 'BIEV' },
  { system: 'thermal', title: 'Battery coolant loop pressure test', instructions: 'Hold the test pressure for 10 minutes without drop.', part: '', rev: '', in: 'BIEV' },
  { system: 'thermal', title: 'Bench chiller set point', instructions: 'Set point per the rig sheet.', part: '', rev: '', in: 'B' },
  { system: 'thermal', title: 'Radiator fan function', instructions: 'Command the fan from the diagnostic tool at 30 % and 100 %.', part: '{P}-35400-B', rev: '02', in: 'IEV' },
  { system: 'thermal', title: 'Refrigerant charge', instructions: 'Charge by weight per the label; record the amount.', part: '', rev: '', in: 'V' },
  { system: 'thermal', title: 'Cabin heater function', instructions: 'Outlet temperature rises within 3 minutes.', part: '{P}-36200-A', rev: '01', optional: true, in: 'V' },
  { system: 'chassis', title: 'Brake bleed and pedal feel', instructions: 'Bleed in the order on the sheet; firm pedal, travel within the marked band.', part: '{P}-21300-B', rev: '02', in: 'IEV' },
  { system: 'chassis', title: 'Steering column pinch bolt torque', instructions: 'Torque and mark; check the column adjusts and locks.', part: '{P}-23110-A', rev: '03', in: 'IEV' },
  { system: 'chassis', title: 'Wheel nut torque', instructions: 'Torque in two passes, star pattern.', part: '', rev: '', in: 'IEV' },
  { system: 'chassis', title: 'Tyre pressures set', instructions: 'Cold pressures per the placard.', part: '', rev: '', in: 'IEV' },
  { system: 'chassis', title: 'Suspension bolts torqued at ride height', instructions: 'Vehicle on its wheels at design load before final torque.', part: '{P}-22040-C', rev: '02', in: 'EV' },
  { system: 'chassis', title: 'Subframe mounting bolts torque', instructions: 'Torque and mark.', part: '{P}-22010-A', rev: '04', in: 'EV' },
  { system: 'chassis', title: 'Wheel alignment recorded', instructions: 'Attach the alignment print-out.', part: '', rev: '', in: 'V' },
  { system: 'chassis', title: 'Parking brake holds', instructions: 'Holds the loaded vehicle on the test ramp.', part: '{P}-21500-A', rev: '01', in: 'EV' },
  { system: 'chassis', title: 'Load machine coupling guard', instructions: 'Guard closed before spinning the motor on the bench.', part: '', rev: '', in: 'B' },
  { system: 'body', title: 'Lighting check', instructions: 'Headlamps, indicators, brake and reversing lamps.', part: '{P}-15000-B', rev: '02', in: 'IEV' },
  { system: 'body', title: 'Door, bonnet and tailgate latches', instructions: 'Each latch closes on the first and second stage.', part: '{P}-11200-A', rev: '03', in: 'EV' },
  { system: 'body', title: 'Windscreen and wipers', instructions: 'No chips in the driver zone; wipers park correctly.', part: '{P}-12100-A', rev: '01', in: 'V' },
  { system: 'body', title: 'Mirrors fitted and adjusted', instructions: '', part: '{P}-12300-B', rev: '02', optional: true, in: 'V' },
  { system: 'body', title: 'Seat rail bolts torque', instructions: 'Torque and mark all four bolts per seat.', part: '{P}-71000-A', rev: '02', in: 'EV' },
  { system: 'body', title: 'Underbody panels fitted', instructions: 'All fasteners present.', part: '{P}-14500-C', rev: '01', optional: true, in: 'V' },
  { system: 'body', title: 'Towing eye present', instructions: 'In the boot tool kit.', part: '{P}-14900-A', rev: '01', optional: true, in: 'V' },
  { system: 'body', title: 'Rig wiring enclosure closed', instructions: 'Covers on, cable glands tight.', part: '', rev: '', in: 'B' },
];

function templateFor(stageLetter: string, programCode: string) {
  return CATALOG.filter((c) => c.in.includes(stageLetter)).map((c, position) => ({
    system: c.system,
    title: c.title,
    instructions: c.instructions,
    expectedPartNumber: c.part.replace('{P}', programCode),
    expectedRevision: c.rev,
    requiredForGate: !c.optional,
    hvQualified: !!c.hv,
    position,
  }));
}

/** An invented VIN with a valid check digit. The WMI starts with 0, a region code ISO 3780 gives to no one (from memory), so no real maker has it. */
function demoVin(wmi: string, vds: string, serial: number) {
  return withCheckDigit(`${wmi}${vds}0TB${String(serial).padStart(6, '0')}`);
}

type AssetPlan = { tag: string; kind: AssetKind; stage: StageCode; status: AssetStatus; location: string; odometerKm: number; vin: string | null; notes: string; priorStage?: StageCode };

const LOCATIONS = ['Bay 4', 'Climate lab', 'Test loop', 'Parts cage'] as const;

function fw3Plans(r: ReturnType<typeof rng>): AssetPlan[] {
  const plans: AssetPlan[] = [];
  const add = (stage: StageCode, numbers: number[], kinds: AssetKind[], statuses: AssetStatus[], odo: [number, number]) => {
    numbers.forEach((n, i) => {
      const kind = kinds[i % kinds.length];
      const status = statuses[i % statuses.length];
      const location = kind === 'component' ? 'Parts cage' : status === 'in-build' ? 'Bay 4' : status === 'in-test' ? r.pick(['Climate lab', 'Test loop']) : r.pick(LOCATIONS);
      plans.push({
        tag: `FW3-${stage}-${String(n).padStart(3, '0')}`,
        kind,
        stage,
        status,
        location,
        odometerKm: kind === 'vehicle' ? r.int(odo[0], odo[1]) : 0,
        vin: kind === 'vehicle' ? demoVin('0FW', 'C3ED1', 100 + plans.length * 7) : null,
        notes: '',
      });
    });
  };
  add('BN', [1, 2, 3, 4, 5, 6, 7, 8], ['bench-rig', 'bench-rig', 'bench-rig', 'bench-rig', 'component', 'bench-rig', 'component', 'bench-rig'], ['in-test', 'available', 'in-build', 'in-test'], [0, 0]);
  add('IC', [1, 2, 3, 4, 5, 6, 7, 8, 9, 10], ['vehicle'], ['in-test', 'available', 'in-build', 'down', 'in-test'], [40, 900]);
  add('EP', [5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16], ['vehicle', 'vehicle', 'vehicle', 'component'], ['in-build', 'in-test', 'assigned', 'available', 'down'], [800, 12_000]);
  add('VB', [17, 18, 19, 20, 21, 22, 23, 24, 25, 26], ['vehicle'], ['in-build', 'available', 'assigned', 'in-test', 'in-build'], [300, 24_000]);
  // A few early prototypes were converted from integration cars: their first checklist stays in the stage history.
  for (const tag of ['FW3-EP-005', 'FW3-EP-006', 'FW3-EP-009', 'FW3-EP-013']) plans.find((p) => p.tag === tag)!.priorStage = 'IC';
  const notes: Record<string, string> = {
    'FW3-BN-003': 'Inverter bench for the rear drive unit; load machine shared with BN-004.',
    'FW3-IC-007': 'Carries the full LV network; used by the cockpit software team on Tuesdays.',
    'FW3-EP-014': 'Waiting for a rear drive unit; parked in the parts cage until it comes back from the BN-003 bench.',
    'FW3-VB-021': 'Climate durability car; returns to the climate lab after each route.',
    'FW3-IC-004': 'Brake booster replaced after pedal travel complaint.',
  };
  for (const p of plans) p.notes = notes[p.tag] ?? '';
  return plans;
}

function m1Plans(): AssetPlan[] {
  return [
    { tag: 'M1-BN-001', kind: 'bench-rig', stage: 'BN', status: 'in-test', location: 'Bay 4', odometerKm: 0, vin: null, notes: 'Battery bench for the 75 kWh pack.' },
    { tag: 'M1-BN-002', kind: 'component', stage: 'BN', status: 'available', location: 'Parts cage', odometerKm: 0, vin: null, notes: '' },
    { tag: 'M1-IC-001', kind: 'vehicle', stage: 'IC', status: 'in-test', location: 'Bay 4', odometerKm: 212, vin: demoVin('0MW', 'V1LR2', 501), notes: '' },
    { tag: 'M1-EP-001', kind: 'vehicle', stage: 'EP', status: 'in-build', location: 'Bay 4', odometerKm: 35, vin: demoVin('0MW', 'V1LR2', 507), notes: 'Long-wheelbase body.' },
    { tag: 'M1-EP-002', kind: 'vehicle', stage: 'EP', status: 'assigned', location: 'Test loop', odometerKm: 3_410, vin: demoVin('0MW', 'V1LR2', 512), notes: '' },
  ];
}

const DEVIATIONS: Array<{ match: RegExp; title: string; description: string; severity: FindingSeverity }> = [
  { match: /interlock/i, title: 'HV interlock loop open at rear junction box', description: 'HVIL reads open with all connectors closed; pin 4 of the rear junction box connector pushed back.', severity: 'safety' },
  { match: /Brake bleed/i, title: 'Long brake pedal travel after bleed', description: 'Pedal travel beyond the marked band after two bleeds; air suspected in the rear left caliper.', severity: 'safety' },
  { match: /connector seating/i, title: 'Body controller connector CPA will not close', description: 'CPA on the body controller X2 connector does not latch; housing looks deformed.', severity: 'major' },
  { match: /Coolant fill/i, title: 'Coolant weep at pump outlet hose', description: 'Slow weep at the pump outlet clamp after the bleed routine.', severity: 'major' },
  { match: /ECU flash/i, title: 'Front zone controller one release behind baseline', description: 'Read-out shows the previous release on the front zone controller; flash failed at 80 %.', severity: 'blocking' },
  { match: /Lighting/i, title: 'Left indicator flashes fast', description: 'Fast flash on the left side; bulb-out detection trips with the prototype lamp.', severity: 'minor' },
  { match: /Seat rail/i, title: 'Seat rail bolt torque mark missing', description: 'Rear inner bolt of the driver seat has no torque mark.', severity: 'minor' },
  { match: /Radiator fan/i, title: 'Radiator fan does not reach 100 %', description: 'Fan stalls at about 70 % when commanded to 100 %.', severity: 'major' },
];

/** The demo's two safety findings and one major one sit on known assets, so the walkthrough can find them. */
const FORCED_DEVIATIONS: Record<string, RegExp> = {
  'FW3-EP-009': /interlock/i,
  'FW3-IC-004': /Brake bleed/i,
  'FW3-IC-007': /connector seating/i,
};

const NA_REASONS = ['Not fitted on this build variant.', 'Covered by the supplier test report on file.', 'Component-only build: not applicable.'];

type Ctx = {
  transaction: Transaction;
  storage: Storage;
  now: number;
};

function svgPhoto(label: string, sub: string, hue: number) {
  const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;');
  return Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="960" height="720">
  <rect width="960" height="720" fill="hsl(${hue},18%,82%)"/>
  <rect x="140" y="170" width="680" height="340" rx="28" fill="hsl(${hue},25%,35%)" stroke="#222" stroke-width="6"/>
  <rect x="200" y="230" width="160" height="90" rx="10" fill="#e9a23b" stroke="#222" stroke-width="4"/>
  <circle cx="620" cy="340" r="90" fill="hsl(${hue},10%,60%)" stroke="#222" stroke-width="6"/>
  <circle cx="620" cy="340" r="30" fill="#333"/>
  <path d="M360 275 C 450 275, 470 340, 530 340" stroke="#f5d000" stroke-width="14" fill="none"/>
  <text x="480" y="600" font-family="DejaVu Sans, sans-serif" font-size="44" text-anchor="middle" fill="#111">${esc(label)}</text>
  <text x="480" y="650" font-family="DejaVu Sans, sans-serif" font-size="28" text-anchor="middle" fill="#333">${esc(sub)}</text>
</svg>`);
}

async function makeDemoPhoto(ctx: Ctx, programId: string, assetId: string, label: string, sub: string, hue: number) {
  const id = crypto.randomUUID();
  const original = await sharp(svgPhoto(label, sub, hue)).jpeg({ quality: 82 }).toBuffer();
  const thumb = await sharp(original).resize(THUMB_LONG_SIDE, THUMB_LONG_SIDE, { fit: 'inside' }).jpeg({ quality: 78 }).toBuffer();
  const base = `programs/${programId}/assets/${assetId}/photos/${id}`;
  await Promise.all([ctx.storage.put(`${base}.jpg`, original, 'image/jpeg'), ctx.storage.put(`${base}-thumb.jpg`, thumb, 'image/jpeg')]);
  return {
    id,
    programId,
    assetId,
    contentType: 'image/jpeg',
    bytes: original.length,
    width: 960,
    height: 720,
    s3Key: `${base}.jpg`,
    thumbKey: `${base}-thumb.jpg`,
    sha256: crypto.createHash('sha256').update(original).digest('hex'),
  };
}

async function seedProgram(
  ctx: Ctx,
  program: Program,
  people: User[],
  plans: AssetPlan[],
  r: ReturnType<typeof rng>,
  photoTags: Array<{ tag: string; label: string; sub: string; deviation?: boolean }>,
) {
  const { transaction } = ctx;
  const stages = await createDefaultStages(program.id, transaction);
  const stageByCode = new Map(STAGE_CODES.map((code, i) => [code, stages[i]]));
  const templates = new Map<StageCode, TemplateItem[]>();
  for (const [i, code] of STAGE_CODES.entries()) {
    const rows = templateFor('BIEV'[i], program.code).map((t) => ({ ...t, programId: program.id, stageId: stages[i].id }));
    templates.set(code, await TemplateItem.bulkCreate(rows, { transaction, returning: true }));
  }
  const technicians = people.filter((p) => p.role === 'technician');
  const engineers = people.filter((p) => p.role === 'engineer');
  const builder = technicians[0] ?? people[0];
  const day = 24 * 3600 * 1000;

  const assets = await Asset.bulkCreate(
    plans.map((p) => ({
      programId: program.id,
      tag: p.tag,
      kind: p.kind,
      stageId: stageByCode.get(p.stage)!.id,
      status: p.status,
      location: p.location,
      vin: p.vin,
      odometerKm: p.odometerKm,
      buildDate: new Date(ctx.now - r.int(20, 200) * day).toISOString().slice(0, 10),
      notes: p.notes,
      createdBy: builder.id,
      updatedAt: new Date(ctx.now - r.int(1, 14 * 24) * 3600 * 1000),
    })),
    { transaction, returning: true },
  );
  const planOf = new Map(plans.map((p) => [p.tag, p]));

  type VisitRow = { id: string; programId: string; assetId: string; stageId: string; enteredAt: Date; leftAt: Date | null; enteredBy: string };
  const visits: Array<VisitRow & { code: StageCode; asset: Asset; closed: boolean }> = [];
  for (const asset of assets) {
    const plan = planOf.get(asset.tag)!;
    const entered = new Date(ctx.now - r.int(5, 40) * day);
    if (plan.priorStage) {
      const prior = stageByCode.get(plan.priorStage)!;
      const priorEntered = new Date(entered.getTime() - r.int(30, 90) * day);
      visits.push({ id: crypto.randomUUID(), programId: program.id, assetId: asset.id, stageId: prior.id, enteredAt: priorEntered, leftAt: entered, enteredBy: builder.id, code: plan.priorStage, asset, closed: true });
    }
    visits.push({ id: crypto.randomUUID(), programId: program.id, assetId: asset.id, stageId: asset.stageId, enteredAt: entered, leftAt: null, enteredBy: builder.id, code: plan.stage, asset, closed: false });
  }
  await StageVisit.bulkCreate(visits.map(({ code: _c, asset: _a, closed: _x, ...v }) => v), { transaction });

  type ItemRow = CreationAttributes<ChecklistItem> & { id: string; updatedAt: Date };
  const items: ItemRow[] = [];
  const findings: Array<CreationAttributes<Finding> & { id: string }> = [];
  const history: Array<CreationAttributes<HistoryEntry>> = [];
  for (const visit of visits) {
    const plan = planOf.get(visit.asset.tag)!;
    // How far the checklist is worked: a closed or in-test checklist is nearly done, one in build about half.
    const share = visit.closed ? 1 : plan.status === 'in-build' ? 0.35 + r.next() * 0.3 : plan.status === 'down' ? 0.75 : 0.85 + r.next() * 0.15;
    for (const t of templates.get(visit.code)!) {
      const forced = !visit.closed && FORCED_DEVIATIONS[visit.asset.tag]?.test(t.title);
      const worked = forced || r.next() < share;
      let state: ItemState = 'open';
      let naReason = '';
      let findingId: string | null = null;
      if (worked) {
        const roll = r.next();
        const deviation = DEVIATIONS.find((d) => d.match.test(t.title) && (forced || d.severity !== 'safety'));
        if (forced || (!visit.closed && deviation && roll < 0.08)) {
          state = 'deviation';
          findingId = crypto.randomUUID();
        } else if (roll > 0.96 || (plan.kind === 'component' && t.system === 'body')) {
          state = 'not-applicable';
          naReason = plan.kind === 'component' ? NA_REASONS[2] : r.pick(NA_REASONS.slice(0, 2));
        } else {
          state = 'passed';
        }
      }
      const who = r.pick(technicians.length ? technicians : people);
      const at = new Date(visit.enteredAt.getTime() + r.int(1, 96) * 3600 * 1000);
      const id = crypto.randomUUID();
      items.push({
        id,
        programId: program.id,
        assetId: visit.assetId,
        visitId: visit.id,
        stageId: visit.stageId,
        templateItemId: t.id,
        system: t.system,
        title: t.title,
        instructions: t.instructions,
        expectedPartNumber: t.expectedPartNumber,
        expectedRevision: t.expectedRevision,
        requiredForGate: t.requiredForGate,
        hvQualified: t.hvQualified,
        position: t.position,
        state,
        fittedPartNumber: state === 'passed' ? t.expectedPartNumber : '',
        fittedRevision: state === 'passed' ? t.expectedRevision : '',
        notes: state === 'passed' && /Isolation/.test(t.title) ? `HV+ ${r.int(8, 40)} MΩ, HV- ${r.int(8, 40)} MΩ` : '',
        naReason,
        findingId: null,
        updatedBy: worked ? who.id : null,
        updatedAt: at,
      });
      if (worked) {
        history.push({ programId: program.id, entityType: 'checklist-item', entityId: id, action: 'updated', actorId: who.id, at, before: { state: 'open' }, after: { state, naReason }, note: t.title });
      }
      if (findingId) {
        const d = DEVIATIONS.find((x) => x.match.test(t.title))!;
        const status: FindingStatus = d.severity === 'safety' ? 'open' : r.pick(['open', 'open', 'in-work', 'fixed', 'verified'] as const);
        findings.push({
          id: findingId,
          programId: program.id,
          assetId: visit.assetId,
          checklistItemId: id,
          title: d.title,
          description: d.description,
          system: t.system,
          severity: d.severity,
          status,
          ownerId: r.pick(engineers.length ? engineers : people).id,
          dueDate: new Date(at.getTime() + r.int(3, 21) * day).toISOString().slice(0, 10),
          createdBy: who.id,
        });
        items[items.length - 1].findingId = findingId;
        history.push({ programId: program.id, entityType: 'finding', entityId: findingId, action: 'created', actorId: who.id, at, after: { title: d.title, severity: d.severity, status: 'open' }, note: 'Opened from a checklist deviation.' });
      }
    }
  }
  // Items first without their finding link, then the findings, then the links (the two tables point at each other).
  const links = new Map(items.filter((i) => i.findingId).map((i) => [i.id, i.findingId!]));
  await ChecklistItem.bulkCreate(items.map((i) => ({ ...i, findingId: null })), { transaction });
  await Finding.bulkCreate(findings, { transaction });
  if (links.size) {
    await Finding.sequelize!.query(
      `UPDATE checklist_items ci SET finding_id = l.finding_id FROM unnest($1::uuid[], $2::uuid[]) AS l(item_id, finding_id) WHERE ci.id = l.item_id`,
      { bind: [[...links.keys()], [...links.values()]], transaction },
    );
  }
  for (const asset of assets) {
    history.push({ programId: program.id, entityType: 'asset', entityId: asset.id, action: 'created', actorId: builder.id, at: new Date(ctx.now - 200 * day), after: { tag: asset.tag, kind: asset.kind, status: asset.status } });
  }
  await HistoryEntry.bulkCreate(history, { transaction });

  const photos = [];
  for (const [i, p] of photoTags.entries()) {
    const asset = assets.find((a) => a.tag === p.tag);
    if (!asset) continue;
    const photo = await makeDemoPhoto(ctx, program.id, asset.id, p.label, p.sub, (i * 67) % 360);
    const deviationItem = p.deviation ? items.find((it) => it.assetId === asset.id && it.state === 'deviation') : undefined;
    photos.push({
      ...photo,
      checklistItemId: deviationItem?.id ?? null,
      findingId: deviationItem ? links.get(deviationItem.id) ?? null : null,
      idempotencyKey: null,
      createdBy: builder.id,
      createdAt: new Date(ctx.now - (photoTags.length - i) * 3600 * 1000),
    });
  }
  await Photo.bulkCreate(photos, { transaction });
  return { assets: assets.length, items: items.length, findings: findings.length, photos: photos.length };
}

export async function seedAssets(ctx: Ctx, fw3: Program, fw3People: User[], m1: Program, m1People: User[]) {
  const r = rng(0xf3a11);
  const a = await seedProgram(ctx, fw3, fw3People, fw3Plans(r), r, [
    { tag: 'FW3-EP-009', label: 'Rear junction box', sub: 'FW3-EP-009 HVIL connector', deviation: true },
    { tag: 'FW3-IC-004', label: 'Brake caliper, rear left', sub: 'FW3-IC-004 after bleed', deviation: true },
    { tag: 'FW3-BN-003', label: 'Inverter bench', sub: 'FW3-BN-003 phase cables' },
    { tag: 'FW3-EP-014', label: 'Drive unit', sub: 'FW3-EP-014 on the stand' },
    { tag: 'FW3-VB-021', label: 'Climate car', sub: 'FW3-VB-021 front end' },
    { tag: 'FW3-IC-007', label: 'Body controller', sub: 'FW3-IC-007 connector X2', deviation: true },
  ]);
  const b = await seedProgram(ctx, m1, m1People, m1Plans(), rng(0x3a1), [{ tag: 'M1-EP-002', label: 'Load floor', sub: 'M1-EP-002 tie-down points' }]);
  return { assets: a.assets + b.assets, items: a.items + b.items, findings: a.findings + b.findings, photos: a.photos + b.photos };
}
