import { z } from 'zod';
import { FindingSeveritySchema } from './finding-enums';

export const SYSTEMS = ['body', 'chassis', 'high-voltage', 'low-voltage-harness', 'thermal', 'software', 'safety'] as const;
export const SystemSchema = z.enum(SYSTEMS);
export type System = z.infer<typeof SystemSchema>;
export const SYSTEM_LABELS: Record<System, string> = {
  body: 'Body',
  chassis: 'Chassis',
  'high-voltage': 'High-voltage',
  'low-voltage-harness': 'Low-voltage harness',
  thermal: 'Thermal',
  software: 'Software',
  safety: 'Safety',
};

export const ASSET_KINDS = ['bench-rig', 'vehicle', 'component'] as const;
export const AssetKindSchema = z.enum(ASSET_KINDS);
export type AssetKind = z.infer<typeof AssetKindSchema>;
export const ASSET_KIND_LABELS: Record<AssetKind, string> = { 'bench-rig': 'Bench rig', vehicle: 'Vehicle', component: 'Component' };

export const ASSET_STATUSES = ['in-build', 'in-test', 'available', 'assigned', 'down', 'retired'] as const;
export const AssetStatusSchema = z.enum(ASSET_STATUSES);
export type AssetStatus = z.infer<typeof AssetStatusSchema>;
export const ASSET_STATUS_LABELS: Record<AssetStatus, string> = {
  'in-build': 'In build',
  'in-test': 'In test',
  available: 'Available',
  assigned: 'Assigned',
  down: 'Down',
  retired: 'Retired',
};

export const DEFAULT_STAGES = ['Bench', 'Integration car', 'Early prototype', 'Validation build'] as const;
/** Prototype driving level needed per default stage, in DEFAULT_STAGES order (the product's own defaults). */
export const DEFAULT_STAGE_DRIVER_LEVELS = [0, 1, 2, 2] as const;
/** Driving level of a stage a lead adds: the strictest default, lowered by the lead if it suits. */
export const NEW_STAGE_DRIVER_LEVEL = 2;

const text = (max: number) => z.string().trim().max(max, `Use at most ${max} characters.`);
const uuid = z.uuid('Not a valid id.');

// ---- Stages -------------------------------------------------------------------------------

/** Gate settings of a stage (PRODUCT.md section 4; the product's own defaults). */
export const GateSettingsSchema = z.strictObject({
  goThreshold: z.number().min(0).max(100),
  conditionalThreshold: z.number().min(0).max(100),
  findingsBudget: z.number().positive().max(10_000),
  weights: z.strictObject({
    checklist: z.number().min(0).max(1),
    findings: z.number().min(0).max(1),
    software: z.number().min(0).max(1),
    validation: z.number().min(0).max(1),
  }),
});
export type GateSettings = z.infer<typeof GateSettingsSchema>;
export const DEFAULT_GATE: GateSettings = {
  goThreshold: 90,
  conditionalThreshold: 75,
  findingsBudget: 20,
  weights: { checklist: 0.4, findings: 0.3, software: 0.2, validation: 0.1 },
};

export const StageSchema = z.object({
  id: z.string(),
  programId: z.string(),
  name: z.string(),
  position: z.number().int(),
  retired: z.boolean(),
  gate: GateSettingsSchema,
  minDriverLevel: z.number().int().min(0).max(3),
  assetCount: z.number().int(),
  version: z.number().int(),
});
export type Stage = z.infer<typeof StageSchema>;
export const StageListSchema = z.object({ stages: z.array(StageSchema) });

export const CreateStageSchema = z.strictObject({
  programId: uuid,
  name: text(60).min(1, 'Enter a name.'),
});
export const UpdateStageSchema = z.strictObject({
  name: text(60).min(1, 'Enter a name.').optional(),
  retired: z.boolean().optional(),
  gate: GateSettingsSchema.optional(),
  minDriverLevel: z.number().int().min(0).max(3).optional(),
  version: z.number().int().min(0),
});
export const ReorderStagesSchema = z.strictObject({ programId: uuid, stageIds: z.array(uuid).min(1).max(50) });

// ---- VIN ----------------------------------------------------------------------------------

export const VinCheckSchema = z.object({
  wellFormed: z.boolean(),
  checkDigitValid: z.boolean(),
  expectedCheckDigit: z.string().nullable(),
  modelYears: z.array(z.number().int()),
  sections: z.object({ wmi: z.string(), vds: z.string(), vis: z.string() }),
  problems: z.array(z.string()),
});
export type VinCheck = z.infer<typeof VinCheckSchema>;

// ---- Assets -------------------------------------------------------------------------------

export const ChecklistProgressSchema = z.object({
  total: z.number().int(),
  done: z.number().int(),
  requiredTotal: z.number().int(),
  requiredDone: z.number().int(),
  deviations: z.number().int(),
});
export type ChecklistProgress = z.infer<typeof ChecklistProgressSchema>;

export const AssetSummarySchema = z.object({
  id: z.string(),
  programId: z.string(),
  tag: z.string(),
  kind: AssetKindSchema,
  stageId: z.string(),
  stage: z.string(),
  status: AssetStatusSchema,
  location: z.string(),
  vin: z.string().nullable(),
  odometerKm: z.number(),
  updatedAt: z.string(),
  checklist: ChecklistProgressSchema,
  thumbnailUrl: z.string().nullable(),
  /** False while an open safety finding stands (the findings issue fills the reason). */
  cleared: z.boolean(),
  notClearedReason: z.string().nullable(),
});
export type AssetSummary = z.infer<typeof AssetSummarySchema>;

export const AssetListSchema = z.object({ items: z.array(AssetSummarySchema), nextCursor: z.string().nullable() });
export type AssetList = z.infer<typeof AssetListSchema>;

export const ASSET_SORTS = ['tag', 'updated', 'stage', 'status', 'location'] as const;
export const AssetListQuerySchema = z.strictObject({
  programId: uuid,
  stage: uuid.optional(),
  status: AssetStatusSchema.optional(),
  kind: AssetKindSchema.optional(),
  location: text(80).optional(),
  q: text(80).optional(),
  sort: z.enum(ASSET_SORTS).default('tag'),
  dir: z.enum(['asc', 'desc']).default('asc'),
  cursor: z.string().max(400).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
});
export type AssetListQuery = z.input<typeof AssetListQuerySchema>;

export const PhotoSchema = z.object({
  id: z.string(),
  assetId: z.string(),
  checklistItemId: z.string().nullable(),
  findingId: z.string().nullable(),
  contentType: z.string(),
  bytes: z.number().int(),
  width: z.number().int().nullable(),
  height: z.number().int().nullable(),
  url: z.string(),
  thumbnailUrl: z.string(),
  createdAt: z.string(),
  createdBy: z.string().nullable(),
});
export type Photo = z.infer<typeof PhotoSchema>;

export const StageVisitSchema = z.object({
  /** The visit's id: `GET /api/assets/:id/checklist?visitId=` reads that visit's checklist. */
  id: z.string().optional(),
  stageId: z.string(),
  stage: z.string(),
  enteredAt: z.string(),
  leftAt: z.string().nullable(),
  by: z.string().nullable(),
  checklist: ChecklistProgressSchema,
});

export const AssetDetailSchema = AssetSummarySchema.extend({
  buildDate: z.string().nullable(),
  notes: z.string(),
  version: z.number().int(),
  vinCheck: VinCheckSchema.nullable(),
  stageHistory: z.array(StageVisitSchema),
  photos: z.array(PhotoSchema),
  program: z.object({ id: z.string(), code: z.string(), name: z.string() }),
});
export type AssetDetail = z.infer<typeof AssetDetailSchema>;

/** Tags like FW3-EP-014: letters, digits and dashes. */
export const TagSchema = text(32)
  .toUpperCase()
  .regex(/^[A-Z0-9][A-Z0-9-]{1,31}$/, 'Use letters, digits and dashes, for example FW3-EP-014.');
/** A VIN as typed: upper-cased and stripped of spaces; the full check is in shared/domain/vin. */
export const VinInputSchema = z
  .string()
  .trim()
  .toUpperCase()
  .transform((v) => v.replace(/\s+/g, ''))
  .pipe(z.string().max(17, 'A VIN has 17 characters.'));

export const CreateAssetSchema = z.strictObject({
  programId: uuid,
  tag: TagSchema,
  kind: AssetKindSchema,
  stageId: uuid,
  status: AssetStatusSchema.default('in-build'),
  location: text(80).default(''),
  vin: VinInputSchema.nullable().optional(),
  odometerKm: z.number().min(0).max(2_000_000).default(0),
  buildDate: z.iso.date().nullable().optional(),
  notes: text(4000).default(''),
});
export type CreateAsset = z.input<typeof CreateAssetSchema>;

export const UpdateAssetSchema = z.strictObject({
  tag: TagSchema.optional(),
  kind: AssetKindSchema.optional(),
  status: AssetStatusSchema.optional(),
  location: text(80).optional(),
  vin: VinInputSchema.nullable().optional(),
  odometerKm: z.number().min(0).max(2_000_000).optional(),
  buildDate: z.iso.date().nullable().optional(),
  notes: text(4000).optional(),
  version: z.number().int().min(0),
});
export type UpdateAsset = z.input<typeof UpdateAssetSchema>;

export const MoveStageSchema = z.strictObject({ stageId: uuid, version: z.number().int().min(0) });

// ---- Checklists ---------------------------------------------------------------------------

export const TemplateItemSchema = z.object({
  id: z.string(),
  stageId: z.string(),
  system: SystemSchema,
  title: z.string(),
  instructions: z.string(),
  expectedPartNumber: z.string(),
  expectedRevision: z.string(),
  requiredForGate: z.boolean(),
  hvQualified: z.boolean(),
  position: z.number().int(),
  retired: z.boolean(),
  version: z.number().int(),
});
export type TemplateItem = z.infer<typeof TemplateItemSchema>;
export const TemplateSchema = z.object({ stageId: z.string(), items: z.array(TemplateItemSchema) });

export const TemplateItemInputSchema = z.strictObject({
  system: SystemSchema,
  title: text(160).min(1, 'Enter a title.'),
  instructions: text(2000).default(''),
  expectedPartNumber: text(60).default(''),
  expectedRevision: text(20).default(''),
  requiredForGate: z.boolean().default(true),
  hvQualified: z.boolean().default(false),
});
// Written out field by field: zod 4 keeps each field's default inside .partial(), so a partial
// of the input schema would quietly reset every field a PATCH leaves out.
export const UpdateTemplateItemSchema = z.strictObject({
  system: SystemSchema.optional(),
  title: text(160).min(1, 'Enter a title.').optional(),
  instructions: text(2000).optional(),
  expectedPartNumber: text(60).optional(),
  expectedRevision: text(20).optional(),
  requiredForGate: z.boolean().optional(),
  hvQualified: z.boolean().optional(),
  retired: z.boolean().optional(),
  position: z.number().int().min(0).optional(),
  version: z.number().int().min(0),
});

export const ITEM_STATES = ['open', 'passed', 'deviation', 'not-applicable'] as const;
export const ItemStateSchema = z.enum(ITEM_STATES);
export type ItemState = z.infer<typeof ItemStateSchema>;
export const ITEM_STATE_LABELS: Record<ItemState, string> = {
  open: 'Open',
  passed: 'Passed',
  deviation: 'Deviation',
  'not-applicable': 'Not applicable',
};

export const ChecklistItemSchema = z.object({
  id: z.string(),
  assetId: z.string(),
  stageId: z.string(),
  system: SystemSchema,
  title: z.string(),
  instructions: z.string(),
  expectedPartNumber: z.string(),
  expectedRevision: z.string(),
  requiredForGate: z.boolean(),
  hvQualified: z.boolean(),
  position: z.number().int(),
  state: ItemStateSchema,
  fittedPartNumber: z.string(),
  fittedRevision: z.string(),
  notes: z.string(),
  naReason: z.string(),
  findingId: z.string().nullable(),
  updatedBy: z.string().nullable(),
  updatedAt: z.string(),
  version: z.number().int(),
  photos: z.array(PhotoSchema),
});
export type ChecklistItem = z.infer<typeof ChecklistItemSchema>;

export const ChecklistSchema = z.object({
  assetId: z.string(),
  stageId: z.string(),
  stage: z.string(),
  /** The stage visit this checklist belongs to; `current` false for a stage the asset has left (read-only). */
  visitId: z.string().optional(),
  current: z.boolean().optional(),
  progress: ChecklistProgressSchema,
  groups: z.array(
    z.object({ system: SystemSchema, progress: ChecklistProgressSchema, items: z.array(ChecklistItemSchema) }),
  ),
});
export type Checklist = z.infer<typeof ChecklistSchema>;

export const UpdateChecklistItemSchema = z
  .strictObject({
    state: ItemStateSchema,
    fittedPartNumber: text(60).optional(),
    fittedRevision: text(20).optional(),
    notes: text(2000).optional(),
    naReason: text(500).optional(),
    /** Required with a deviation: becomes a finding linked to the item (severity `major` unless given). */
    deviation: z
      .strictObject({
        description: text(2000).min(3, 'Describe the deviation in a few words.'),
        title: text(160).min(1).optional(),
        severity: FindingSeveritySchema.optional(),
      })
      .optional(),
    version: z.number().int().min(0),
  })
  .superRefine((v, ctx) => {
    if (v.state === 'not-applicable' && !v.naReason?.trim()) {
      ctx.addIssue({ code: 'custom', path: ['naReason'], message: 'Say why this item does not apply.' });
    }
  });
export type UpdateChecklistItem = z.input<typeof UpdateChecklistItemSchema>;

export const ChecklistQuerySchema = z.strictObject({ visitId: uuid.optional() });

// ---- History ------------------------------------------------------------------------------

export const HistoryEntrySchema = z.object({
  id: z.string(),
  at: z.string(),
  actor: z.object({ id: z.string(), name: z.string() }).nullable(),
  action: z.string(),
  entityType: z.string(),
  entityId: z.string(),
  before: z.unknown().nullable(),
  after: z.unknown().nullable(),
  note: z.string().nullable(),
});
export type HistoryEntry = z.infer<typeof HistoryEntrySchema>;
export const AssetHistorySchema = z.object({ entries: z.array(HistoryEntrySchema) });

// ---- Photos -------------------------------------------------------------------------------

export const PHOTO_MAX_BYTES = 10 * 1024 * 1024;
export const PHOTO_MAX_PIXELS = 40_000_000;
export const PHOTO_CLIENT_LONG_SIDE = 1600;
export const PHOTO_TYPES = ['image/jpeg', 'image/png', 'image/webp', 'image/heic', 'image/heif'] as const;
/** Field names of the multipart photo upload (`POST /api/assets/:id/photos`). */
export const PHOTO_FIELD = 'photo';
export const IDEMPOTENCY_HEADER = 'Idempotency-Key';
