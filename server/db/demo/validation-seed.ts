// Demo validation plan and test campaigns of the fictional FW3 program (PRODUCT.md section 8):
// a dozen tests over the stages, with standard procedure references where they fit (IEC 60068-2
// environmental tests, ISO 20653 water ingress) and internal ones (PV-...), target reliability
// and confidence, assets allocated with results (one failure with its blocking finding), and a
// climate campaign part way through on a rear drive unit, with a cold step after the humid one
// to show the condensation caution. Everything here is invented.
import { QueryTypes, type Transaction } from 'sequelize';
import { successRunSampleSize } from '../../../shared/domain/reliability';
import type { AllocationStatus, CampaignKindValue } from '../../../shared/schemas/validation';
import { Campaign, CampaignStep, Finding, HistoryEntry, TestAllocation, ValidationTest, type Program, type User } from '../models';

type StageCode = 'BN' | 'IC' | 'EP' | 'VB';
type PlanTest = {
  stage: StageCode;
  name: string;
  procedureRef: string;
  verifies: string;
  r: number;
  c: number;
  l?: number;
  b?: number;
  allocations: Array<[string, AllocationStatus, string?]>;
};

// Targets are the demo's own; n follows from them (e.g. R 0.9, C 0.9 without L and b: 22 samples).
const PLAN: PlanTest[] = [
  {
    stage: 'BN',
    name: 'Thermal shock (IEC 60068-2-14 Na)',
    procedureRef: 'IEC 60068-2-14 Na',
    verifies: 'Inverter power module solder joints survive rapid change between -40 °C and 105 °C.',
    r: 0.9, c: 0.9, l: 2, b: 2,
    allocations: [['FW3-BN-003', 'passed', '500 cycles; no change in switching losses.'], ['FW3-BN-004', 'running', 'Cycle 310 of 500.'], ['FW3-BN-005', 'planned']],
  },
  {
    stage: 'BN',
    name: 'Cold start operation (IEC 60068-2-1 Ab)',
    procedureRef: 'IEC 60068-2-1 Ab',
    verifies: 'Battery management wakes and closes the contactors after a 24 h soak at -30 °C.',
    r: 0.9, c: 0.8, l: 1.5, b: 2,
    allocations: [['FW3-BN-001', 'passed', 'Contactors closed in 1.8 s.'], ['FW3-BN-002', 'passed', 'Contactors closed in 2.1 s.']],
  },
  {
    stage: 'IC',
    name: 'PV-EMC-002 CAN bus load and wake-up',
    procedureRef: 'PV-EMC-002',
    verifies: 'Every ECU wakes on the network message and the bus load stays under 60 % with all ECUs talking.',
    r: 0.9, c: 0.7,
    allocations: [['FW3-IC-001', 'passed', 'Peak bus load 47 %.'], ['FW3-IC-003', 'running'], ['FW3-IC-007', 'passed', 'Peak bus load 52 %.']],
  },
  {
    stage: 'EP',
    name: 'Damp heat cyclic (IEC 60068-2-30 Db)',
    procedureRef: 'IEC 60068-2-30 Db',
    verifies: 'Drive unit HV connectors keep their isolation through 6 cycles of 25/55 °C at 93 %RH (12 h + 12 h).',
    r: 0.9, c: 0.9,
    allocations: [
      ['FW3-EP-008', 'failed', 'Isolation resistance fell below the site limit after cycle 4; water found inside the phase connector housing.'],
      ['FW3-EP-012', 'passed', 'All 6 cycles; isolation stayed above the limit.'],
      ['FW3-EP-016', 'running', 'Cycle 3 of 6.'],
    ],
  },
  {
    stage: 'EP',
    name: 'Dry heat operation (IEC 60068-2-2 Bb)',
    procedureRef: 'IEC 60068-2-2 Bb',
    verifies: 'Cockpit compute runs its full load for 96 h at 85 °C without throttling.',
    r: 0.9, c: 0.9, l: 2, b: 1.5,
    allocations: [['FW3-EP-006', 'passed', 'No throttling; fan duty peaked at 78 %.'], ['FW3-EP-007', 'planned']],
  },
  {
    stage: 'EP',
    name: 'Damp heat steady state (IEC 60068-2-78 Cab)',
    procedureRef: 'IEC 60068-2-78 Cab',
    verifies: 'Body controller and its connectors at 40 °C and 93 %RH for 21 days.',
    r: 0.95, c: 0.9, l: 3, b: 2,
    allocations: [['FW3-EP-010', 'running', 'Day 9 of 21.'], ['FW3-EP-011', 'planned']],
  },
  {
    stage: 'EP',
    name: 'Water ingress IPX9K with HV isolation check',
    procedureRef: 'ISO 20653 IPX9K',
    verifies: 'High-pressure hot water spray on the underbody; HV isolation measured after each position.',
    r: 0.9, c: 0.7, l: 2, b: 2,
    allocations: [['FW3-EP-005', 'passed', 'Isolation unchanged; no water inside the pack lid.'], ['FW3-EP-009', 'planned']],
  },
  {
    stage: 'EP',
    name: 'PV-DUR-012 rough road durability',
    procedureRef: 'PV-DUR-012',
    verifies: 'Body and chassis mounts on the test loop pavé and pothole track, 2 lives of the rough-road load.',
    r: 0.9, c: 0.8, l: 2, b: 2,
    allocations: [['FW3-EP-006', 'running', '1,850 km of 3,200 km.'], ['FW3-EP-013', 'planned']],
  },
  {
    stage: 'VB',
    name: 'Change of temperature (IEC 60068-2-14 Nb)',
    procedureRef: 'IEC 60068-2-14 Nb',
    verifies: 'Front and rear zone controllers across -40 °C to 85 °C at 3 K/min, powered.',
    r: 0.9, c: 0.9, l: 2, b: 2,
    allocations: [['FW3-VB-017', 'planned'], ['FW3-VB-018', 'planned']],
  },
  {
    stage: 'VB',
    name: 'Sinusoidal vibration (IEC 60068-2-6 Fc)',
    procedureRef: 'IEC 60068-2-6 Fc',
    verifies: 'Battery pack brackets and HV busbars, 10-200 Hz sweep on three axes.',
    r: 0.95, c: 0.9, l: 2, b: 2,
    allocations: [['FW3-VB-020', 'running', 'Z axis done; X axis running.']],
  },
  {
    stage: 'VB',
    name: 'Salt mist cyclic (IEC 60068-2-52 Kb)',
    procedureRef: 'IEC 60068-2-52 Kb',
    verifies: 'Underbody fasteners, brake lines and charge port flap after 6 cycles.',
    r: 0.9, c: 0.9, l: 3, b: 1.5,
    allocations: [['FW3-VB-019', 'planned']],
  },
  {
    stage: 'VB',
    name: 'PV-DUR-020 public-road durability',
    procedureRef: 'PV-DUR-020',
    verifies: 'Whole-vehicle durability on the public-road route, 1.5 lives (permits and plates as the local rules require).',
    r: 0.9, c: 0.9, l: 1.5, b: 2,
    allocations: [['FW3-VB-021', 'running', '9,400 km of 60,000 km.'], ['FW3-VB-022', 'planned'], ['FW3-VB-023', 'planned']],
  },
  {
    stage: 'VB',
    name: 'PV-CLM-007 cold climate start',
    procedureRef: 'PV-CLM-007',
    verifies: 'Vehicle starts, drives off and defrosts the windscreen after a night at -30 °C.',
    r: 0.9, c: 0.8,
    allocations: [['FW3-VB-024', 'planned']],
  },
];

type PlanStep = { name: string; durationHours?: number; distanceKm?: number; temperatureC?: number; humidityPct?: number; route?: string; done: number };
type PlanCampaign = { tag: string; name: string; kind: CampaignKindValue; startedHoursAgo: number; steps: PlanStep[] };

const CAMPAIGNS: PlanCampaign[] = [
  {
    // 44 h of 74 h done in the 46 h since it started.
    tag: 'FW3-EP-008',
    name: 'Rear drive unit climate sequence',
    kind: 'climate',
    startedHoursAgo: 46,
    steps: [
      { name: 'Cold soak -20 °C', durationHours: 12, temperatureC: -20, done: 12 },
      { name: 'Ramp to 40 °C', durationHours: 2, temperatureC: 40, done: 2 },
      { name: 'Damp heat 40 °C 85 %RH', durationHours: 48, temperatureC: 40, humidityPct: 85, done: 30 },
      { name: 'Cold step -10 °C', durationHours: 8, temperatureC: -10, done: 0 },
      { name: 'Recovery 23 °C 50 %RH', durationHours: 4, temperatureC: 23, humidityPct: 50, done: 0 },
    ],
  },
  {
    tag: 'FW3-VB-021',
    name: 'Public-road durability route, first life',
    kind: 'durability',
    startedHoursAgo: 24 * 21,
    steps: [
      { name: 'City loop', distanceKm: 4000, route: 'Fenwater ring road and centre', done: 4000 },
      { name: 'Motorway', distanceKm: 10000, route: 'Northern motorway return', done: 5400 },
      { name: 'Mountain pass', distanceKm: 3000, route: 'Hill route with the long descent', done: 0 },
      { name: 'Rough road', distanceKm: 3000, route: 'Test loop pavé and potholes', done: 0 },
    ],
  },
];

export async function seedValidation(ctx: { transaction: Transaction; now: number }, program: Program, people: User[]) {
  const { transaction, now } = ctx;
  const sequelize = program.sequelize;
  const stages = await sequelize.query<{ id: string }>(`SELECT id FROM stages WHERE program_id = $1 ORDER BY position`, {
    bind: [program.id],
    type: QueryTypes.SELECT,
    transaction,
  });
  const assets = await sequelize.query<{ id: string; tag: string }>(`SELECT id, tag FROM assets WHERE program_id = $1`, {
    bind: [program.id],
    type: QueryTypes.SELECT,
    transaction,
  });
  if (stages.length < 4 || !assets.length) return { tests: 0, campaigns: 0 };
  const stageOf: Record<StageCode, string> = { BN: stages[0].id, IC: stages[1].id, EP: stages[2].id, VB: stages[3].id };
  const assetOf = new Map(assets.map((a) => [a.tag, a.id]));
  const engineer = people.find((p) => p.role === 'engineer')!;
  const technician = people.find((p) => p.role === 'technician')!;
  const history: Array<{ programId: string; entityType: string; entityId: string; action: string; actorId: string; after: object; note?: string }> = [];

  let tests = 0;
  for (const plan of PLAN) {
    const weibull = { testToLife: plan.l ?? null, shape: plan.b ?? null };
    const test = await ValidationTest.create(
      {
        programId: program.id,
        stageId: stageOf[plan.stage],
        name: plan.name,
        procedureRef: plan.procedureRef,
        verifies: plan.verifies,
        reliability: plan.r,
        confidence: plan.c,
        ...weibull,
        requiredSamples: successRunSampleSize({ reliability: plan.r, confidence: plan.c, ...weibull }).n,
        createdBy: engineer.id,
      },
      { transaction },
    );
    tests += 1;
    history.push({ programId: program.id, entityType: 'validation-test', entityId: test.id, action: 'created', actorId: engineer.id, after: { name: test.name, procedureRef: test.procedureRef } });
    for (const [tag, status, notes] of plan.allocations) {
      const assetId = assetOf.get(tag);
      if (!assetId) continue;
      let findingId: string | null = null;
      if (status === 'failed') {
        const finding = await Finding.create(
          {
            programId: program.id,
            assetId,
            checklistItemId: null,
            title: `Failed validation test: ${plan.name}`,
            description: notes ?? '',
            system: 'high-voltage',
            severity: 'blocking',
            ownerId: engineer.id,
            dueDate: new Date(now + 10 * 86_400_000).toISOString().slice(0, 10),
            createdBy: technician.id,
          },
          { transaction },
        );
        findingId = finding.id;
        history.push({
          programId: program.id,
          entityType: 'finding',
          entityId: finding.id,
          action: 'created',
          actorId: technician.id,
          after: { title: finding.title, severity: 'blocking', status: 'open', assetId, assetTag: tag },
          note: 'Opened from a failed validation test.',
        });
      }
      const allocation = await TestAllocation.create(
        { programId: program.id, testId: test.id, assetId, status, resultNotes: notes ?? '', findingId, updatedBy: status === 'planned' ? engineer.id : technician.id },
        { transaction },
      );
      history.push({ programId: program.id, entityType: 'test-allocation', entityId: allocation.id, action: 'created', actorId: engineer.id, after: { testId: test.id, assetTag: tag, status } });
    }
  }

  let campaigns = 0;
  for (const plan of CAMPAIGNS) {
    const assetId = assetOf.get(plan.tag);
    if (!assetId) continue;
    const campaign = await Campaign.create(
      {
        programId: program.id,
        assetId,
        name: plan.name,
        kind: plan.kind,
        startedAt: new Date(now - plan.startedHoursAgo * 3_600_000),
        createdBy: engineer.id,
      },
      { transaction },
    );
    await CampaignStep.bulkCreate(
      plan.steps.map((s, position) => ({
        campaignId: campaign.id,
        position,
        name: s.name,
        durationHours: s.durationHours ?? null,
        distanceKm: s.distanceKm ?? null,
        temperatureC: s.temperatureC ?? null,
        humidityPct: s.humidityPct ?? null,
        route: s.route ?? null,
        doneHours: plan.kind === 'climate' ? s.done : 0,
        doneKm: plan.kind === 'durability' ? s.done : 0,
      })),
      { transaction },
    );
    campaigns += 1;
    history.push({ programId: program.id, entityType: 'campaign', entityId: campaign.id, action: 'created', actorId: engineer.id, after: { name: plan.name, kind: plan.kind, assetTag: plan.tag } });
  }
  await HistoryEntry.bulkCreate(
    history.map((h) => ({ ...h, before: null, note: h.note ?? null })),
    { transaction },
  );
  return { tests, campaigns };
}
