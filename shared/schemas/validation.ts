import { z } from 'zod';
import { humidityProblem, temperatureProblem, TEMPERATURE_MAX_C, TEMPERATURE_MIN_C } from '../domain/dew-point';
import { demonstratedProblems, sampleSizeProblems, type InputProblem } from '../domain/reliability';

// The validation plan (DVP&R), test campaigns and the calculations behind them (issue 7;
// PRODUCT.md section 3F). One schema per shape: the server parses requests with these, the
// client parses answers and builds its forms from them.

const text = (max: number) => z.string().trim().max(max, `Use at most ${max} characters.`);
const uuid = z.uuid('Not a valid id.');
const version = z.number().int().min(0);

/** Limits that keep every number sane; the domain checks the open ranges ((0, 1) and > 0). */
export const TEST_TO_LIFE_MAX = 1000;
export const SHAPE_MAX = 50;
export const STEP_HOURS_MAX = 100_000;
export const STEP_KM_MAX = 10_000_000;
export const CAMPAIGN_STEPS_MAX = 100;
export const CAMPAIGN_LOG_MAX_CHARS = 1_000_000;
export const CAMPAIGN_LOG_MAX_ROWS = 5000;
export const REPORT_MAX_BYTES = 20 * 1024 * 1024;
export const REPORT_FIELD = 'report';

function addProblems(problems: InputProblem[], ctx: z.RefinementCtx) {
  for (const p of problems) ctx.addIssue({ code: 'custom', path: [p.field], message: p.message });
}

// ---- Calculations -------------------------------------------------------------------------

/** A number from the query string: blank is "not given"; anything else must read as a finite number. */
const readQueryNumber = (v: unknown) => (typeof v === 'string' ? (v.trim() === '' ? undefined : Number(v.trim())) : v);
const queryNumber = (what: string) =>
  z.preprocess(readQueryNumber, z.number({ error: (issue) => (issue.input === undefined ? 'This parameter is required.' : `Enter ${what}.`) }));
/** Optional: `?testToLife=` (blank) is the same as leaving it out. */
const optionalQueryNumber = (what: string) => z.preprocess(readQueryNumber, z.number({ error: `Enter ${what}.` }).optional());

export const SampleSizeQuerySchema = z
  .strictObject({
    reliability: queryNumber('a number between 0 and 1, for example 0.9'),
    confidence: queryNumber('a number between 0 and 1, for example 0.9'),
    testToLife: optionalQueryNumber('a number greater than 0'),
    shape: optionalQueryNumber('a number greater than 0'),
  })
  .superRefine((q, ctx) => addProblems(sampleSizeProblems(q), ctx));

export const SampleSizeResultSchema = z.object({ n: z.number().int(), exact: z.number() });
export type SampleSizeResult = z.infer<typeof SampleSizeResultSchema>;

export const DemonstratedReliabilityQuerySchema = z
  .strictObject({
    samples: queryNumber('a whole number of samples'),
    confidence: queryNumber('a number between 0 and 1, for example 0.9'),
    testToLife: optionalQueryNumber('a number greater than 0'),
    shape: optionalQueryNumber('a number greater than 0'),
  })
  .superRefine((q, ctx) => addProblems(demonstratedProblems(q), ctx));

export const DemonstratedReliabilityResultSchema = z.object({ reliability: z.number() });

export const DewPointQuerySchema = z
  .strictObject({
    temperature: queryNumber('a temperature in degrees Celsius'),
    humidity: queryNumber('a relative humidity in percent'),
  })
  .superRefine((q, ctx) =>
    addProblems([temperatureProblem('temperature', q.temperature), humidityProblem('humidity', q.humidity)].filter((p) => p !== null), ctx),
  );

/** Dew point in degC (over water, two decimals) and a caution where one applies (below 0 degC, outside the fitted range). */
export const DewPointResultSchema = z.object({ dewPoint: z.number(), note: z.string().nullable() });
export type DewPointResult = z.infer<typeof DewPointResultSchema>;

// ---- Validation plan ----------------------------------------------------------------------

export const ALLOCATION_STATUSES = ['planned', 'running', 'passed', 'failed'] as const;
export const AllocationStatusSchema = z.enum(ALLOCATION_STATUSES);
export type AllocationStatus = z.infer<typeof AllocationStatusSchema>;
export const ALLOCATION_STATUS_LABELS: Record<AllocationStatus, string> = {
  planned: 'Planned',
  running: 'Running',
  passed: 'Passed',
  failed: 'Failed',
};

/**
 * A test's status, from its allocations: `failed` when any failed; `passed` when at least the
 * required number of samples passed; `running` when any runs or has passed; else `planned`.
 */
export const TEST_STATUSES = ['planned', 'running', 'passed', 'failed'] as const;
export const TestStatusSchema = z.enum(TEST_STATUSES);
export type TestStatus = z.infer<typeof TestStatusSchema>;

export const AllocationSchema = z.object({
  id: z.string(),
  testId: z.string(),
  assetId: z.string(),
  assetTag: z.string(),
  status: AllocationStatusSchema,
  resultNotes: z.string(),
  /** The newest report (a PDF or an image), stored like a photo: `GET /api/photos/:id`. */
  reportPhotoId: z.string().nullable(),
  /** Signed URL of that report (valid about an hour; an `<a href>` or `<img src>` can use it). */
  reportUrl: z.string().nullable(),
  reportContentType: z.string().nullable(),
  /** The finding a failed result opened (severity blocking). */
  findingId: z.string().nullable(),
  updatedAt: z.string(),
  version: z.number().int(),
});
export type Allocation = z.infer<typeof AllocationSchema>;

export const ValidationTestSchema = z.object({
  id: z.string(),
  programId: z.string(),
  stageId: z.string(),
  stage: z.string(),
  name: z.string(),
  /** A standard (e.g. IEC 60068-2-30 Db) or an internal procedure number. */
  procedureRef: z.string(),
  /** What the test verifies (requirement, function). */
  verifies: z.string(),
  reliability: z.number(),
  confidence: z.number(),
  testToLife: z.number().nullable(),
  shape: z.number().nullable(),
  /** Samples to pass with no failure: ln(1-C)/ln(R), or ln(1-C)/(L^b ln R), rounded up. */
  requiredSamples: z.number().int(),
  /** The same before rounding. */
  requiredSamplesExact: z.number(),
  status: TestStatusSchema,
  passedSamples: z.number().int(),
  /** (1-C)^(1/(n L^b)) for the n samples passed so far, while none failed; else null. */
  demonstratedReliability: z.number().nullable(),
  allocations: z.array(AllocationSchema),
  version: z.number().int(),
});
export type ValidationTest = z.infer<typeof ValidationTestSchema>;
export const ValidationTestListSchema = z.object({ tests: z.array(ValidationTestSchema) });
export type ValidationTestList = z.infer<typeof ValidationTestListSchema>;

export const ValidationTestListQuerySchema = z.strictObject({ programId: uuid, stageId: uuid.optional() });

const reliabilityFields = {
  reliability: z.number({ error: 'Enter a number between 0 and 1, for example 0.9.' }),
  confidence: z.number({ error: 'Enter a number between 0 and 1, for example 0.9.' }),
  testToLife: z.number().max(TEST_TO_LIFE_MAX, `At most ${TEST_TO_LIFE_MAX}.`).nullable().optional(),
  shape: z.number().max(SHAPE_MAX, `At most ${SHAPE_MAX}.`).nullable().optional(),
};

export const CreateValidationTestSchema = z
  .strictObject({
    stageId: uuid,
    name: text(160).min(1, 'Enter a name.'),
    procedureRef: text(120).default(''),
    verifies: text(2000).default(''),
    ...reliabilityFields,
  })
  .superRefine((v, ctx) => addProblems(sampleSizeProblems(v), ctx));
export type CreateValidationTest = z.input<typeof CreateValidationTestSchema>;

/** Changes to a test; R, C, L and b are checked together with the values they join. */
export const UpdateValidationTestSchema = z.strictObject({
  stageId: uuid.optional(),
  name: text(160).min(1, 'Enter a name.').optional(),
  procedureRef: text(120).optional(),
  verifies: text(2000).optional(),
  reliability: reliabilityFields.reliability.optional(),
  confidence: reliabilityFields.confidence.optional(),
  testToLife: reliabilityFields.testToLife,
  shape: reliabilityFields.shape,
  version,
});
export type UpdateValidationTest = z.input<typeof UpdateValidationTestSchema>;

export const CreateAllocationSchema = z.strictObject({ assetId: uuid });

export const UpdateAllocationSchema = z.strictObject({
  status: AllocationStatusSchema.optional(),
  resultNotes: text(4000).optional(),
  version,
});
export type UpdateAllocation = z.input<typeof UpdateAllocationSchema>;

// ---- Test campaigns -----------------------------------------------------------------------

export const CAMPAIGN_KINDS = ['climate', 'durability'] as const;
export const CampaignKindSchema = z.enum(CAMPAIGN_KINDS);
export type CampaignKindValue = z.infer<typeof CampaignKindSchema>;

const positive = (max: number, unit: string) =>
  z.number().positive('Must be greater than 0.').max(max, `At most ${max} ${unit}.`).nullable().optional();

export const CampaignStepInputSchema = z
  .strictObject({
    /** An existing step's id keeps its hours and km done; a step without one is new. */
    id: uuid.optional(),
    name: text(120).min(1, 'Enter a name.'),
    durationHours: positive(STEP_HOURS_MAX, 'h'),
    distanceKm: positive(STEP_KM_MAX, 'km'),
    /** Chamber temperature in degC (for a ramp, the temperature it ends at). */
    temperatureC: z.number().min(TEMPERATURE_MIN_C, `At least ${TEMPERATURE_MIN_C} °C.`).max(TEMPERATURE_MAX_C, `At most ${TEMPERATURE_MAX_C} °C.`).nullable().optional(),
    humidityPct: z.number().gt(0, 'Must be more than 0 %.').max(100, 'At most 100 %.').nullable().optional(),
    route: text(120).nullable().optional(),
  })
  .superRefine((s, ctx) => {
    if (s.humidityPct != null && s.temperatureC == null) {
      ctx.addIssue({ code: 'custom', path: ['temperatureC'], message: 'Give the chamber temperature with the humidity.' });
    }
  });
export type CampaignStepInput = z.input<typeof CampaignStepInputSchema>;

const stepsFor = z.array(CampaignStepInputSchema).min(1, 'Plan at least one step.').max(CAMPAIGN_STEPS_MAX, `At most ${CAMPAIGN_STEPS_MAX} steps.`);

/** Climate steps are planned in hours, durability steps in km; step names are unique in a campaign (the CSV log names them). */
function checkSteps(kind: CampaignKindValue, steps: ReadonlyArray<z.output<typeof CampaignStepInputSchema>>, ctx: z.RefinementCtx) {
  const seen = new Set<string>();
  steps.forEach((s, i) => {
    if (kind === 'climate' && s.durationHours == null) {
      ctx.addIssue({ code: 'custom', path: ['steps', i, 'durationHours'], message: 'A climate step needs its duration in hours.' });
    }
    if (kind === 'durability' && s.distanceKm == null) {
      ctx.addIssue({ code: 'custom', path: ['steps', i, 'distanceKm'], message: 'A durability step needs its distance in km.' });
    }
    const key = s.name.toLowerCase();
    if (seen.has(key)) ctx.addIssue({ code: 'custom', path: ['steps', i, 'name'], message: 'Another step has this name.' });
    seen.add(key);
  });
}

export const CreateCampaignSchema = z
  .strictObject({
    name: text(160).min(1, 'Enter a name.'),
    kind: CampaignKindSchema,
    /** When the run started; otherwise set by the first hours or km recorded. */
    startedAt: z.iso.datetime({ offset: true, error: 'Use a date and time like 2026-12-01T08:00:00Z.' }).nullable().optional(),
    steps: stepsFor,
  })
  .superRefine((c, ctx) => checkSteps(c.kind, c.steps, ctx));
export type CreateCampaign = z.input<typeof CreateCampaignSchema>;

/** `steps`, when given, is the whole new list in order: steps left out are removed. The kind stays. */
export const UpdateCampaignSchema = z.strictObject({
  name: text(160).min(1, 'Enter a name.').optional(),
  startedAt: z.iso.datetime({ offset: true, error: 'Use a date and time like 2026-12-01T08:00:00Z.' }).nullable().optional(),
  steps: stepsFor.optional(),
  version,
});
export type UpdateCampaign = z.input<typeof UpdateCampaignSchema>;
/** A step list checked against the campaign's kind (the server's check of a PATCH, whose body has no kind). */
export const CampaignStepsForKindSchema = z
  .object({ kind: CampaignKindSchema, steps: stepsFor })
  .superRefine((c, ctx) => checkSteps(c.kind, c.steps, ctx));

/** Hours or km done so far on one step (totals, not increments: sending the same twice is harmless). */
export const CampaignProgressSchema = z
  .strictObject({
    stepId: uuid,
    doneHours: z.number().min(0, 'Must be 0 or more.').max(STEP_HOURS_MAX, `At most ${STEP_HOURS_MAX} h.`).optional(),
    doneKm: z.number().min(0, 'Must be 0 or more.').max(STEP_KM_MAX, `At most ${STEP_KM_MAX} km.`).optional(),
    version: version.optional(),
  })
  .superRefine((p, ctx) => {
    if (p.doneHours === undefined && p.doneKm === undefined) {
      ctx.addIssue({ code: 'custom', path: ['doneHours'], message: 'Give the hours or the km done.' });
    }
  });
export type CampaignProgressInput = z.input<typeof CampaignProgressSchema>;

/**
 * A run log as CSV text: one row per run of a step, `step name, hours, km` (a header row is
 * allowed), each row adding to that step's totals. Sent as JSON `{ csv }` or as a `text/csv` body.
 */
export const CampaignLogSchema = z.strictObject({
  csv: z.string().min(1, 'The log is empty.').max(CAMPAIGN_LOG_MAX_CHARS, `At most ${CAMPAIGN_LOG_MAX_CHARS} characters.`),
  version: version.optional(),
});
export const CampaignLogErrorLineSchema = z.object({ line: z.number().int(), message: z.string() });
export type CampaignLogErrorLine = z.infer<typeof CampaignLogErrorLineSchema>;

export const CampaignStepSchema = z.object({
  id: z.string(),
  name: z.string(),
  durationHours: z.number().nullable(),
  distanceKm: z.number().nullable(),
  temperatureC: z.number().nullable(),
  humidityPct: z.number().nullable(),
  route: z.string().nullable(),
  doneHours: z.number(),
  doneKm: z.number(),
  /** Magnus formula (Alduchov and Eskridge, 1996), over water, degC to two decimals. */
  dewPointC: z.number().nullable(),
  /** A condensation caution in plain words (colder step after a humid one, or a cold part into humid air). */
  condensationRisk: z.string().nullable(),
});
export type CampaignStep = z.infer<typeof CampaignStepSchema>;

export const CampaignSchema = z.object({
  id: z.string(),
  programId: z.string(),
  assetId: z.string(),
  assetTag: z.string(),
  name: z.string(),
  kind: CampaignKindSchema,
  startedAt: z.string().nullable(),
  steps: z.array(CampaignStepSchema),
  progress: z.object({
    unit: z.enum(['hours', 'km']),
    done: z.number(),
    planned: z.number(),
    fraction: z.number(),
    complete: z.boolean(),
  }),
  currentStep: z.object({ id: z.string(), name: z.string(), index: z.number().int() }).nullable(),
  /** ISO date-time at the rate so far; null before anything is done or once complete. */
  projectedFinish: z.string().nullable(),
  updatedAt: z.string(),
  version: z.number().int(),
});
export type Campaign = z.infer<typeof CampaignSchema>;
export const CampaignListSchema = z.object({ campaigns: z.array(CampaignSchema) });
export type CampaignList = z.infer<typeof CampaignListSchema>;

export const CampaignListQuerySchema = z.strictObject({ programId: uuid, stageId: uuid.optional() });
