import { z } from 'zod';
import { GateSettingsSchema } from './assets';
import { DueDateSchema, PersonSchema } from './findings';

// Readiness, the stage roll-up, the trend and forecast, gate reviews and their actions
// (PRODUCT.md sections 3F and 4; issue 7). The server answers with these shapes and the client
// parses them with the same schemas.

const text = (max: number) => z.string().trim().max(max, `Use at most ${max} characters.`);
const uuid = z.uuid('Not a valid id.');

// ---- The score ----------------------------------------------------------------------------

export const READINESS_RESULTS = ['go', 'conditional', 'no-go'] as const;
export const ReadinessResultSchema = z.enum(READINESS_RESULTS);
export type ReadinessResult = z.infer<typeof ReadinessResultSchema>;
export const READINESS_RESULT_LABELS: Record<ReadinessResult, string> = { go: 'Go', conditional: 'Conditional go', 'no-go': 'No-go' };

export const READINESS_PARTS = ['checklist', 'findings', 'software', 'validation'] as const;
export const ReadinessPartSchema = z.enum(READINESS_PARTS);
export type ReadinessPart = z.infer<typeof ReadinessPartSchema>;

const PartsSchema = z.object({ checklist: z.number(), findings: z.number(), software: z.number(), validation: z.number() });

export const BREAKDOWN_ITEM_KINDS = ['checklist-item', 'finding', 'ecu', 'validation-test'] as const;
export const BreakdownItemSchema = z.object({
  kind: z.enum(BREAKDOWN_ITEM_KINDS),
  /** The checklist item, finding, ECU or validation test id (for a link). */
  id: z.string(),
  label: z.string(),
  /** Its share of the part's points (negative), where one can be given. */
  points: z.number().optional(),
});
export type BreakdownItem = z.infer<typeof BreakdownItemSchema>;

export const BreakdownEntrySchema = z.object({
  part: ReadinessPartSchema,
  /** What the part took from 100 (negative); the entries add up to score - 100. */
  points: z.number(),
  /** Plain words, for example "-12: four open blocking findings". */
  text: z.string(),
  items: z.array(BreakdownItemSchema),
});
export type BreakdownEntry = z.infer<typeof BreakdownEntrySchema>;

export const ReadinessSchema = z.object({
  score: z.number(),
  result: ReadinessResultSchema,
  /** False while an open safety finding stands: the result is then no-go whatever the score. */
  cleared: z.boolean(),
  parts: PartsSchema,
  weights: PartsSchema,
  breakdown: z.array(BreakdownEntrySchema),
  thresholds: z.object({ go: z.number(), conditional: z.number() }),
  findingsLoad: z.number(),
  findingsBudget: z.number(),
  /** The open safety findings that keep the asset from being cleared. */
  notClearedBy: z.array(z.object({ id: z.string(), title: z.string() })),
});
export type Readiness = z.infer<typeof ReadinessSchema>;

export const AssetReadinessSchema = ReadinessSchema.extend({
  assetId: z.string(),
  tag: z.string(),
  stageId: z.string(),
  stage: z.string(),
  asOf: z.string(),
});
export type AssetReadiness = z.infer<typeof AssetReadinessSchema>;

// ---- The forecast -------------------------------------------------------------------------

/**
 * `reached`: the latest load is at or below the target load; `converging`: the fitted line
 * falls and reaches the target on `date`; `not-converging`: the line is flat or rising;
 * `unreachable`: the line falls, but no findings load gives a go with the other parts as they
 * are; `insufficient-data`: fewer than three daily snapshots in the window; `no-assets`: nothing
 * on the stage (shared/domain/trend.ts has the definitions).
 */
export const FORECAST_STATUSES = ['reached', 'converging', 'not-converging', 'unreachable', 'insufficient-data', 'no-assets'] as const;
export const ForecastStatusSchema = z.enum(FORECAST_STATUSES);
export type ForecastStatus = z.infer<typeof ForecastStatusSchema>;

export const ForecastSchema = z.object({
  status: ForecastStatusSchema,
  /** The day the fitted load line reaches the target load (status `converging`). */
  date: z.string().nullable(),
  /** The stage's total open-findings load at which its mean score reaches the go threshold; null when none does. */
  targetLoad: z.number().nullable(),
  currentLoad: z.number().nullable(),
  slopePerDay: z.number().nullable(),
  intercept: z.number().nullable(),
  /** The fitting window (the last 14 days up to the day asked) and the snapshots in it. */
  fromDate: z.string(),
  toDate: z.string(),
  points: z.number().int(),
  text: z.string(),
});
export type Forecast = z.infer<typeof ForecastSchema>;

// ---- The stage roll-up ----------------------------------------------------------------------

export const BLOCKER_KINDS = ['not-cleared', 'blocking-findings', 'required-items', 'ecus-off-baseline', 'tests-not-passed'] as const;
export const BlockerKindSchema = z.enum(BLOCKER_KINDS);
export type BlockerKind = z.infer<typeof BlockerKindSchema>;

export const BlockerItemSchema = z.object({
  kind: z.enum(BREAKDOWN_ITEM_KINDS),
  id: z.string(),
  label: z.string(),
  assetId: z.string(),
  assetTag: z.string(),
});
export type BlockerItem = z.infer<typeof BlockerItemSchema>;

export const BlockerSchema = z.object({
  kind: BlockerKindSchema,
  /** How many of them (findings, items, ECUs, allocations; assets for `not-cleared`). */
  count: z.number().int(),
  /** On how many assets. */
  assets: z.number().int(),
  text: z.string(),
  /** The first few, for links (BLOCKER_TOP_ITEMS at most). */
  items: z.array(BlockerItemSchema),
});
export type Blocker = z.infer<typeof BlockerSchema>;

export const ResultCountsSchema = z.object({ go: z.number().int(), conditional: z.number().int(), noGo: z.number().int() });
export type ResultCounts = z.infer<typeof ResultCountsSchema>;

export const StageRollupSchema = z.object({
  stageId: z.string(),
  name: z.string(),
  position: z.number().int(),
  gate: GateSettingsSchema,
  assetCount: z.number().int(),
  /** Mean of the assets' scores; null without assets. */
  meanScore: z.number().nullable(),
  meanParts: PartsSchema.nullable(),
  lowest: z.object({ id: z.string(), tag: z.string(), score: z.number() }).nullable(),
  counts: ResultCountsSchema,
  notCleared: z.number().int(),
  openFindingsLoad: z.number(),
  blockers: z.array(BlockerSchema),
  targetDate: z.string().nullable(),
  forecast: ForecastSchema,
  /** Whether the forecast meets the target date; null without a target date or without a forecast date to compare. */
  meetsTarget: z.boolean().nullable(),
});
export type StageRollup = z.infer<typeof StageRollupSchema>;

export const ProgramReadinessSchema = z.object({ programId: z.string(), asOf: z.string(), stages: z.array(StageRollupSchema) });
export type ProgramReadiness = z.infer<typeof ProgramReadinessSchema>;

// ---- Trend and target date ------------------------------------------------------------------

export const TrendPointSchema = z.object({
  date: z.string(),
  meanScore: z.number().nullable(),
  load: z.number(),
  assetCount: z.number().int(),
  counts: ResultCountsSchema,
});
export type TrendPoint = z.infer<typeof TrendPointSchema>;

export const StageTrendSchema = z.object({
  stageId: z.string(),
  programId: z.string(),
  name: z.string(),
  gate: GateSettingsSchema,
  targetDate: z.string().nullable(),
  /** Daily stage snapshots of the last 30 days, oldest first (days without a snapshot are left out). */
  series: z.array(TrendPointSchema),
  /** The least-squares line through the last 14 days of load, as two end points for the chart. */
  fit: z
    .object({
      slopePerDay: z.number(),
      intercept: z.number(),
      fromDate: z.string(),
      toDate: z.string(),
      line: z.array(z.object({ date: z.string(), load: z.number() })),
    })
    .nullable(),
  forecast: ForecastSchema,
  meetsTarget: z.boolean().nullable(),
});
export type StageTrend = z.infer<typeof StageTrendSchema>;

export const SetTargetDateSchema = z.strictObject({ date: DueDateSchema.nullable() });
export type SetTargetDate = z.input<typeof SetTargetDateSchema>;

export const TargetDateResultSchema = z.object({
  stageId: z.string(),
  targetDate: z.string().nullable(),
  forecast: ForecastSchema,
  meetsTarget: z.boolean().nullable(),
});
export type TargetDateResult = z.infer<typeof TargetDateResultSchema>;

// ---- Gate reviews and actions ---------------------------------------------------------------

export const GATE_ACTION_STATUSES = ['open', 'in-work', 'done'] as const;
export const GateActionStatusSchema = z.enum(GATE_ACTION_STATUSES);
export type GateActionStatus = z.infer<typeof GateActionStatusSchema>;
export const GATE_ACTION_STATUS_LABELS: Record<GateActionStatus, string> = { open: 'Open', 'in-work': 'In work', done: 'Done' };

export const GateActionSchema = z.object({
  id: z.string(),
  reviewId: z.string(),
  programId: z.string(),
  stageId: z.string(),
  /** The stage of the review the action came from, and when that review's decision was recorded. */
  stageName: z.string(),
  reviewDecidedAt: z.string().nullable(),
  title: z.string(),
  owner: PersonSchema.nullable(),
  dueDate: z.string(),
  status: GateActionStatusSchema,
  /** The note left with the last status change (for example what was done); empty when none. */
  note: z.string(),
  /** Past its due date (a UTC day) and not done. */
  overdue: z.boolean(),
  updatedAt: z.string(),
  updatedBy: PersonSchema.nullable(),
  version: z.number().int(),
});
export type GateAction = z.infer<typeof GateActionSchema>;

export const AttendeeSchema = z.object({ userId: z.string().nullable(), name: z.string() });
export type Attendee = z.infer<typeof AttendeeSchema>;

/** What a review froze when it was opened: the stage's roll-up with its blockers, and each asset's figure. */
export const FrozenRollupSchema = z.object({
  asOf: z.string(),
  stage: StageRollupSchema,
  assets: z.array(z.object({ id: z.string(), tag: z.string(), score: z.number(), result: ReadinessResultSchema, cleared: z.boolean() })),
});
export type FrozenRollup = z.infer<typeof FrozenRollupSchema>;

export const GateReviewSchema = z.object({
  id: z.string(),
  programId: z.string(),
  stageId: z.string(),
  stageName: z.string(),
  openedBy: PersonSchema.nullable(),
  openedAt: z.string(),
  frozen: FrozenRollupSchema,
  attendees: z.array(AttendeeSchema),
  notes: z.string(),
  decision: ReadinessResultSchema.nullable(),
  decisionNotes: z.string(),
  decidedBy: PersonSchema.nullable(),
  decidedAt: z.string().nullable(),
  /** The earlier review this one corrects, and the later one that corrects this one. */
  correctsReviewId: z.string().nullable(),
  correctedByReviewId: z.string().nullable(),
  actions: z.array(GateActionSchema),
  version: z.number().int(),
});
export type GateReview = z.infer<typeof GateReviewSchema>;

export const GateReviewSummarySchema = GateReviewSchema.omit({ frozen: true }).extend({
  meanScore: z.number().nullable(),
  counts: ResultCountsSchema,
});
export type GateReviewSummary = z.infer<typeof GateReviewSummarySchema>;
export const GateReviewListSchema = z.object({ items: z.array(GateReviewSummarySchema) });

/** An attendee is a member's user id, or the name of someone without an account (a supplier, a guest). */
const AttendeeInputSchema = z.union([uuid, text(120).min(1, 'Enter a name.')]);

export const CreateGateReviewSchema = z.strictObject({
  stageId: uuid,
  attendees: z.array(AttendeeInputSchema).max(100, 'At most 100 attendees.').default([]),
  notes: text(4000).default(''),
  /** A decided review this one corrects (the decided record itself never changes). */
  correctsReviewId: uuid.optional(),
});
export type CreateGateReview = z.input<typeof CreateGateReviewSchema>;

/** Attendees and notes may change until the decision is recorded; afterwards the record is closed (409). */
export const UpdateGateReviewSchema = z.strictObject({
  attendees: z.array(AttendeeInputSchema).max(100, 'At most 100 attendees.').optional(),
  notes: text(4000).optional(),
  version: z.number().int().min(0),
});
export type UpdateGateReview = z.input<typeof UpdateGateReviewSchema>;

export const GateActionInputSchema = z.strictObject({
  title: text(200).min(1, 'Enter what must be done.'),
  ownerId: uuid,
  dueDate: DueDateSchema,
});

export const GateDecisionSchema = z
  .strictObject({
    decision: ReadinessResultSchema,
    notes: text(4000).default(''),
    actions: z.array(GateActionInputSchema).max(50, 'At most 50 actions.').default([]),
  })
  .superRefine((v, ctx) => {
    if (v.decision === 'conditional' && v.actions.length === 0) {
      ctx.addIssue({ code: 'custom', path: ['actions'], message: 'A conditional go needs at least one action with an owner and a due date.' });
    }
  });
export type GateDecision = z.input<typeof GateDecisionSchema>;

export const GateReviewListQuerySchema = z.strictObject({ programId: uuid, stageId: uuid.optional() });

/** A status change with an optional note (kept with the action and in its history); the same status with a new note changes only the note. */
export const UpdateGateActionSchema = z.strictObject({
  status: GateActionStatusSchema,
  note: text(2000).optional(),
  version: z.number().int().min(0),
});
export type UpdateGateAction = z.input<typeof UpdateGateActionSchema>;

export const GateActionListQuerySchema = z.strictObject({
  programId: uuid,
  mine: z.enum(['true', 'false']).optional(),
  status: GateActionStatusSchema.optional(),
});
export const GateActionListSchema = z.object({ items: z.array(GateActionSchema) });
