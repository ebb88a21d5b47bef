import { z } from 'zod';
import { RANGE_MAX_LENGTH, VERSION_MAX_LENGTH, rangeProblem, versionProblem } from '../domain/software';
import { AssetKindSchema } from './assets';

// ECU software configuration (issue 5; PRODUCT.md section 3D). One schema per shape: the server
// parses requests with these, the client parses answers and builds its forms from them.

const text = (max: number) => z.string().trim().max(max, `Use at most ${max} characters.`);
const uuid = z.uuid('Not a valid id.');
const PersonSchema = z.object({ id: z.string(), name: z.string() });

// ---- Statuses -------------------------------------------------------------------------------

export const CONFORMANCE_STATUSES = ['on-baseline', 'behind', 'ahead', 'missing', 'not-comparable', 'rule-broken'] as const;
export const ConformanceStatusSchema = z.enum(CONFORMANCE_STATUSES);
export type ConformanceStatus = z.infer<typeof ConformanceStatusSchema>;
/** Labels that go with the colour of a cell (never colour alone). */
export const CONFORMANCE_STATUS_LABELS: Record<ConformanceStatus, string> = {
  'on-baseline': 'On baseline',
  behind: 'Behind',
  ahead: 'Ahead',
  missing: 'Missing',
  'not-comparable': 'Not comparable',
  'rule-broken': 'Breaks a rule',
};
/** Statuses that put an ECU on the reflash list. */
export const REFLASH_STATUSES: readonly ConformanceStatus[] = ['behind', 'missing', 'rule-broken', 'not-comparable'];
export const StatusCountsSchema = z.object({
  'on-baseline': z.number().int(),
  behind: z.number().int(),
  ahead: z.number().int(),
  missing: z.number().int(),
  'not-comparable': z.number().int(),
  'rule-broken': z.number().int(),
});
export type StatusCounts = z.infer<typeof StatusCountsSchema>;

// ---- Versions -------------------------------------------------------------------------------

/** A software version as recorded: any printable text up to 64 characters; semver is compared, anything else kept as is. */
export const SoftwareVersionSchema = z
  .string()
  .trim()
  .min(1, 'Enter the software version.')
  .max(VERSION_MAX_LENGTH, `A software version has at most ${VERSION_MAX_LENGTH} characters.`)
  .regex(/^[\x20-\x7E]+$/, 'Use printable characters only (letters, digits, dots, dashes, plus, underscore).');
/** A semantic version (Semantic Versioning 2.0.0), for a rule's threshold. */
export const SemverSchema = SoftwareVersionSchema.superRefine((v, ctx) => {
  const problem = versionProblem(v);
  if (problem) ctx.addIssue({ code: 'custom', message: problem });
});
/** A compatibility range in the `semver` package's syntax, for example `>=3.1.0 <4`. */
export const RangeSchema = z
  .string()
  .trim()
  .max(RANGE_MAX_LENGTH, `Use at most ${RANGE_MAX_LENGTH} characters.`)
  .superRefine((v, ctx) => {
    const problem = rangeProblem(v);
    if (problem) ctx.addIssue({ code: 'custom', message: problem });
  });
/** ECU identification values other than the version (software number, hardware number, serial). */
const IdentValueSchema = z
  .string()
  .trim()
  .max(VERSION_MAX_LENGTH, `Use at most ${VERSION_MAX_LENGTH} characters.`)
  .regex(/^[\x20-\x7E]*$/, 'Use printable characters only.');

// ---- Calculator ---------------------------------------------------------------------------

export const VersionCompareQuerySchema = z.strictObject({
  installed: SoftwareVersionSchema,
  target: SoftwareVersionSchema,
  /** Optional; an empty value means no range. */
  range: z.preprocess((v) => (typeof v === 'string' && v.trim() === '' ? undefined : v), RangeSchema.optional()),
});
export const VersionCompareSchema = z.object({
  status: ConformanceStatusSchema,
  /** -1 installed older than target, 0 same, 1 newer; null when either is not semver. */
  order: z.union([z.literal(-1), z.literal(0), z.literal(1)]).nullable(),
  /** null without a range, or when the installed version is not semver. */
  satisfiesRange: z.boolean().nullable(),
  note: z.string().nullable(),
});
export type VersionCompare = z.infer<typeof VersionCompareSchema>;

// ---- ECU catalogue --------------------------------------------------------------------------

/** Short ECU codes such as FZC or BMS: capital letters, digits, dash or underscore, starting with a letter. */
export const EcuCodeSchema = text(12)
  .toUpperCase()
  .regex(/^[A-Z][A-Z0-9_-]{1,11}$/, 'Use 2 to 12 capital letters or digits, for example FZC.');

export const EcuSchema = z.object({
  id: z.string(),
  programId: z.string(),
  name: z.string(),
  code: z.string(),
  supplier: z.string(),
  /** Asset kinds that carry this ECU. */
  assetKinds: z.array(AssetKindSchema),
  /** Stages that carry it; empty means every stage. */
  stageIds: z.array(z.string()),
  notes: z.string(),
  version: z.number().int(),
  updatedAt: z.string(),
});
export type Ecu = z.infer<typeof EcuSchema>;
export const EcuListSchema = z.object({ items: z.array(EcuSchema) });

const uniqueIds = (max: number) =>
  z
    .array(uuid)
    .max(max)
    .transform((ids) => [...new Set(ids.map((id) => id.toLowerCase()))]);

export const CreateEcuSchema = z.strictObject({
  programId: uuid,
  name: text(120).min(1, 'Enter a name.'),
  code: EcuCodeSchema,
  supplier: text(120).default(''),
  assetKinds: z.array(AssetKindSchema).min(1, 'Choose at least one kind of asset.').max(3).transform((k) => [...new Set(k)]),
  stageIds: uniqueIds(50).default([]),
  notes: text(2000).default(''),
});
export type CreateEcu = z.input<typeof CreateEcuSchema>;
// Written out rather than CreateEcuSchema.partial(): zod keeps a field's default inside
// .partial(), which would reset every field a PATCH leaves out.
export const UpdateEcuSchema = z.strictObject({
  name: text(120).min(1, 'Enter a name.').optional(),
  code: EcuCodeSchema.optional(),
  supplier: text(120).optional(),
  assetKinds: z.array(AssetKindSchema).min(1, 'Choose at least one kind of asset.').max(3).transform((k) => [...new Set(k)]).optional(),
  stageIds: uniqueIds(50).optional(),
  notes: text(2000).optional(),
  version: z.number().int().min(0),
});
export type UpdateEcu = z.input<typeof UpdateEcuSchema>;
export const EcuListQuerySchema = z.strictObject({ programId: uuid });

// ---- Baselines ------------------------------------------------------------------------------

export const BASELINE_STATUSES = ['draft', 'released', 'superseded'] as const;
export const BaselineStatusSchema = z.enum(BASELINE_STATUSES);
export type BaselineStatus = z.infer<typeof BaselineStatusSchema>;

export const BaselineTargetSchema = z.object({ ecuId: z.string(), ecuCode: z.string(), ecuName: z.string(), version: z.string() });
export const CompatibilityRuleSchema = z.object({
  id: z.string(),
  whenEcuId: z.string(),
  whenEcuCode: z.string(),
  whenMinVersion: z.string(),
  thenEcuId: z.string(),
  thenEcuCode: z.string(),
  range: z.string(),
  note: z.string(),
});
export type CompatibilityRuleDto = z.infer<typeof CompatibilityRuleSchema>;

export const BaselineSchema = z.object({
  id: z.string(),
  programId: z.string(),
  stageId: z.string(),
  stage: z.string(),
  name: z.string(),
  releaseLabel: z.string(),
  /** The baseline's date (YYYY-MM-DD). */
  date: z.string(),
  status: BaselineStatusSchema,
  notes: z.string(),
  targets: z.array(BaselineTargetSchema),
  rules: z.array(CompatibilityRuleSchema),
  releasedAt: z.string().nullable(),
  releasedBy: PersonSchema.nullable(),
  supersededAt: z.string().nullable(),
  /** The baseline that superseded this one. */
  supersededById: z.string().nullable(),
  version: z.number().int(),
  updatedAt: z.string(),
});
export type Baseline = z.infer<typeof BaselineSchema>;
export const BaselineSummarySchema = BaselineSchema.omit({ targets: true, rules: true }).extend({
  targetCount: z.number().int(),
  ruleCount: z.number().int(),
});
export type BaselineSummary = z.infer<typeof BaselineSummarySchema>;
export const BaselineListSchema = z.object({ items: z.array(BaselineSummarySchema) });
export const BaselineListQuerySchema = z.strictObject({
  programId: uuid,
  stageId: uuid.optional(),
  status: BaselineStatusSchema.optional(),
});

export const TargetInputSchema = z.strictObject({ ecuId: uuid, version: SoftwareVersionSchema });
export const RuleInputSchema = z
  .strictObject({
    whenEcuId: uuid,
    whenMinVersion: SemverSchema,
    thenEcuId: uuid,
    range: RangeSchema,
    note: text(300).default(''),
  })
  .refine((r) => r.whenEcuId.toLowerCase() !== r.thenEcuId.toLowerCase(), {
    path: ['thenEcuId'],
    message: 'A rule links two different ECUs.',
  });
export type RuleInput = z.input<typeof RuleInputSchema>;

const targetsField = z
  .array(TargetInputSchema)
  .max(100, 'At most 100 ECUs in a baseline.')
  .superRefine((targets, ctx) => {
    const seen = new Set<string>();
    targets.forEach((t, i) => {
      const id = t.ecuId.toLowerCase();
      if (seen.has(id)) ctx.addIssue({ code: 'custom', path: [i, 'ecuId'], message: 'This ECU is listed twice.' });
      seen.add(id);
    });
  });
const rulesField = z.array(RuleInputSchema).max(100, 'At most 100 rules in a baseline.');

export const CreateBaselineSchema = z.strictObject({
  programId: uuid,
  stageId: uuid,
  name: text(120).min(1, 'Enter a name.'),
  releaseLabel: text(40).default(''),
  date: z.iso.date('Use a date like 2026-12-31.'),
  notes: text(4000).default(''),
  /** Start from another baseline's targets and rules (those given here win). */
  copyFromId: uuid.optional(),
  targets: targetsField.optional(),
  rules: rulesField.optional(),
});
export type CreateBaseline = z.input<typeof CreateBaselineSchema>;
export const UpdateBaselineSchema = z.strictObject({
  name: text(120).min(1, 'Enter a name.').optional(),
  releaseLabel: text(40).optional(),
  date: z.iso.date('Use a date like 2026-12-31.').optional(),
  notes: text(4000).optional(),
  /** Replaces every target when given. */
  targets: targetsField.optional(),
  /** Replaces every rule when given. */
  rules: rulesField.optional(),
  version: z.number().int().min(0),
});
export type UpdateBaseline = z.input<typeof UpdateBaselineSchema>;
export const ReleaseBaselineSchema = z.strictObject({ version: z.number().int().min(0) });

export const TARGET_CHANGES = ['added', 'removed', 'upgraded', 'downgraded', 'changed', 'same'] as const;
export const BaselineDiffSchema = z.object({
  from: BaselineSummarySchema,
  to: BaselineSummarySchema,
  targets: z.array(
    z.object({
      ecuId: z.string(),
      ecuCode: z.string(),
      ecuName: z.string(),
      from: z.string().nullable(),
      to: z.string().nullable(),
      change: z.enum(TARGET_CHANGES),
    }),
  ),
  rules: z.array(
    z.object({
      change: z.enum(['added', 'removed', 'changed', 'same']),
      from: CompatibilityRuleSchema.nullable(),
      to: CompatibilityRuleSchema.nullable(),
    }),
  ),
});
export type BaselineDiff = z.infer<typeof BaselineDiffSchema>;

// ---- Installed software ---------------------------------------------------------------------

export const SOFTWARE_SOURCES = ['manual', 'import'] as const;
export const SoftwareSourceSchema = z.enum(SOFTWARE_SOURCES);

export const InstalledSoftwareSchema = z.object({
  assetId: z.string(),
  ecuId: z.string(),
  softwareVersion: z.string(),
  /** UDS F188 */
  softwareNumber: z.string(),
  /** UDS F191 */
  hardwareNumber: z.string(),
  /** UDS F18C */
  ecuSerial: z.string(),
  flashedAt: z.string(),
  flashedBy: PersonSchema.nullable(),
  source: SoftwareSourceSchema,
  version: z.number().int(),
  updatedAt: z.string(),
});
export type InstalledSoftware = z.infer<typeof InstalledSoftwareSchema>;

/** One earlier (or the current) flash of an ECU, newest first. */
export const FlashSchema = z.object({
  id: z.string(),
  softwareVersion: z.string(),
  softwareNumber: z.string(),
  hardwareNumber: z.string(),
  ecuSerial: z.string(),
  flashedAt: z.string(),
  flashedBy: PersonSchema.nullable(),
  source: SoftwareSourceSchema,
  recordedAt: z.string(),
  recordedBy: PersonSchema.nullable(),
  note: z.string(),
});
export type Flash = z.infer<typeof FlashSchema>;

export const RuleBreakSchema = z.object({
  rule: CompatibilityRuleSchema,
  whenInstalled: z.string().nullable(),
  thenInstalled: z.string().nullable(),
  /** A sentence for the screen: which versions break which rule. */
  message: z.string(),
});
export type RuleBreak = z.infer<typeof RuleBreakSchema>;

export const EcuSoftwareSchema = z.object({
  ecu: z.object({ id: z.string(), code: z.string(), name: z.string(), supplier: z.string() }),
  installed: InstalledSoftwareSchema.nullable(),
  target: z.string().nullable(),
  /** null: nothing to compare with (no released baseline for the stage, or the ECU is not in it). */
  status: ConformanceStatusSchema.nullable(),
  order: z.union([z.literal(-1), z.literal(0), z.literal(1)]).nullable(),
  note: z.string().nullable(),
  rulesBroken: z.array(RuleBreakSchema),
  history: z.array(FlashSchema),
});
export type EcuSoftware = z.infer<typeof EcuSoftwareSchema>;

export const BaselineRefSchema = z.object({ id: z.string(), name: z.string(), releaseLabel: z.string(), date: z.string() });

export const AssetSoftwareSchema = z.object({
  assetId: z.string(),
  tag: z.string(),
  stageId: z.string(),
  stage: z.string(),
  /** The released baseline of the asset's stage, if any. */
  baseline: BaselineRefSchema.nullable(),
  ecus: z.array(EcuSoftwareSchema),
  rules: z.array(
    z.object({
      rule: CompatibilityRuleSchema,
      state: z.enum(['holds', 'broken', 'cannot-check', 'not-triggered']),
      whenInstalled: z.string().nullable(),
      thenInstalled: z.string().nullable(),
    }),
  ),
  counts: StatusCountsSchema,
  /** The software part of readiness (PRODUCT.md section 4): onBaseline / expected. */
  score: z.object({ onBaseline: z.number().int(), expected: z.number().int() }),
});
export type AssetSoftware = z.infer<typeof AssetSoftwareSchema>;

const FlashedAtSchema = z.iso.datetime({ offset: true, message: 'Use a date and time like 2026-12-02T14:30:00Z.' });

/** A flash recorded by hand (`PUT /api/assets/:id/software/:ecuId`). */
export const RecordFlashSchema = z.strictObject({
  softwareVersion: SoftwareVersionSchema,
  softwareNumber: IdentValueSchema.optional(),
  hardwareNumber: IdentValueSchema.optional(),
  ecuSerial: IdentValueSchema.optional(),
  /** When it was flashed; now when left out. Not in the future. */
  flashedAt: FlashedAtSchema.optional(),
  note: text(500).default(''),
  /** The current record's version, to refuse a stale overwrite (409); leave out to record regardless. */
  version: z.number().int().min(0).optional(),
});
export type RecordFlash = z.input<typeof RecordFlashSchema>;

/** Marks a reflash list entry done (`POST /api/software/reflash/done`): records the flash. */
export const ReflashDoneSchema = RecordFlashSchema.omit({ softwareVersion: true }).extend({
  assetId: uuid,
  ecuId: uuid,
  version: SoftwareVersionSchema,
  /** The installed record's version, as `version` in RecordFlashSchema. */
  recordVersion: z.number().int().min(0).optional(),
});
export type ReflashDone = z.input<typeof ReflashDoneSchema>;

// ---- Matrix ---------------------------------------------------------------------------------

export const MatrixQuerySchema = z.strictObject({
  programId: uuid,
  stageId: uuid.optional(),
  /** Assets with at least one cell (of the chosen ECU, when given) in this status. */
  status: ConformanceStatusSchema.optional(),
  ecuId: uuid.optional(),
  cursor: z.string().max(400).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
});
export type MatrixQuery = z.input<typeof MatrixQuerySchema>;

export const MatrixCellSchema = z.object({
  ecuId: z.string(),
  installed: z.string().nullable(),
  target: z.string().nullable(),
  status: ConformanceStatusSchema.nullable(),
});
export type MatrixCell = z.infer<typeof MatrixCellSchema>;

export const MatrixRowSchema = z.object({
  assetId: z.string(),
  tag: z.string(),
  kind: AssetKindSchema,
  stageId: z.string(),
  stage: z.string(),
  baselineId: z.string().nullable(),
  /** Only the ECUs the asset carries or has recorded, in the order of `ecus`. */
  cells: z.array(MatrixCellSchema),
  score: z.object({ onBaseline: z.number().int(), expected: z.number().int() }),
});
export type MatrixRow = z.infer<typeof MatrixRowSchema>;

export const SoftwareMatrixSchema = z.object({
  ecus: z.array(z.object({ id: z.string(), code: z.string(), name: z.string() })),
  /** The released baseline per stage (stages without one are absent). */
  baselines: z.array(BaselineRefSchema.extend({ stageId: z.string() })),
  rows: z.array(MatrixRowSchema),
  /** Cells per status over every asset of the filter (the status filter left out), not only this page. */
  counts: StatusCountsSchema,
  /** Assets matching every filter, the status filter included. */
  totalAssets: z.number().int(),
  nextCursor: z.string().nullable(),
});
export type SoftwareMatrix = z.infer<typeof SoftwareMatrixSchema>;

// ---- Reflash list -------------------------------------------------------------------------

export const ReflashQuerySchema = z.strictObject({
  programId: uuid,
  stageId: uuid.optional(),
  ecuId: uuid.optional(),
  /**
   * Only assets with a planned use (see PLANNED_USE_KINDS) that starts on or before this day (to
   * its end, UTC); a use already under way counts.
   */
  before: z.iso.date('Use a date like 2026-12-31.').optional(),
  /** Only assets allocated to this validation test and not yet passed on it. */
  testId: uuid.optional(),
});
export type ReflashQuery = z.input<typeof ReflashQuerySchema>;

/**
 * What an asset is needed for, by when: a booked drive (planned or out), a test campaign started
 * and not complete, a validation test allocated and not passed (running: now; otherwise by the
 * gate target date of the test's stage), and the gate review of the asset's stage (its target date).
 */
export const PLANNED_USE_KINDS = ['drive', 'campaign', 'test', 'gate'] as const;
export const PlannedUseKindSchema = z.enum(PLANNED_USE_KINDS);
export type PlannedUseKind = z.infer<typeof PlannedUseKindSchema>;
export const PlannedUseSchema = z.object({
  kind: PlannedUseKindSchema,
  /** The drive's purpose, the campaign's or test's name, or the stage of the gate. */
  name: z.string(),
  /** When it starts (ISO date-time); null when no date is set (a planned test on a stage without a gate target date). */
  at: z.string().nullable(),
  /** Started already (a drive out, a running test or campaign): the flash is due now. */
  underWay: z.boolean(),
  /** The validation test, for kind `test`. */
  testId: z.string().nullable(),
});
export type PlannedUse = z.infer<typeof PlannedUseSchema>;
export const ReflashEntrySchema = z.object({
  assetId: z.string(),
  tag: z.string(),
  vin: z.string().nullable(),
  stageId: z.string(),
  stage: z.string(),
  location: z.string(),
  ecuId: z.string(),
  ecuCode: z.string(),
  ecuName: z.string(),
  installed: z.string().nullable(),
  /** The version to flash: the baseline target (null when the ECU has none: the reason says what the rule asks for). */
  flashTo: z.string().nullable(),
  status: ConformanceStatusSchema,
  reason: z.string(),
  /** The installed record's version, to send back as `recordVersion` when marking it done. */
  recordVersion: z.number().int().nullable(),
  /**
   * The earliest planned use the flash is needed for: of the chosen test with `testId`, of those
   * starting by the chosen day with `before`, otherwise of every planned use. null: none known.
   */
  neededFor: PlannedUseSchema.nullable(),
  /** `neededFor.at`: the flash is needed by then. */
  neededBy: z.string().nullable(),
});
export type ReflashEntry = z.infer<typeof ReflashEntrySchema>;
export const ReflashListSchema = z.object({
  items: z.array(ReflashEntrySchema),
  assets: z.number().int(),
  /** Stages of the filter that have no released baseline: nothing on them can be listed. */
  stagesWithoutBaseline: z.array(z.object({ id: z.string(), name: z.string() })),
  /** The `before` day of the filter, if any. */
  before: z.string().nullable(),
  /** The validation test of the filter, if any. */
  test: z.object({ id: z.string(), name: z.string(), stageId: z.string(), stage: z.string() }).nullable(),
});
export type ReflashList = z.infer<typeof ReflashListSchema>;

// ---- Import of an ECU identification read-out ---------------------------------------------

/** Read-out files: CSV or JSON up to 2 MB, at most 20,000 rows. */
export const IMPORT_MAX_BYTES = 2 * 1024 * 1024;
export const IMPORT_MAX_ROWS = 20_000;
export const IMPORT_FILE_FIELD = 'file';

/**
 * Column names accepted per value: the UDS data identifier (ISO 14229-1, read with service
 * 0x22) or a plain name. Matching ignores case, spaces, dashes, underscores and a `0x` prefix.
 */
export const IMPORT_COLUMNS = {
  tag: ['tag', 'asset', 'asset_tag', 'asset tag'],
  vin: ['F190', 'vin'],
  ecu: ['ecu', 'ecu_code', 'ecu code'],
  softwareNumber: ['F188', 'software_number', 'sw_number'],
  softwareVersion: ['F189', 'software_version', 'sw_version', 'version'],
  ecuSerial: ['F18C', 'ecu_serial', 'serial', 'serial_number'],
  hardwareNumber: ['F191', 'hardware_number', 'hw_number'],
  flashedAt: ['flashed_at', 'read_at', 'timestamp'],
} as const;
export type ImportColumn = keyof typeof IMPORT_COLUMNS;

/**
 * A read-out sent as a JSON body: `rows` holds what a JSON file would (flat rows keyed by the
 * names above, or one object per asset with its `ecus` list); each row is checked on its own.
 */
export const ImportBodySchema = z.strictObject({
  programId: uuid,
  rows: z.array(z.unknown()).min(1, 'Send at least one row.').max(IMPORT_MAX_ROWS, `At most ${IMPORT_MAX_ROWS} rows.`),
  skipInvalid: z.boolean().default(false),
});
/** Form fields beside the file in a multipart upload. */
export const ImportFormSchema = z.strictObject({
  programId: uuid,
  skipInvalid: z.enum(['true', 'false']).default('false').transform((v) => v === 'true'),
});

export const IMPORT_OUTCOMES = ['change', 'unchanged', 'unknown', 'invalid'] as const;
export const ImportOutcomeSchema = z.enum(IMPORT_OUTCOMES);
export type ImportOutcome = z.infer<typeof ImportOutcomeSchema>;

const ReadValuesSchema = z.object({
  softwareVersion: z.string(),
  softwareNumber: z.string(),
  hardwareNumber: z.string(),
  ecuSerial: z.string(),
});

export const ImportRowSchema = z.object({
  /** 1-based row of data (the header is not counted). */
  row: z.number().int(),
  /** `change`: will be (or was) written; `unchanged`: matches what is recorded; `unknown`: asset or ECU not found, or VIN not matching; `invalid`: a value refused. */
  outcome: ImportOutcomeSchema,
  reasons: z.array(z.string()),
  assetId: z.string().nullable(),
  tag: z.string().nullable(),
  vin: z.string().nullable(),
  ecuId: z.string().nullable(),
  ecuCode: z.string().nullable(),
  before: ReadValuesSchema.nullable(),
  after: ReadValuesSchema.nullable(),
  /** Fields that differ from the record (softwareVersion, softwareNumber, hardwareNumber, ecuSerial). */
  changes: z.array(z.string()),
  /** Conformance of the read version against the released baseline of the asset's stage. */
  status: ConformanceStatusSchema.nullable(),
});
export type ImportRow = z.infer<typeof ImportRowSchema>;

export const ImportPreviewSchema = z.object({
  rows: z.array(ImportRowSchema),
  summary: z.object({ change: z.number().int(), unchanged: z.number().int(), unknown: z.number().int(), invalid: z.number().int() }),
  /** The columns found, per value. */
  columns: z.record(z.string(), z.string()),
});
export type ImportPreview = z.infer<typeof ImportPreviewSchema>;
export const ImportResultSchema = ImportPreviewSchema.extend({ applied: z.number().int(), skipped: z.number().int() });
export type ImportResult = z.infer<typeof ImportResultSchema>;
