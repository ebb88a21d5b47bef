import { z } from 'zod';
import { sampleSizeProblems } from '@/shared/domain/reliability';
import { CreateValidationTestSchema, type CreateValidationTest, type ValidationTest } from '@/shared/schemas/validation';
import { readNumber } from './validation-words';

/**
 * The test form: numbers are typed as text, so each is read here (blank L and b mean "not
 * time-based") and then checked with the shared rules (R and C in (0, 1), L and b together and
 * greater than 0) that the server applies.
 */
const numberText = (message: string) =>
  z
    .string()
    .refine((value) => !Number.isNaN(readNumber(value) ?? 0), message)
    .transform((value) => readNumber(value));

export const TestFormSchema = z
  .object({
    stageId: z.string().min(1, 'Choose the stage the test belongs to.'),
    name: CreateValidationTestSchema.shape.name,
    procedureRef: z.string().trim().max(120, 'Use at most 120 characters.'),
    verifies: z.string().trim().max(2000, 'Use at most 2000 characters.'),
    reliability: numberText('Enter a number between 0 and 1, for example 0.9.'),
    confidence: numberText('Enter a number between 0 and 1, for example 0.9.'),
    testToLife: numberText('Enter a number greater than 0, or leave it empty.'),
    shape: numberText('Enter a number greater than 0, or leave it empty.'),
  })
  .superRefine((v, ctx) => {
    const problems = sampleSizeProblems({
      reliability: v.reliability ?? Number.NaN,
      confidence: v.confidence ?? Number.NaN,
      testToLife: v.testToLife,
      shape: v.shape,
    });
    for (const p of problems) ctx.addIssue({ code: 'custom', path: [p.field], message: p.message });
  });

export type TestFormInput = z.input<typeof TestFormSchema>;
export type TestFormOutput = z.output<typeof TestFormSchema>;

export const TEST_FORM_FIELDS = ['stageId', 'name', 'procedureRef', 'verifies', 'reliability', 'confidence', 'testToLife', 'shape'] as const;

export function emptyTestForm(stageId = ''): TestFormInput {
  return { stageId, name: '', procedureRef: '', verifies: '', reliability: '0.9', confidence: '0.9', testToLife: '', shape: '' };
}

export function testFormValues(test: ValidationTest): TestFormInput {
  return {
    stageId: test.stageId,
    name: test.name,
    procedureRef: test.procedureRef,
    verifies: test.verifies,
    reliability: String(test.reliability),
    confidence: String(test.confidence),
    testToLife: test.testToLife === null ? '' : String(test.testToLife),
    shape: test.shape === null ? '' : String(test.shape),
  };
}

export function toCreateTest(values: TestFormOutput): CreateValidationTest {
  return {
    stageId: values.stageId,
    name: values.name,
    procedureRef: values.procedureRef,
    verifies: values.verifies,
    reliability: values.reliability as number,
    confidence: values.confidence as number,
    testToLife: values.testToLife,
    shape: values.shape,
  };
}

/** Only what changed goes to the server; someone else's edits to the rest stay. */
export function changedTestFields(test: ValidationTest, values: TestFormOutput): Partial<CreateValidationTest> {
  const next = toCreateTest(values);
  const out: Record<string, unknown> = {};
  for (const key of TEST_FORM_FIELDS) {
    if ((next[key] ?? null) !== (test[key] ?? null)) out[key] = next[key];
  }
  return out as Partial<CreateValidationTest>;
}
