import { jStat } from 'jstat';
import {
  demonstratedReliability,
  ReliabilityInputError,
  sampleSizeProblems,
  successRunSampleSize,
} from '../../shared/domain/reliability';

// Success run: C = 1 - R^n, so n = ln(1 - C) / ln(R); with test-to-life ratio L and Weibull
// shape b (Weibayes): n = ln(1 - C) / (L^b ln R). Rounded up (REFERENCES.md).
describe('successRunSampleSize', () => {
  it.each([
    // REFERENCES.md, success-run relation: ln(0.1) = -2.302585, ln(0.9) = -0.105361; 2.302585 / 0.105361 = 21.854 -> 22.
    { source: 'REFERENCES.md (success run)', r: 0.9, c: 0.9, l: null, b: null, n: 22, exact: 21.854 },
    // C. J. Wang, "Two useful Weibayes equations in reliability demonstration": R 95 %, C 90 %, L = 1, b = 1.
    // ln(0.1) = -2.302585, ln(0.95) = -0.051293; 2.302585 / 0.051293 = 44.891 -> 45.
    { source: 'C. J. Wang, Weibayes worked example', r: 0.95, c: 0.9, l: 1, b: 1, n: 45, exact: 44.891 },
    // From memory (the often-quoted "59 samples" for 95 % / 95 %): ln(0.05) = -2.995732; 2.995732 / 0.051293 = 58.404 -> 59.
    { source: 'from memory (95/95 -> 59)', r: 0.95, c: 0.95, l: null, b: null, n: 59, exact: 58.404 },
    // From memory (99 % / 95 % -> 299): ln(0.99) = -0.010050; 2.995732 / 0.010050 = 298.073 -> 299.
    { source: 'from memory (99/95 -> 299)', r: 0.99, c: 0.95, l: null, b: null, n: 299, exact: 298.073 },
    // Recomputed by hand, no published value: L^b = 2^2 = 4; 21.854 / 4 = 5.464 -> 6.
    { source: 'recomputed by hand', r: 0.9, c: 0.9, l: 2, b: 2, n: 6, exact: 5.464 },
    // Recomputed by hand, no published value: L^b = 3^2 = 9; 44.891 / 9 = 4.988 -> 5.
    { source: 'recomputed by hand', r: 0.95, c: 0.9, l: 3, b: 2, n: 5, exact: 4.988 },
    // Recomputed by hand, no published value: L^b = 1.5^2 = 2.25; 21.854 / 2.25 = 9.713 -> 10.
    { source: 'recomputed by hand', r: 0.9, c: 0.9, l: 1.5, b: 2, n: 10, exact: 9.713 },
  ])('when R $r, C $c, L $l, b $b ($source), then n = $n ($exact before rounding)', ({ r, c, l, b, n, exact }) => {
    const result = successRunSampleSize({ reliability: r, confidence: c, testToLife: l, shape: b });
    expect(result.n).toBe(n);
    expect(result.exact).toBeCloseTo(exact, 3);
  });

  // Independent check with the binomial distribution of the jstat package (jStat.binomial, jstat 1.9.6):
  // with n samples and no failure, P(X = 0) = binomial.pdf(0, n, p) where p is the chance that one
  // sample fails the test: 1 - R, or 1 - R^(L^b) when it runs L lives of a Weibull with shape b.
  // n is the smallest count with P(X = 0) <= 1 - C.
  it.each([
    [0.9, 0.9, null, null],
    [0.95, 0.9, 1, 1],
    [0.95, 0.95, null, null],
    [0.99, 0.95, null, null],
    [0.9, 0.8, null, null],
    [0.9, 0.7, null, null],
    [0.9, 0.9, 2, 2],
    [0.95, 0.9, 3, 2],
    [0.9, 0.9, 2, 1.5],
    [0.9, 0.8, 1.5, 2],
    [0.999, 0.99, null, null],
  ])('when R %p, C %p, L %p, b %p, then the binomial distribution of jstat agrees that n is the smallest passing count', (r, c, l, b) => {
    const { n } = successRunSampleSize({ reliability: r, confidence: c, testToLife: l, shape: b });
    const survive = l && b ? Math.pow(r, Math.pow(l, b)) : r;
    const p = 1 - survive;
    expect(jStat.binomial.pdf(0, n, p)).toBeLessThanOrEqual(1 - c + 1e-12);
    expect(jStat.binomial.pdf(0, n - 1, p)).toBeGreaterThan(1 - c);
    // The cdf at 0 failures is the same probability (jstat rounds it to 10 decimals).
    expect(jStat.binomial.cdf(0, n, p)).toBeCloseTo(jStat.binomial.pdf(0, n, p), 9);
  });

  it('when the exact value is a whole number up to float dust, then it is not rounded up to the next one', () => {
    // R = 0.5, C = 0.75: ln(0.25) / ln(0.5) = 2 exactly.
    expect(successRunSampleSize({ reliability: 0.5, confidence: 0.75 })).toEqual({ n: 2, exact: 2 });
    // R = 0.1, C = 0.999: ln(0.001) / ln(0.1) = 3 up to the last bit.
    expect(successRunSampleSize({ reliability: 0.1, confidence: 0.999 }).n).toBe(3);
  });

  it.each([
    ['reliability', { reliability: 0, confidence: 0.9 }],
    ['reliability', { reliability: 1, confidence: 0.9 }],
    ['reliability', { reliability: -0.1, confidence: 0.9 }],
    ['reliability', { reliability: Number.NaN, confidence: 0.9 }],
    ['confidence', { reliability: 0.9, confidence: 0 }],
    ['confidence', { reliability: 0.9, confidence: 1 }],
    ['confidence', { reliability: 0.9, confidence: 1.5 }],
    ['testToLife', { reliability: 0.9, confidence: 0.9, testToLife: 0, shape: 2 }],
    ['testToLife', { reliability: 0.9, confidence: 0.9, testToLife: -1, shape: 2 }],
    ['shape', { reliability: 0.9, confidence: 0.9, testToLife: 2, shape: 0 }],
    ['shape', { reliability: 0.9, confidence: 0.9, testToLife: 2 }],
    ['testToLife', { reliability: 0.9, confidence: 0.9, shape: 2 }],
  ])('when %s is out of range or alone, then the input is refused naming it', (field, input) => {
    expect(sampleSizeProblems(input).map((p) => p.field)).toContain(field);
    expect(() => successRunSampleSize(input)).toThrow(ReliabilityInputError);
    try {
      successRunSampleSize(input);
    } catch (err) {
      expect((err as ReliabilityInputError).field).toBe(sampleSizeProblems(input)[0].field);
    }
  });

  it('when R, C, L and b are at usable extremes, then n is finite and at least 1', () => {
    expect(successRunSampleSize({ reliability: 0.000001, confidence: 0.000001 }).n).toBe(1);
    expect(successRunSampleSize({ reliability: 0.999999, confidence: 0.999999 }).n).toBe(13_815_504);
    expect(successRunSampleSize({ reliability: 0.9, confidence: 0.9, testToLife: 1000, shape: 50 }).n).toBe(1);
  });
});

describe('demonstratedReliability', () => {
  it('when 22 samples passed at C 90 %, then R = 0.1^(1/22) = 0.90063 (by hand: exp(-2.302585 / 22) = exp(-0.104663))', () => {
    expect(demonstratedReliability(22, 0.9)).toBeCloseTo(0.90063, 5);
  });

  it.each([
    [0.9, 0.9],
    [0.95, 0.9],
    [0.99, 0.95],
    [0.8, 0.5],
  ])('when n is computed for R %p and C %p, then n passes demonstrate at least R and n - 1 passes do not (round trip)', (r, c) => {
    const { n, exact } = successRunSampleSize({ reliability: r, confidence: c });
    expect(demonstratedReliability(n, c)).toBeGreaterThanOrEqual(r);
    if (n > 1) expect(demonstratedReliability(n - 1, c)).toBeLessThan(r);
    // The unrounded count gives R back exactly.
    expect(Math.pow(1 - c, 1 / exact)).toBeCloseTo(r, 12);
  });

  it('when each sample ran L lives with shape b, then R = (1 - C)^(1/(n L^b)) and the Weibayes n round-trips', () => {
    const { n } = successRunSampleSize({ reliability: 0.9, confidence: 0.9, testToLife: 2, shape: 2 });
    // n = 6: 0.1^(1/24) = exp(-2.302585 / 24) = exp(-0.095941) = 0.90852.
    expect(demonstratedReliability(n, 0.9, { testToLife: 2, shape: 2 })).toBeCloseTo(0.90852, 5);
  });

  it.each([
    ['samples', 0, 0.9],
    ['samples', 2.5, 0.9],
    ['samples', -3, 0.9],
    ['confidence', 10, 0],
    ['confidence', 10, 1],
  ])('when %s is bad (%p, %p), then it is refused naming it', (field, samples, confidence) => {
    expect(() => demonstratedReliability(samples, confidence)).toThrow(expect.objectContaining({ field }));
  });
});
