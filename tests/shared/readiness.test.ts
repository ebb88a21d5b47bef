import {
  computeReadiness,
  countWords,
  findingLoad,
  rollUpStage,
  type AssetFigure,
  type ReadinessFinding,
  type ReadinessInput,
} from '../../shared/domain/readiness';
import { DEFAULT_GATE, type GateSettings } from '../../shared/schemas/assets';
import type { FindingSeverity, FindingStatus } from '../../shared/schemas/findings';

// PRODUCT.md section 4 (the product's own definition of the score; no outside source): the
// expected values below are worked by hand from its formula, 100 x (0.4 C + 0.3 F + 0.2 S + 0.1 V).

const AS_OF = new Date('2026-12-02T12:00:00Z');
const YESTERDAY = '2026-12-01';
const TODAY = '2026-12-02';
const TOMORROW = '2026-12-03';

let seq = 0;
const id = (prefix: string) => `${prefix}-${(seq += 1)}`;

function checklist(total: number, done: number): ReadinessInput['checklist'] {
  return { requiredTotal: total, requiredPassedOrNa: done, openRequired: Array.from({ length: total - done }, (_, i) => ({ id: id('item'), title: `Item ${i + 1}` })) };
}
function finding(severity: FindingSeverity, fields: Partial<{ status: FindingStatus; dueDate: string | null; title: string }> = {}): ReadinessFinding {
  return { id: id('finding'), title: fields.title ?? `${severity} problem`, severity, status: fields.status ?? 'open', dueDate: fields.dueDate ?? null };
}
function software(inBaseline: number, onBaseline: number): ReadinessInput['software'] {
  return {
    inBaseline,
    onBaseline,
    offBaseline: Array.from({ length: inBaseline - onBaseline }, (_, i) => ({ ecuId: id('ecu'), code: `E${i}`, status: 'behind' as const })),
  };
}
function validation(allocated: number, passed: number): ReadinessInput['validation'] {
  return {
    allocated,
    passed,
    notPassed: Array.from({ length: allocated - passed }, (_, i) => ({ testId: id('test'), name: `Test ${i}`, status: 'running' as const })),
  };
}
function input(fields: Partial<ReadinessInput> = {}): ReadinessInput {
  return { checklist: checklist(0, 0), findings: [], software: software(0, 0), validation: validation(0, 0), gate: DEFAULT_GATE, asOf: AS_OF, ...fields };
}
const gate = (changes: Partial<GateSettings>): GateSettings => ({ ...DEFAULT_GATE, ...changes });
/** Sum of the breakdown in hundredths (integers: no float noise in the comparison). */
const breakdownHundredths = (r: ReturnType<typeof computeReadiness>) => r.breakdown.reduce((s, e) => s + Math.round(e.points * 100), 0);

describe('readiness parts (PRODUCT.md section 4)', () => {
  it.each([
    ['C: 15 of 20 required items passed or n/a', input({ checklist: checklist(20, 15) }), { checklist: 0.75, findings: 1, software: 1, validation: 1 }],
    ['C: no required item at all counts as complete', input({ checklist: checklist(0, 0) }), { checklist: 1, findings: 1, software: 1, validation: 1 }],
    ['F: one open blocking finding (load 10 of budget 20)', input({ findings: [finding('blocking')] }), { checklist: 1, findings: 0.5, software: 1, validation: 1 }],
    ['F: blocking + major + minor (load 14)', input({ findings: [finding('blocking'), finding('major'), finding('minor')] }), { checklist: 1, findings: 0.3, software: 1, validation: 1 }],
    ['F: in work and fixed still count; verified and rejected do not', input({ findings: [finding('major', { status: 'in-work' }), finding('major', { status: 'fixed' }), finding('blocking', { status: 'verified' }), finding('blocking', { status: 'rejected' })] }), { checklist: 1, findings: 0.7, software: 1, validation: 1 }],
    ['F: load above the budget gives 0, never below', input({ findings: [finding('blocking'), finding('blocking'), finding('blocking')] }), { checklist: 1, findings: 0, software: 1, validation: 1 }],
    ['F: safety weighs 10 like blocking (the product\'s own choice)', input({ findings: [finding('safety')] }), { checklist: 1, findings: 0.5, software: 1, validation: 1 }],
    ['S: 3 of 4 ECUs of the baseline on it', input({ software: software(4, 3) }), { checklist: 1, findings: 1, software: 0.75, validation: 1 }],
    ['S: no released baseline for the stage counts as 1', input({ software: software(0, 0) }), { checklist: 1, findings: 1, software: 1, validation: 1 }],
    ['V: 1 of 4 allocated tests passed', input({ validation: validation(4, 1) }), { checklist: 1, findings: 1, software: 1, validation: 0.25 }],
    ['V: no test allocated counts as 1', input({ validation: validation(0, 0) }), { checklist: 1, findings: 1, software: 1, validation: 1 }],
  ])('when %s, then the parts are as expected', (_name, given, parts) => {
    const r = computeReadiness(given);
    for (const [part, value] of Object.entries(parts)) expect(r.parts[part as keyof typeof parts]).toBeCloseTo(value, 12);
  });
});

describe('readiness score and weights', () => {
  it.each([
    // C, F, S, V -> 100 x (0.4 C + 0.3 F + 0.2 S + 0.1 V), by hand.
    ['all complete', 100, input()],
    ['C 0.75', 90, input({ checklist: checklist(20, 15) })],
    ['F 0.5', 85, input({ findings: [finding('blocking')] })],
    ['S 0.75', 95, input({ software: software(4, 3) })],
    ['V 0.25', 92.5, input({ validation: validation(4, 1) })],
    ['C 0.5, F 0.3, S 0.5, V 0.5', 44, input({ checklist: checklist(2, 1), findings: [finding('blocking'), finding('major'), finding('minor')], software: software(2, 1), validation: validation(2, 1) })],
    ['nothing done: C 0, F 0, S 0, V 0', 0, input({ checklist: checklist(3, 0), findings: [finding('blocking'), finding('blocking')], software: software(2, 0), validation: validation(1, 0) })],
  ] as const)('when %s with the default weights, then the score is %s', (_name, score, given) => {
    expect(computeReadiness(given).score).toBe(score);
  });

  it.each([
    ['equal weights', { checklist: 0.25, findings: 0.25, software: 0.25, validation: 0.25 }, 62.5],
    ['checklist only', { checklist: 1, findings: 0, software: 0, validation: 0 }, 50],
    ['findings only', { checklist: 0, findings: 1, software: 0, validation: 0 }, 50],
    ['software and validation', { checklist: 0, findings: 0, software: 0.5, validation: 0.5 }, 75],
  ])('when a lead sets %s, then the score follows them and they are reported', (_name, weights, score) => {
    // C 0.5, F 0.5, S 1, V 0.5.
    const r = computeReadiness(input({ checklist: checklist(2, 1), findings: [finding('blocking')], validation: validation(2, 1), gate: gate({ weights }) }));
    expect(r.score).toBe(score);
    expect(r.weights).toEqual(weights);
  });
});

describe('gate result at the thresholds (go 90, conditional 75)', () => {
  // 4,000 required items with one open take 0.01 (40 x 1/4000); half the ECUs off take 10; one blocking finding takes 15.
  const almost = () => checklist(4000, 3999);
  it.each([
    ['90.00', input({ software: software(2, 1) }), 90, 'go'],
    ['89.99', input({ software: software(2, 1), checklist: almost() }), 89.99, 'conditional'],
    ['75.00', input({ software: software(2, 1), findings: [finding('blocking')] }), 75, 'conditional'],
    ['74.99', input({ software: software(2, 1), findings: [finding('blocking')], checklist: almost() }), 74.99, 'no-go'],
  ] as const)('when the score is %s, then the result is as expected', (_name, given, score, result) => {
    const r = computeReadiness(given);
    expect(r.score).toBe(score);
    expect(r.result).toBe(result);
    expect(r.cleared).toBe(true);
  });

  it.each([
    [80, 70, 80, 'go'],
    [80, 70, 79.99, 'conditional'],
    [80, 70, 70, 'conditional'],
    [80, 70, 69.99, 'no-go'],
  ] as const)('when the stage sets go %s and conditional %s, then a score of %s is %s', (go, conditional, score, result) => {
    // The checklist alone moves the score: 60 + 40 C, with C = done / 40,000.
    const r = computeReadiness(input({ checklist: checklist(40_000, Math.round((score - 60) * 1000)), gate: gate({ goThreshold: go, conditionalThreshold: conditional }) }));
    expect(r.score).toBe(score);
    expect(r.result).toBe(result);
  });
});

describe('the safety rule', () => {
  it.each([
    ['open', 'open', false],
    ['in work', 'in-work', false],
    ['fixed, awaiting check', 'fixed', false],
    ['verified', 'verified', true],
    ['rejected', 'rejected', true],
  ] as const)('when a safety finding is %s (%s), then cleared is %s', (_name, status, cleared) => {
    const r = computeReadiness(input({ findings: [finding('safety', { status, title: 'HV interlock open' })], gate: gate({ findingsBudget: 10_000 }) }));
    expect(r.cleared).toBe(cleared);
    expect(r.notClearedBy.map((f) => f.title)).toEqual(cleared ? [] : ['HV interlock open']);
  });

  it('when an asset scores 99.97 with an open safety finding, then its result is no-go whatever the score', () => {
    const r = computeReadiness(input({ findings: [finding('safety')], gate: gate({ findingsBudget: 10_000 }) }));
    expect(r.score).toBe(99.97);
    expect(r.result).toBe('no-go');
  });
});

describe('past-due findings weigh double', () => {
  it.each([
    ['major due yesterday', 6, finding('major', { dueDate: YESTERDAY })],
    ['major due today', 3, finding('major', { dueDate: TODAY })],
    ['major due tomorrow', 3, finding('major', { dueDate: TOMORROW })],
    ['major without a due date', 3, finding('major')],
    ['blocking due yesterday', 20, finding('blocking', { dueDate: YESTERDAY })],
    ['minor due yesterday', 2, finding('minor', { dueDate: YESTERDAY })],
    ['safety due yesterday', 20, finding('safety', { dueDate: YESTERDAY })],
    ['verified major due yesterday', 0, finding('major', { dueDate: YESTERDAY, status: 'verified' })],
  ] as const)('when a %s, then its load is %s', (_name, load, f) => {
    expect(findingLoad(f, AS_OF)).toBe(load);
    expect(computeReadiness(input({ findings: [f] })).findingsLoad).toBe(load);
  });

  it('when a blocking finding is past due, then F is 0 (load 20 of budget 20) and the breakdown says so', () => {
    const r = computeReadiness(input({ findings: [finding('blocking', { dueDate: YESTERDAY })] }));
    expect(r.parts.findings).toBe(0);
    expect(r.breakdown).toEqual([expect.objectContaining({ part: 'findings', points: -30, text: '-30: one open blocking finding (one past due)' })]);
  });
});

describe('the breakdown', () => {
  it('when four blocking findings are open on a budget of 100, then it reads "-12: four open blocking findings" with each finding\'s share', () => {
    const r = computeReadiness(input({ findings: [1, 2, 3, 4].map((n) => finding('blocking', { title: `Blocking ${n}` })), gate: gate({ findingsBudget: 100 }) }));
    expect(r.score).toBe(88);
    expect(r.breakdown).toHaveLength(1);
    expect(r.breakdown[0]).toMatchObject({ part: 'findings', points: -12, text: '-12: four open blocking findings' });
    expect(r.breakdown[0].items.map((i) => [i.kind, i.label, i.points])).toEqual([
      ['finding', 'Blocking 1 (blocking)', -3],
      ['finding', 'Blocking 2 (blocking)', -3],
      ['finding', 'Blocking 3 (blocking)', -3],
      ['finding', 'Blocking 4 (blocking)', -3],
    ]);
  });

  it('when every part loses points, then each entry names its items in plain words', () => {
    const r = computeReadiness(
      input({
        checklist: { requiredTotal: 4, requiredPassedOrNa: 3, openRequired: [{ id: 'i1', title: 'HV interlock loop check' }] },
        findings: [finding('major', { title: 'Coolant weep', dueDate: YESTERDAY }), finding('minor', { title: 'Label missing' })],
        software: { inBaseline: 4, onBaseline: 3, offBaseline: [{ ecuId: 'e1', code: 'BCM', status: 'behind' }] },
        validation: { allocated: 2, passed: 1, notPassed: [{ testId: 't1', name: 'Damp heat cyclic', status: 'failed' }] },
      }),
    );
    // C 0.75 (-10), F 1 - 7/20 = 0.65 (-10.5), S 0.75 (-5), V 0.5 (-5): 69.5.
    expect(r.score).toBe(69.5);
    expect(r.breakdown.map((e) => [e.part, e.points, e.text])).toEqual([
      ['checklist', -10, '-10: one required checklist item not passed'],
      ['findings', -10.5, '-11: two open findings: one major, one minor; one past due'],
      ['software', -5, '-5: one ECU off the baseline'],
      ['validation', -5, '-5: one allocated test not passed'],
    ]);
    expect(r.breakdown[1].items).toEqual([
      { kind: 'finding', id: expect.any(String), label: 'Coolant weep (major, past due)', points: -9 },
      { kind: 'finding', id: expect.any(String), label: 'Label missing (minor)', points: -1.5 },
    ]);
    expect(r.breakdown[0].items).toEqual([{ kind: 'checklist-item', id: 'i1', label: 'HV interlock loop check', points: -10 }]);
    expect(r.breakdown[2].items).toEqual([{ kind: 'ecu', id: 'e1', label: 'BCM: behind the baseline', points: -5 }]);
    expect(r.breakdown[3].items).toEqual([{ kind: 'validation-test', id: 't1', label: 'Damp heat cyclic: failed', points: -5 }]);
  });

  it('when nothing is missing, then the breakdown is empty and the score 100', () => {
    expect(computeReadiness(input())).toMatchObject({ score: 100, result: 'go', breakdown: [] });
  });

  /** mulberry32 (common practice, no source): the same cases on every run. */
  function rng(seed: number) {
    let a = seed >>> 0;
    return (n: number) => {
      a = (a + 0x6d2b79f5) >>> 0;
      let t = a;
      t = Math.imul(t ^ (t >>> 15), t | 1);
      t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
      return Math.floor((((t ^ (t >>> 14)) >>> 0) / 4294967296) * n);
    };
  }
  const r = rng(0xb7ea);
  const severities: FindingSeverity[] = ['safety', 'blocking', 'major', 'minor'];
  const cases = Array.from({ length: 300 }, (_, k) => {
    const total = r(40);
    const allocated = r(6);
    const inBaseline = r(12);
    const weights = [[0.4, 0.3, 0.2, 0.1], [0.25, 0.25, 0.25, 0.25], [0.7, 0.1, 0.1, 0.1], [0.33, 0.33, 0.33, 0.01]][k % 4];
    return [
      k,
      input({
        checklist: checklist(total, r(total + 1)),
        findings: Array.from({ length: r(7) }, () => finding(severities[r(4)], { dueDate: [null, YESTERDAY, TOMORROW][r(3)], status: (['open', 'in-work', 'fixed', 'verified'] as const)[r(4)] })),
        software: software(inBaseline, r(inBaseline + 1)),
        validation: validation(allocated, r(allocated + 1)),
        gate: gate({ findingsBudget: [5, 20, 37][r(3)], weights: { checklist: weights[0], findings: weights[1], software: weights[2], validation: weights[3] } }),
      }),
    ] as const;
  });

  it.each(cases)('when case %s is scored, then its breakdown adds up to score - 100 and each entry to its items', (_k, given) => {
    const result = computeReadiness(given);
    expect(breakdownHundredths(result)).toBe(Math.round((result.score - 100) * 100));
    for (const entry of result.breakdown) {
      expect(entry.points).toBeLessThan(0);
      expect(entry.items.reduce((s, i) => s + Math.round((i.points ?? 0) * 100), 0)).toBe(Math.round(entry.points * 100));
    }
    expect(result.score).toBeGreaterThanOrEqual(0);
    expect(result.score).toBeLessThanOrEqual(100);
  });
});

describe('the stage roll-up', () => {
  const figure = (tag: string, given: ReadinessInput): AssetFigure => ({ id: `id-${tag}`, tag, input: given, readiness: computeReadiness(given) });

  it('when three assets are rolled up, then the mean, the lowest, the counts and the blockers follow from their figures', () => {
    const a = figure('A-1', input());
    const b = figure('A-2', input({ findings: [finding('blocking', { title: 'Brake pedal long' }), finding('safety', { title: 'HV cable chafing' })], software: software(2, 1) }));
    const c = figure('A-3', input({ checklist: checklist(4, 3), validation: validation(2, 1) }));
    const s = rollUpStage([a, b, c]);
    expect(s.assetCount).toBe(3);
    expect(s.meanScore).toBe(Math.round(((a.readiness.score + b.readiness.score + c.readiness.score) / 3) * 100) / 100);
    expect(s.lowest).toEqual({ id: 'id-A-2', tag: 'A-2', score: b.readiness.score });
    expect(s.counts).toEqual({ go: 1, conditional: 1, noGo: 1 });
    expect(s.notCleared).toBe(1);
    expect(s.openFindingsLoad).toBe(20);
    expect(s.blockers.map((x) => [x.kind, x.count, x.assets, x.text])).toEqual([
      ['not-cleared', 1, 1, 'one asset not cleared (open safety finding)'],
      ['blocking-findings', 1, 1, 'one open blocking finding on one asset'],
      ['required-items', 1, 1, 'one required checklist item not passed on one asset'],
      ['ecus-off-baseline', 1, 1, 'one ECU off the baseline on one asset'],
      ['tests-not-passed', 1, 1, 'one allocated test not passed on one asset'],
    ]);
    expect(s.blockers[0].items).toEqual([{ kind: 'finding', id: expect.any(String), label: 'HV cable chafing', assetId: 'id-A-2', assetTag: 'A-2' }]);
  });

  it('when a stage has no assets, then it has no mean and no lowest', () => {
    expect(rollUpStage([])).toMatchObject({ assetCount: 0, meanScore: null, meanParts: null, lowest: null, counts: { go: 0, conditional: 0, noGo: 0 }, blockers: [] });
  });

  it.each([
    [0, 'no'],
    [4, 'four'],
    [10, 'ten'],
    [11, '11'],
  ])('when %s is written, then it reads "%s"', (n, words) => {
    expect(countWords(n)).toBe(words);
  });
});
