import { z } from 'zod';
import { AssetKindSchema, AssetStatusSchema, PhotoSchema } from './assets';
import { RoleSchema } from './auth';
import { FindingSeveritySchema } from './finding-enums';

// The fleet contract (PRODUCT.md section 3E, issue 6): drivers and their qualifications,
// assignments of vehicles to drivers, check-out and check-in, utilisation and proposals.

const text = (max: number) => z.string().trim().max(max, `Use at most ${max} characters.`);
const uuid = z.uuid('Not a valid id.');
const DateSchema = z.iso.date('Use a date like 2026-12-31.');
/** An instant with its offset, e.g. 2026-12-03T08:00:00Z or 2026-12-03T09:00:00+01:00. */
const InstantSchema = z.iso.datetime({ offset: true, message: 'Use a date and time like 2026-12-03T08:00:00Z.' });
const PersonSchema = z.object({ id: z.string(), name: z.string() });

/** The driving pages show this (PRODUCT.md section 6). */
export const ROAD_USE_CAUTION =
  'Public-road use of a prototype needs the permits and plates the local rules require. Follow your site’s safety procedures before every drive.';

// ---- Drivers ------------------------------------------------------------------------------

/** Prototype driving level: 0 none, 1 to 3 (the stage's minimum is on the stage, `minDriverLevel`). */
export const DRIVING_LEVELS = [0, 1, 2, 3] as const;
export const DrivingLevelSchema = z.number().int().min(0, 'Use a level from 0 to 3.').max(3, 'Use a level from 0 to 3.');
export const DRIVING_LEVEL_LABELS: Record<number, string> = { 0: 'None', 1: 'Level 1', 2: 'Level 2', 3: 'Level 3' };
/** A licence that expires within this many days is flagged (issue 6). */
export const LICENCE_WARNING_DAYS = 30;

export const DriverProfileSchema = z.object({
  userId: z.string(),
  name: z.string(),
  email: z.string(),
  role: RoleSchema,
  drivingLevel: z.number().int().min(0).max(3),
  hvAwareness: z.boolean(),
  hvAwarenessDate: DateSchema.nullable(),
  /** Last day the driving licence is valid (inclusive, UTC). */
  licenceExpiry: DateSchema.nullable(),
  notes: z.string(),
  /** Valid today but expires within LICENCE_WARNING_DAYS days. */
  licenceExpiresSoon: z.boolean(),
  /** Expired before today (or no expiry recorded: `licenceExpiry` null). */
  licenceExpired: z.boolean(),
  /** False while nobody has filled in the profile (the values above are then the defaults). */
  hasProfile: z.boolean(),
  /** Send it back with PUT; 0 while there is no profile yet. */
  version: z.number().int(),
});
export type DriverProfile = z.infer<typeof DriverProfileSchema>;
export const DriverListSchema = z.object({ items: z.array(DriverProfileSchema) });
export type DriverList = z.infer<typeof DriverListSchema>;

const queryBoolean = z.union([z.boolean(), z.enum(['true', 'false'])]).transform((v) => v === true || v === 'true');

/** `all=true` lists every working member of the program, not only drivers and people with a profile. */
export const DriverListQuerySchema = z.strictObject({ programId: uuid, all: queryBoolean.optional() });

export const UpdateDriverProfileSchema = z
  .strictObject({
    drivingLevel: DrivingLevelSchema,
    hvAwareness: z.boolean(),
    hvAwarenessDate: DateSchema.nullable().optional(),
    licenceExpiry: DateSchema.nullable(),
    notes: text(2000).default(''),
    version: z.number().int().min(0),
  })
  .superRefine((v, ctx) => {
    if (v.hvAwareness && !v.hvAwarenessDate) {
      ctx.addIssue({ code: 'custom', path: ['hvAwarenessDate'], message: 'Give the date of the high-voltage awareness training.' });
    }
  });
export type UpdateDriverProfile = z.input<typeof UpdateDriverProfileSchema>;

// ---- Assignments --------------------------------------------------------------------------

export const ASSIGNMENT_PURPOSES = ['durability-route', 'ride-handling', 'climate', 'demonstration', 'other'] as const;
export const AssignmentPurposeSchema = z.enum(ASSIGNMENT_PURPOSES);
export type AssignmentPurpose = z.infer<typeof AssignmentPurposeSchema>;
export const ASSIGNMENT_PURPOSE_LABELS: Record<AssignmentPurpose, string> = {
  'durability-route': 'Durability route',
  'ride-handling': 'Ride and handling',
  climate: 'Climate',
  demonstration: 'Demonstration',
  other: 'Other',
};

export const ASSIGNMENT_STATUSES = ['planned', 'checked-out', 'returned', 'cancelled'] as const;
export const AssignmentStatusSchema = z.enum(ASSIGNMENT_STATUSES);
export type AssignmentStatus = z.infer<typeof AssignmentStatusSchema>;
export const ASSIGNMENT_STATUS_LABELS: Record<AssignmentStatus, string> = {
  planned: 'Planned',
  'checked-out': 'Checked out',
  returned: 'Returned',
  cancelled: 'Cancelled',
};

/** A window longer than this is refused as a typing mistake (the product's own choice). */
export const MAX_WINDOW_DAYS = 31;
/** A window shorter than this is refused (the product's own choice). */
export const MIN_WINDOW_MINUTES = 15;

export const AssignmentCheckSchema = z.object({
  odometerKm: z.number(),
  chargePercent: z.number(),
  at: z.string(),
  by: PersonSchema.nullable(),
  notes: z.string(),
  photos: z.array(PhotoSchema),
});
export const AssignmentCheckInSchema = AssignmentCheckSchema.extend({
  damageNotes: z.string(),
  /** The finding filed on the vehicle from the damage notes. */
  findingId: z.string().nullable(),
});

export const AssignmentSchema = z.object({
  id: z.string(),
  programId: z.string(),
  assetId: z.string(),
  assetTag: z.string(),
  /** The vehicle as it is now: what the driver checks before taking it. */
  vehicle: z.object({
    status: AssetStatusSchema,
    stageId: z.string(),
    stage: z.string(),
    minDriverLevel: z.number().int(),
    odometerKm: z.number(),
    cleared: z.boolean(),
    notClearedReason: z.string().nullable(),
  }),
  driver: PersonSchema,
  startsAt: z.string(),
  endsAt: z.string(),
  purpose: AssignmentPurposeSchema,
  notes: z.string(),
  status: AssignmentStatusSchema,
  /** Set when a coordinator or lead booked a driver below the stage's level; kept in the history too. */
  levelOverrideReason: z.string().nullable(),
  cancelReason: z.string().nullable(),
  /** Checked out and past its end without a check-in. */
  overdueReturn: z.boolean(),
  checkout: AssignmentCheckSchema.nullable(),
  checkin: AssignmentCheckInSchema.nullable(),
  createdBy: PersonSchema.nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
  version: z.number().int(),
});
export type Assignment = z.infer<typeof AssignmentSchema>;

export const AssignmentListSchema = z.object({
  items: z.array(AssignmentSchema),
  /** True when more than ASSIGNMENT_LIST_MAX matched: narrow the period or the filters. */
  truncated: z.boolean(),
});
export type AssignmentList = z.infer<typeof AssignmentListSchema>;
export const ASSIGNMENT_LIST_MAX = 1000;
/** The longest period one list may cover. */
export const ASSIGNMENT_LIST_MAX_DAYS = 366;

/** What is wrong with a window, in words (field `endsAt`), or null: ends after it starts, within the length bounds. */
export function windowProblem(startsAt: string, endsAt: string): string | null {
  const ms = Date.parse(endsAt) - Date.parse(startsAt);
  if (!(ms > 0)) return 'The window must end after it starts.';
  if (ms < MIN_WINDOW_MINUTES * 60_000) return `A window lasts at least ${MIN_WINDOW_MINUTES} minutes.`;
  if (ms > MAX_WINDOW_DAYS * 24 * 3600_000) return `A window lasts at most ${MAX_WINDOW_DAYS} days; book a longer use as several.`;
  return null;
}

function checkWindow(v: { startsAt?: string; endsAt?: string }, ctx: z.RefinementCtx) {
  if (!v.startsAt || !v.endsAt) return;
  const problem = windowProblem(v.startsAt, v.endsAt);
  if (problem) ctx.addIssue({ code: 'custom', path: ['endsAt'], message: problem });
}

/** An override reason: said in words, or not at all. */
const OverrideReasonSchema = text(500).min(5, 'Say in a few words why the driver may take this vehicle below its stage’s level.');

export const CreateAssignmentSchema = z
  .strictObject({
    programId: uuid,
    assetId: uuid,
    driverId: uuid,
    startsAt: InstantSchema,
    endsAt: InstantSchema,
    purpose: AssignmentPurposeSchema,
    notes: text(2000).default(''),
    /** Books a driver whose level is below the stage's minimum (coordinator or lead). Never overrides the safety rule. */
    levelOverrideReason: OverrideReasonSchema.optional(),
  })
  .superRefine(checkWindow);
export type CreateAssignment = z.input<typeof CreateAssignmentSchema>;

export const UpdateAssignmentSchema = z
  .strictObject({
    version: z.number().int().min(0),
    assetId: uuid.optional(),
    driverId: uuid.optional(),
    startsAt: InstantSchema.optional(),
    endsAt: InstantSchema.optional(),
    purpose: AssignmentPurposeSchema.optional(),
    notes: text(2000).optional(),
    levelOverrideReason: OverrideReasonSchema.optional(),
  })
  .superRefine(checkWindow);
export type UpdateAssignment = z.input<typeof UpdateAssignmentSchema>;

export const CancelAssignmentSchema = z.strictObject({
  version: z.number().int().min(0),
  reason: text(500).optional(),
});
export type CancelAssignment = z.input<typeof CancelAssignmentSchema>;

const ODOMETER_MAX_KM = 2_000_000;
const photoIds = z.array(uuid).max(20, 'At most 20 photos.').default([]);

/** Photos are uploaded first (`POST /api/assets/:assetId/photos`), then linked here by id. */
export const CheckOutSchema = z.strictObject({
  odometerKm: z.number().min(0).max(ODOMETER_MAX_KM),
  chargePercent: z.number().min(0).max(100),
  notes: text(2000).default(''),
  photoIds,
});
export type CheckOut = z.input<typeof CheckOutSchema>;

export const CheckInSchema = z.strictObject({
  odometerKm: z.number().min(0).max(ODOMETER_MAX_KM),
  chargePercent: z.number().min(0).max(100),
  notes: text(2000).default(''),
  /** Non-empty: becomes a finding on the vehicle (severity `damageSeverity`, `major` unless given). */
  damageNotes: text(4000).default(''),
  damageSeverity: FindingSeveritySchema.optional(),
  photoIds,
});
export type CheckIn = z.input<typeof CheckInSchema>;

export const AssignmentListQuerySchema = z.strictObject({
  programId: uuid,
  /** The period the windows overlap; defaults to 30 days back and 60 days ahead of now. */
  from: InstantSchema.optional(),
  to: InstantSchema.optional(),
  assetId: uuid.optional(),
  driverId: uuid.optional(),
  stageId: uuid.optional(),
  purpose: AssignmentPurposeSchema.optional(),
  status: AssignmentStatusSchema.optional(),
  /** Only the caller's own assignments. */
  mine: queryBoolean.optional(),
  /** Only checked-out assignments past their end. */
  overdue: queryBoolean.optional(),
});
export type AssignmentListQuery = z.input<typeof AssignmentListQuerySchema>;

// ---- Refusals -----------------------------------------------------------------------------

export const REFUSAL_CODES = [
  'vehicle-overlap',
  'driver-overlap',
  'vehicle-not-cleared',
  'vehicle-unavailable',
  'vehicle-in-use',
  'driver-level',
  'licence-expired',
  'licence-unknown',
] as const;
export type RefusalCode = (typeof REFUSAL_CODES)[number];

export const RefusalReasonSchema = z.object({
  code: z.enum(REFUSAL_CODES),
  message: z.string(),
  /** Only `driver-level` is: by a coordinator or lead, with `levelOverrideReason`. */
  overridable: z.boolean(),
  /** The assignments an overlap is with. */
  assignmentIds: z.array(z.string()).optional(),
});
export type RefusalReason = z.infer<typeof RefusalReasonSchema>;

/** 422 body when an assignment is refused: every reason that applies, not only the first. */
export const AssignmentRefusalSchema = z.object({
  error: z.object({
    code: z.literal('assignment/refused'),
    message: z.string(),
    details: z.object({ reasons: z.array(RefusalReasonSchema) }),
  }),
});
export type AssignmentRefusal = z.infer<typeof AssignmentRefusalSchema>;

// ---- Utilisation --------------------------------------------------------------------------

export const UtilisationQuerySchema = z
  .strictObject({ programId: uuid, from: InstantSchema, to: InstantSchema })
  .superRefine((v, ctx) => {
    const ms = Date.parse(v.to) - Date.parse(v.from);
    if (ms <= 0) ctx.addIssue({ code: 'custom', path: ['to'], message: 'The period must end after it starts.' });
    else if (ms > ASSIGNMENT_LIST_MAX_DAYS * 24 * 3600_000) {
      ctx.addIssue({ code: 'custom', path: ['to'], message: `A period covers at most ${ASSIGNMENT_LIST_MAX_DAYS} days.` });
    }
  });

const UtilisationFiguresSchema = z.object({
  assignedHours: z.number(),
  availableHours: z.number(),
  /** assignedHours / availableHours, 0 to 1 (0 when no hours are available). */
  utilisation: z.number(),
});
export const UtilisationSchema = z.object({
  from: z.string(),
  to: z.string(),
  /** How the figures are defined, in words, for the screen and the export. */
  definition: z.string(),
  vehicles: z.array(
    UtilisationFiguresSchema.extend({ assetId: z.string(), tag: z.string(), stageId: z.string(), stage: z.string(), status: AssetStatusSchema, assignments: z.number().int() }),
  ),
  stages: z.array(UtilisationFiguresSchema.extend({ stageId: z.string(), stage: z.string(), vehicles: z.number().int() })),
  total: UtilisationFiguresSchema,
});
export type Utilisation = z.infer<typeof UtilisationSchema>;

// ---- Proposals ----------------------------------------------------------------------------

export const ProposalRequestSchema = z
  .strictObject({
    purpose: AssignmentPurposeSchema,
    startsAt: InstantSchema,
    endsAt: InstantSchema,
    /** What the request needs: one vehicle, a vehicle of a stage, or of a kind (any vehicle when none is given). */
    assetId: uuid.optional(),
    stageId: uuid.optional(),
    assetKind: AssetKindSchema.optional(),
    notes: text(2000).optional(),
  })
  .superRefine(checkWindow);
export type ProposalRequest = z.input<typeof ProposalRequestSchema>;

export const PROPOSAL_MAX_REQUESTS = 30;
export const CreateProposalSchema = z.strictObject({
  programId: uuid,
  requests: z.array(ProposalRequestSchema).min(1, 'Add at least one request.').max(PROPOSAL_MAX_REQUESTS, `At most ${PROPOSAL_MAX_REQUESTS} requests.`),
});
export type CreateProposal = z.input<typeof CreateProposalSchema>;

export const ProposalSchema = z.object({
  programId: z.string(),
  pairs: z.array(
    z.object({
      /** Index into the requests sent. */
      request: z.number().int(),
      assetId: z.string(),
      assetTag: z.string(),
      driver: PersonSchema,
      purpose: AssignmentPurposeSchema,
      startsAt: z.string(),
      endsAt: z.string(),
      notes: z.string(),
      cost: z.number(),
      /** Why this pair, in words. */
      explanation: z.string(),
    }),
  ),
  unfilled: z.array(z.object({ request: z.number().int(), reasons: z.array(z.string()) })),
  totalCost: z.number(),
  /** How the costs are made, in words. */
  costModel: z.string(),
});
export type Proposal = z.infer<typeof ProposalSchema>;

export const AcceptProposalSchema = z.strictObject({
  programId: uuid,
  pairs: z
    .array(
      z
        .strictObject({
          assetId: uuid,
          driverId: uuid,
          startsAt: InstantSchema,
          endsAt: InstantSchema,
          purpose: AssignmentPurposeSchema,
          notes: text(2000).default(''),
        })
        .superRefine(checkWindow),
    )
    .min(1, 'Choose at least one pair.')
    .max(PROPOSAL_MAX_REQUESTS),
});
export type AcceptProposal = z.input<typeof AcceptProposalSchema>;

export const AcceptProposalResultSchema = z.object({
  created: z.array(AssignmentSchema),
  /** Pairs refused since the proposal was made (index into `pairs`), with the error body. */
  refused: z.array(z.object({ pair: z.number().int(), error: z.object({ code: z.string(), message: z.string(), details: z.unknown().optional() }) })),
});

// ---- The solver endpoint ------------------------------------------------------------------

/** Largest matrix `POST /api/calc/assignment` takes, each way. */
export const SOLVER_MAX_SIZE = 200;
/** Costs stay within this bound so that sums stay exact in double precision. */
export const SOLVER_MAX_ABS_COST = 1e9;

export const SolveAssignmentSchema = z
  .strictObject({
    costs: z
      .array(
        z
          .array(
            z
              .number('Each cost is a number, or null for a forbidden pair.')
              .min(-SOLVER_MAX_ABS_COST, `Use costs between -${SOLVER_MAX_ABS_COST} and ${SOLVER_MAX_ABS_COST}.`)
              .max(SOLVER_MAX_ABS_COST, `Use costs between -${SOLVER_MAX_ABS_COST} and ${SOLVER_MAX_ABS_COST}.`)
              .nullable(),
          )
          .min(1, 'A row has at least one cost.')
          .max(SOLVER_MAX_SIZE, `At most ${SOLVER_MAX_SIZE} columns.`),
      )
      .min(1, 'Give at least one row.')
      .max(SOLVER_MAX_SIZE, `At most ${SOLVER_MAX_SIZE} rows.`),
  })
  .superRefine((v, ctx) => {
    const width = v.costs[0]?.length ?? 0;
    v.costs.forEach((row, i) => {
      if (row.length !== width) {
        ctx.addIssue({ code: 'custom', path: ['costs', i], message: `Every row has the same number of costs (row 0 has ${width}, this one ${row.length}).` });
      }
    });
  });
export type SolveAssignment = z.input<typeof SolveAssignmentSchema>;

export const AssignmentSolutionSchema = z.object({
  /** `[row, column]`, one per row that got an allowed column (rows beyond the columns, or with only forbidden columns left, get none). */
  pairs: z.array(z.tuple([z.number().int(), z.number().int()])),
  totalCost: z.number(),
});
export type AssignmentSolution = z.infer<typeof AssignmentSolutionSchema>;
