// Zero-failure (success-run) reliability demonstration, PRODUCT.md section 5 and REFERENCES.md:
// C = 1 - R^n, so n = ln(1 - C) / ln(R). With each sample run L times the target life and a
// Weibull shape b (the Weibayes extension), n = ln(1 - C) / (L^b ln R). The product rounds up.

/** One problem with an input, named by the parameter it came in. */
export type InputProblem = { field: string; message: string };

/** Thrown by the computations for bad input; the server answers 400 naming `field`. */
export class ReliabilityInputError extends Error {
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(`${field}: ${message}`);
  }
}

export type SampleSizeInput = {
  reliability: number;
  confidence: number;
  /** Test-to-life ratio L (test time over target life); with `shape`, or neither. */
  testToLife?: number | null;
  /** Weibull shape b; with `testToLife`, or neither. */
  shape?: number | null;
};

export type SampleSize = {
  /** Samples to test with no failure, rounded up. */
  n: number;
  /** The value before rounding. */
  exact: number;
};

/** Floating-point slack: 22.000000000000004 is 22 samples, not 23. */
const ROUND_SLACK = 1e-9;

const isNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);

export function fractionProblem(field: string, value: unknown): InputProblem | null {
  if (!isNumber(value)) return { field, message: 'Enter a number between 0 and 1, for example 0.9.' };
  if (value <= 0 || value >= 1) return { field, message: 'Must be between 0 and 1, both excluded (0.9 means 90 %).' };
  return null;
}

function positiveProblem(field: string, value: unknown): InputProblem | null {
  if (!isNumber(value)) return { field, message: 'Enter a number greater than 0.' };
  if (value <= 0) return { field, message: 'Must be greater than 0.' };
  return null;
}

/** L and b come together: one without the other is refused. */
function weibullProblems(testToLife: unknown, shape: unknown): InputProblem[] {
  const hasL = testToLife !== undefined && testToLife !== null;
  const hasB = shape !== undefined && shape !== null;
  const problems: InputProblem[] = [];
  if (hasL) {
    const p = positiveProblem('testToLife', testToLife);
    if (p) problems.push(p);
  }
  if (hasB) {
    const p = positiveProblem('shape', shape);
    if (p) problems.push(p);
  }
  if (hasL && !hasB) problems.push({ field: 'shape', message: 'Give the Weibull shape b with the test-to-life ratio.' });
  if (hasB && !hasL) problems.push({ field: 'testToLife', message: 'Give the test-to-life ratio L with the Weibull shape.' });
  return problems;
}

/** Every problem with a sample-size input (empty when it is good). */
export function sampleSizeProblems(input: SampleSizeInput): InputProblem[] {
  return [
    fractionProblem('reliability', input.reliability),
    fractionProblem('confidence', input.confidence),
    ...weibullProblems(input.testToLife, input.shape),
  ].filter((p): p is InputProblem => p !== null);
}

function throwFirst(problems: InputProblem[]) {
  if (problems.length) throw new ReliabilityInputError(problems[0].field, problems[0].message);
}

/** L^b, or 1 for a plain success run. */
function lifeFactor(testToLife?: number | null, shape?: number | null): number {
  return testToLife && shape ? Math.pow(testToLife, shape) : 1;
}

/** Samples to run with no failure to show reliability R at confidence C (rounded up). */
export function successRunSampleSize(input: SampleSizeInput): SampleSize {
  throwFirst(sampleSizeProblems(input));
  const exact = Math.log(1 - input.confidence) / (lifeFactor(input.testToLife, input.shape) * Math.log(input.reliability));
  if (!Number.isFinite(exact) || exact > Number.MAX_SAFE_INTEGER) {
    throw new ReliabilityInputError(
      input.testToLife ? 'testToLife' : 'reliability',
      'The sample size is too large to compute; check the values.',
    );
  }
  return { n: Math.max(1, Math.ceil(exact - ROUND_SLACK)), exact };
}

export type DemonstratedInput = { samples: number; confidence: number; testToLife?: number | null; shape?: number | null };

/** Every problem with a demonstrated-reliability input (empty when it is good). */
export function demonstratedProblems(input: DemonstratedInput): InputProblem[] {
  const problems: InputProblem[] = [];
  if (!isNumber(input.samples) || !Number.isInteger(input.samples) || input.samples < 1) {
    problems.push({ field: 'samples', message: 'Enter a whole number of samples, 1 or more.' });
  }
  const c = fractionProblem('confidence', input.confidence);
  if (c) problems.push(c);
  return [...problems, ...weibullProblems(input.testToLife, input.shape)];
}

/**
 * Reliability shown at confidence C after n samples passed with no failure: R = (1 - C)^(1/n),
 * or (1 - C)^(1/(n L^b)) when each sample ran L lives with Weibull shape b.
 */
export function demonstratedReliability(samples: number, confidence: number, weibull: { testToLife?: number | null; shape?: number | null } = {}): number {
  throwFirst(demonstratedProblems({ samples, confidence, ...weibull }));
  return Math.pow(1 - confidence, 1 / (samples * lifeFactor(weibull.testToLife, weibull.shape)));
}
