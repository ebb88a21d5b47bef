// Demo readiness history of the fictional FW3 program (PRODUCT.md section 8; issue 7): today's
// snapshot computed from the demo data as it stands, and 29 days before it shaped backwards from
// today's figures so the trend charts have something to say. Bench converges (its open-findings
// load fell steadily to today's), the integration car does not (its load crept up), the early
// prototype falls slowly and the validation build wanders. Two past gate reviews (a no-go on the
// integration car, a conditional go on the bench with actions) and a target date on the bench.
// The other program gets today's snapshot only. Everything here is invented.
import crypto from 'node:crypto';
import type { CreationAttributes, Transaction } from 'sequelize';
import { byText, resultFor, roundScore } from '../../../shared/domain/readiness';
import { addDays, forecastStage, isoDay, type LoadPoint } from '../../../shared/domain/trend';
import type { Attendee, FrozenRollup } from '../../../shared/schemas/readiness';
import type { Deps } from '../../deps';
import { computeFigures, stageRollup, type AssetResult, type Figures } from '../../services/readiness';
import { writeSnapshotRows } from '../../services/readiness-snapshots';
import { HistoryEntry, type Program, type User } from '../models';

/** mulberry32: a small seeded generator (common practice, no source needed for a demo). */
function rng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export const BACKFILL_DAYS = 30;
const DAY = 24 * 3600 * 1000;

/**
 * How a stage's load `d` days ago compares with today's, by stage position: bench fell by about
 * 4 % of today's load a day, the integration car rose by about 1.3 % a day (so it was lower
 * before), the early prototype fell by 1 % a day, the validation build stayed level.
 */
const PROFILES: Array<(d: number) => number> = [(d) => 1 + 0.045 * d, (d) => 1 - 0.013 * d, (d) => 1 + 0.01 * d, () => 1];
/** The required checklist items were worked off over the month: this much of C a day. */
const CHECKLIST_PER_DAY = 0.004;

/** The figures of `d` days ago: every asset's load scaled by its stage's profile (with a little noise), its checklist a little behind. */
function pastFigures(today: Figures, d: number, position: Map<string, number>, noise: () => number): Figures {
  const asOf = new Date(today.asOf.getTime() - d * DAY);
  const gates = new Map(today.stages.map((s) => [s.id, s.gate]));
  const factor = new Map(today.stages.map((s) => [s.id, Math.max(0, (PROFILES[position.get(s.id) ?? 3] ?? PROFILES[3])(d) * (1 + (noise() - 0.5) * 0.12))]));
  const assets = today.assets.map((a): AssetResult => {
    const gate = gates.get(a.stageId)!;
    const now = a.readiness;
    const load = Math.round(now.findingsLoad * factor.get(a.stageId)!);
    const parts = {
      checklist: Math.max(0, now.parts.checklist - CHECKLIST_PER_DAY * d * noise() * 2),
      findings: Math.max(0, 1 - load / gate.findingsBudget),
      software: now.parts.software,
      validation: now.parts.validation,
    };
    const w = gate.weights;
    const score = roundScore(100 * (w.checklist * parts.checklist + w.findings * parts.findings + w.software * parts.software + w.validation * parts.validation));
    return { ...a, readiness: { ...now, parts, score, findingsLoad: load, result: resultFor(score, now.cleared, gate) } };
  });
  return { ...today, asOf, assets };
}

type ReviewPlan = {
  daysAgo: number;
  position: number;
  decision: 'no-go' | 'conditional';
  notes: string;
  decisionNotes: string;
  guests: string[];
  actions: Array<{ title: string; role: string; dueInDays: number; status: 'open' | 'in-work' | 'done'; note?: string }>;
};

const REVIEWS: ReviewPlan[] = [
  {
    daysAgo: 24,
    position: 1,
    decision: 'no-go',
    notes: 'Integration car gate, first pass. Network wake-up issues on three cars; HV interlock loop open intermittently on IC-004.',
    decisionNotes: 'No-go: too many blocking findings on the low-voltage network and one car not cleared. Review again once the wake-up fix is flashed fleet-wide.',
    guests: ['Harnessworks supplier engineer (guest)'],
    actions: [],
  },
  {
    daysAgo: 9,
    position: 0,
    decision: 'conditional',
    notes: 'Bench gate. Thermal shock running on BN-004; cold start passed on both rigs. Restbus files still behind on two rigs.',
    decisionNotes: 'Conditional go: integration car build may start; the actions below close before the cars leave Bay 4.',
    guests: [],
    actions: [
      { title: 'Update the restbus files on BN-002 and BN-006 to the current network database', role: 'engineer', dueInDays: 5, status: 'in-work' },
      { title: 'Re-run the isolation resistance measurement on all rigs with the calibrated tester', role: 'technician', dueInDays: -1, status: 'open' },
      {
        title: 'Close the open blocking coolant finding on BN-001 or move it to the integration car plan',
        role: 'lead',
        dueInDays: 12,
        status: 'done',
        note: 'Moved to the integration car plan: the pump outlet hose is replaced at the first car build.',
      },
    ],
  },
];

export async function seedReadiness(ctx: { transaction: Transaction; now: number }, programs: Array<{ program: Program; people: User[]; history: boolean }>) {
  const { transaction, now } = ctx;
  const asOf = new Date(now);
  let snapshots = 0;
  let reviews = 0;
  for (const { program, people, history } of programs) {
    // The readiness figures read the database only: the seed has no mailer or storage to give.
    const deps = { sequelize: program.sequelize } as unknown as Deps;
    const today = await computeFigures(deps, { programId: program.id }, asOf, transaction);
    await writeSnapshotRows(deps, isoDay(asOf), today, transaction);
    snapshots += 1;
    if (!history) continue;

    const position = new Map(today.stages.map((s) => [s.id, s.position]));
    const noise = rng(0x5eed7);
    const days = new Map<number, Figures>([[0, today]]);
    for (let d = 1; d < BACKFILL_DAYS; d += 1) {
      const past = pastFigures(today, d, position, noise);
      days.set(d, past);
      await writeSnapshotRows(deps, isoDay(past.asOf), past, transaction);
      snapshots += 1;
    }

    // The stage series as the snapshots hold them, for the forecasts frozen in the reviews.
    const seriesOf = (stageId: string, upTo: number): LoadPoint[] =>
      [...days.entries()]
        .filter(([d]) => d >= upTo)
        .map(([, f]) => ({ date: isoDay(f.asOf), load: f.assets.filter((a) => a.stageId === stageId).reduce((s, a) => s + a.readiness.findingsLoad, 0) }))
        .sort((a, b) => byText(a.date, b.date));

    const lead = people.find((p) => p.role === 'lead')!;
    const byRole = (role: string) => people.filter((p) => p.role === role);
    const entries: Array<CreationAttributes<HistoryEntry>> = [];
    for (const plan of REVIEWS) {
      const stage = today.stages.find((s) => s.position === plan.position);
      if (!stage) continue;
      const then = days.get(plan.daysAgo)!;
      const assets = then.assets.filter((a) => a.stageId === stage.id);
      // Reviews sit at 09:30 UTC of their day.
      const openedAt = new Date(Date.parse(`${isoDay(then.asOf)}T09:30:00Z`));
      const decidedAt = new Date(openedAt.getTime() + 75 * 60_000);
      const rollup = stageRollup({ ...stage, targetDate: null }, assets, seriesOf(stage.id, plan.daysAgo), then.asOf);
      const frozen: FrozenRollup = {
        asOf: openedAt.toISOString(),
        stage: rollup,
        assets: [...assets]
          .sort((a, b) => a.readiness.score - b.readiness.score || byText(a.tag, b.tag))
          .map((a) => ({ id: a.id, tag: a.tag, score: a.readiness.score, result: a.readiness.result, cleared: a.readiness.cleared })),
      };
      const attendees: Attendee[] = [
        lead,
        ...byRole('engineer').slice(0, 2),
        ...byRole('technician').slice(0, 1),
        ...byRole('coordinator').slice(0, 1),
      ].map((u) => ({ userId: u.id, name: u.name }));
      attendees.push(...plan.guests.map((name) => ({ userId: null, name })));
      const id = crypto.randomUUID();
      await program.sequelize.query(
        `INSERT INTO gate_reviews (id, program_id, stage_id, opened_by, opened_at, frozen_rollup, attendees, notes, decision, decision_notes, decided_by, decided_at, version)
         VALUES ($1, $2, $3, $4, $5, $6::jsonb, $7::jsonb, $8, $9, $10, $4, $11, 1)`,
        {
          bind: [id, program.id, stage.id, lead.id, openedAt, JSON.stringify(frozen), JSON.stringify(attendees), plan.notes, plan.decision, plan.decisionNotes, decidedAt],
          transaction,
        },
      );
      reviews += 1;
            entries.push(
        { programId: program.id, entityType: 'gate-review', entityId: id, action: 'opened', actorId: lead.id, at: openedAt, before: null, after: { stageId: stage.id, stage: stage.name, meanScore: rollup.meanScore, counts: rollup.counts, attendees, notes: plan.notes }, note: null },
        { programId: program.id, entityType: 'gate-review', entityId: id, action: 'decided', actorId: lead.id, at: decidedAt, before: { decision: null }, after: { decision: plan.decision, notes: plan.decisionNotes, actions: plan.actions.length }, note: null },
      );
      for (const [i, action] of plan.actions.entries()) {
        // The role's demo account (technician@, engineer@, lead@ ...) owns it, so signing in shows it on the home page.
        const owner = byRole(action.role)[0] ?? lead;
        const actionId = crypto.randomUUID();
        const due = addDays(isoDay(asOf), action.dueInDays);
        await program.sequelize.query(
          `INSERT INTO gate_actions (id, program_id, review_id, title, owner_id, due_date, status, note, position, updated_by, version, created_at, updated_at)
           VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13)`,
          {
            bind: [
              actionId,
              program.id,
              id,
              action.title,
              owner.id,
              due,
              action.status,
              action.note ?? '',
              i,
              action.status === 'open' ? lead.id : owner.id,
              action.status === 'open' ? 0 : 1,
              decidedAt,
              action.status === 'open' ? decidedAt : new Date(now - DAY),
            ],
            transaction,
          },
        );
        entries.push({ programId: program.id, entityType: 'gate-action', entityId: actionId, action: 'created', actorId: lead.id, at: decidedAt, before: null, after: { reviewId: id, title: action.title, ownerId: owner.id, dueDate: due, status: 'open' }, note: null });
        if (action.status !== 'open') {
          entries.push({ programId: program.id, entityType: 'gate-action', entityId: actionId, action: 'status-changed', actorId: owner.id, at: new Date(now - DAY), before: { status: 'open', note: '' }, after: { status: action.status, note: action.note ?? '' }, note: null });
        }
      }
    }

    // A target date on the converging bench: a week after the day its forecast gives, so it shows as met.
    const bench = today.stages.find((s) => s.position === 0);
    if (bench) {
      const benchAssets = today.assets.filter((a) => a.stageId === bench.id);
      const forecast = forecastStage(seriesOf(bench.id, 0), stageRollup({ ...bench, targetDate: null }, benchAssets, [], asOf), asOf);
      const target = forecast.date ? addDays(forecast.date, 7) : addDays(isoDay(asOf), 28);
      await program.sequelize.query(
        `INSERT INTO gate_target_dates (stage_id, program_id, target_date, set_by, updated_at) VALUES ($1, $2, $3, $4, $5)`,
        { bind: [bench.id, program.id, target, lead.id, new Date(now - 2 * DAY)], transaction },
      );
      entries.push({ programId: program.id, entityType: 'stage', entityId: bench.id, action: 'gate-target-date-set', actorId: lead.id, at: new Date(now - 2 * DAY), before: { gateTargetDate: null }, after: { gateTargetDate: target }, note: null });
    }
    await HistoryEntry.bulkCreate(entries, { transaction });
  }
  return { snapshots, reviews };
}
