import { z } from 'zod';
import { HistoryEntrySchema, PhotoSchema, SystemSchema } from './assets';
import { FINDING_STATUSES, FindingSeveritySchema, FindingStatusSchema } from './finding-enums';

// The severity and status enums live in finding-enums.ts (assets.ts needs them, and this file needs
// PhotoSchema from assets.ts: one file each way would be an import cycle).
export * from './finding-enums';

const text = (max: number) => z.string().trim().max(max, `Use at most ${max} characters.`);
const uuid = z.uuid('Not a valid id.');

export const PersonSchema = z.object({ id: z.string(), name: z.string() });
export type Person = z.infer<typeof PersonSchema>;

/** A calendar date, YYYY-MM-DD (no time zone: a due date is a day). */
export const DueDateSchema = z.iso.date('Use a date like 2026-12-31.');

// ---- Findings -----------------------------------------------------------------------------

export const FindingSchema = z.object({
  id: z.string(),
  programId: z.string(),
  assetId: z.string().nullable(),
  assetTag: z.string().nullable(),
  checklistItemId: z.string().nullable(),
  title: z.string(),
  description: z.string(),
  system: SystemSchema.nullable(),
  severity: FindingSeveritySchema,
  status: FindingStatusSchema,
  /** Why it was rejected (set while the status is `rejected`). */
  rejectReason: z.string().nullable(),
  owner: PersonSchema.nullable(),
  watchers: z.array(PersonSchema),
  dueDate: DueDateSchema.nullable(),
  /** Past its due date (UTC day) and not verified or rejected. */
  overdue: z.boolean(),
  /** An open `safety` finding: the asset is not cleared to be driven or powered. */
  blocksDriving: z.boolean(),
  photos: z.array(PhotoSchema),
  commentCount: z.number().int(),
  createdBy: PersonSchema.nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
  version: z.number().int(),
});
export type Finding = z.infer<typeof FindingSchema>;

/** Open (not verified, not rejected) findings per severity, for every filter of the list but `severity`. */
export const FindingCountsSchema = z.object({
  safety: z.number().int(),
  blocking: z.number().int(),
  major: z.number().int(),
  minor: z.number().int(),
});
export type FindingCounts = z.infer<typeof FindingCountsSchema>;

export const FindingListSchema = z.object({
  items: z.array(FindingSchema),
  nextCursor: z.string().nullable(),
  counts: FindingCountsSchema,
});
export type FindingList = z.infer<typeof FindingListSchema>;

const uniqueIds = z
  .array(uuid)
  .max(50, 'At most 50 watchers.')
  .transform((ids) => [...new Set(ids.map((id) => id.toLowerCase()))]);

export const CreateFindingSchema = z.strictObject({
  assetId: uuid,
  title: text(160).min(1, 'Enter a title.'),
  severity: FindingSeveritySchema,
  description: text(4000).optional(),
  system: SystemSchema.nullable().optional(),
  ownerId: uuid.nullable().optional(),
  watcherIds: uniqueIds.optional(),
  /** Not in the past (checked by the server against the earliest time zone's today). */
  dueDate: DueDateSchema.nullable().optional(),
  checklistItemId: uuid.optional(),
});
export type CreateFinding = z.input<typeof CreateFindingSchema>;

export const UpdateFindingSchema = z
  .strictObject({
    version: z.number().int().min(0),
    title: text(160).min(1, 'Enter a title.').optional(),
    description: text(4000).optional(),
    severity: FindingSeveritySchema.optional(),
    system: SystemSchema.nullable().optional(),
    ownerId: uuid.nullable().optional(),
    watcherIds: uniqueIds.optional(),
    dueDate: DueDateSchema.nullable().optional(),
    status: FindingStatusSchema.optional(),
    /** Required to reject (stored as the reject reason) and to reopen (kept in the history). */
    reason: text(500).optional(),
  })
  .superRefine((v, ctx) => {
    if (v.status === 'rejected' && !v.reason) {
      ctx.addIssue({ code: 'custom', path: ['reason'], message: 'Say why the finding is rejected.' });
    }
  });
export type UpdateFinding = z.input<typeof UpdateFindingSchema>;

export const FINDING_SORTS = ['due', 'age', 'updated'] as const;
export const FINDING_MINE = ['owner', 'watching', 'created'] as const;
/** `active`: every status but verified and rejected. */
export const FindingStatusFilterSchema = z.enum([...FINDING_STATUSES, 'active']);

const queryBoolean = z
  .union([z.boolean(), z.enum(['true', 'false'])])
  .transform((v) => v === true || v === 'true');

/**
 * Sorts: `due` by due date (findings without one come last in either direction), `age` by
 * creation time (`asc` = oldest first), `updated` by last change. The id breaks ties.
 */
export const FindingListQuerySchema = z.strictObject({
  programId: uuid,
  assetId: uuid.optional(),
  mine: z.enum(FINDING_MINE).optional(),
  severity: FindingSeveritySchema.optional(),
  status: FindingStatusFilterSchema.optional(),
  system: SystemSchema.optional(),
  /** A user id, or `none` for findings nobody owns. */
  ownerId: z.union([uuid, z.literal('none')]).optional(),
  overdue: queryBoolean.optional(),
  sort: z.enum(FINDING_SORTS).default('due'),
  dir: z.enum(['asc', 'desc']).default('asc'),
  cursor: z.string().max(400).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
});
export type FindingListQuery = z.input<typeof FindingListQuerySchema>;

// ---- Comments -----------------------------------------------------------------------------

export const CommentSchema = z.object({
  id: z.string(),
  findingId: z.string(),
  author: PersonSchema.nullable(),
  body: z.string(),
  createdAt: z.string(),
});
export type Comment = z.infer<typeof CommentSchema>;
export const CommentListSchema = z.object({ items: z.array(CommentSchema) });

export const CreateCommentSchema = z.strictObject({
  body: text(4000).min(1, 'Write a comment.'),
});
export type CreateComment = z.input<typeof CreateCommentSchema>;

// ---- History ------------------------------------------------------------------------------

export const FindingHistorySchema = z.object({ entries: z.array(HistoryEntrySchema) });

// ---- E-mail preferences -------------------------------------------------------------------

/** Kinds of finding e-mail a user can turn off; a kind missing from the stored preferences is on. */
export const EMAIL_KINDS = ['assigned', 'status', 'digest', 'fleet'] as const;
export type EmailKind = (typeof EMAIL_KINDS)[number];
export const EMAIL_KIND_LABELS: Record<EmailKind, string> = {
  assigned: 'A finding is assigned to me',
  status: 'A finding I own or watch changes status',
  digest: 'Daily digest of overdue findings',
  fleet: 'Vehicle bookings and overdue returns',
};

export const EmailPrefsSchema = z.strictObject({
  assigned: z.boolean(),
  status: z.boolean(),
  digest: z.boolean(),
  fleet: z.boolean(),
});
export type EmailPrefs = z.infer<typeof EmailPrefsSchema>;

/** The `Idempotency-Key` header: 8 to 100 letters, digits, dots, colons, dashes or underscores. */
export const IdempotencyKeySchema = z.string().regex(/^[A-Za-z0-9_.:-]{8,100}$/, 'Use 8 to 100 letters, digits, dashes or underscores.');
