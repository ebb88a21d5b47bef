import type { GateSettings } from '../schemas/assets';
import type { FindingSeverity, FindingStatus } from '../schemas/finding-enums';
import type { ConformanceStatus } from '../schemas/software';
import type { AllocationStatus } from '../schemas/validation';
import type {
  Blocker,
  BlockerItem,
  BreakdownEntry,
  BreakdownItem,
  ReadinessPart,
  ReadinessResult,
  ResultCounts,
} from '../schemas/readiness';
import { isClosedStatus, utcDate } from './finding-workflow';

/**
 * The readiness score of one asset for the gate at the end of its stage (PRODUCT.md section 4).
 *
 * - Checklist C = required items passed or not applicable / required items; 1 when the stage's
 *   checklist has no required item (nothing is missing).
 * - Findings F = max(0, 1 - load / budget). Load = sum over open findings (not verified, not
 *   rejected) of the severity weight: blocking 10, major 3, minor 1, doubled when past due.
 *   PRODUCT.md names no weight for `safety`: it counts 10 like blocking (a safety problem is at
 *   least a blocking one, and its weight shows in the breakdown), and besides that it makes the
 *   asset not cleared (the product's own choice).
 * - Software S = ECUs counted as on the baseline / ECUs in the released baseline of the stage
 *   (narrowed to the ECUs the asset carries); 1 when the stage has no released baseline. An ECU
 *   ahead counts as on only when no compatibility rule involving it is broken (shared/domain/software).
 * - Validation V = allocated tests passed / allocated tests; 1 when none are allocated.
 *
 * Score = 100 x (wC C + wF F + wS S + wV V), rounded to hundredths (the weights add up to 1: the
 * stages service refuses other weights). The result compares the rounded score, so a score shown
 * as 90.00 is never a conditional go: go at goThreshold or more, conditional from
 * conditionalThreshold, no-go below; any open safety finding makes it no-go whatever the score.
 */

export const SEVERITY_LOAD: Record<FindingSeverity, number> = { safety: 10, blocking: 10, major: 3, minor: 1 };
export const PAST_DUE_FACTOR = 2;

export type ReadinessFinding = { id: string; title: string; severity: FindingSeverity; status: FindingStatus; dueDate: string | null };
export type OffBaselineEcu = { ecuId: string; code: string; status: ConformanceStatus | null };
export type NotPassedTest = { testId: string; name: string; status: Exclude<AllocationStatus, 'passed'> };

export type ReadinessInput = {
  checklist: { requiredTotal: number; requiredPassedOrNa: number; openRequired: ReadonlyArray<{ id: string; title: string }> };
  findings: readonly ReadinessFinding[];
  software: { inBaseline: number; onBaseline: number; offBaseline: readonly OffBaselineEcu[] };
  validation: { allocated: number; passed: number; notPassed: readonly NotPassedTest[] };
  gate: GateSettings;
  asOf: Date;
};

export type Parts = Record<ReadinessPart, number>;

export type ReadinessOutput = {
  score: number;
  result: ReadinessResult;
  cleared: boolean;
  parts: Parts;
  weights: Parts;
  breakdown: BreakdownEntry[];
  thresholds: { go: number; conditional: number };
  findingsLoad: number;
  findingsBudget: number;
  notClearedBy: Array<{ id: string; title: string }>;
};

/** The score without its breakdown: what a roll-up, a snapshot or a frozen review needs of each asset. */
export type ReadinessSummary = Omit<ReadinessOutput, 'breakdown'>;

/** The figures the score is made of, already counted (a roll-up counts them in SQL: see `findingsLoadOf`). */
export type ReadinessNumbers = {
  checklist: { requiredTotal: number; requiredPassedOrNa: number };
  /** The open findings' load (sum of `findingLoad`). */
  findingsLoad: number;
  /** The open safety findings, in the order the breakdown lists findings (heaviest first, then by title and id). */
  notClearedBy: ReadonlyArray<{ id: string; title: string }>;
  software: { inBaseline: number; onBaseline: number };
  validation: { allocated: number; passed: number };
  gate: GateSettings;
};

/** Open findings counted per severity, due or past due: enough for the load without the findings themselves. */
export type OpenFindingCounts = Record<FindingSeverity, { due: number; pastDue: number }>;

/** The load of counted open findings: the same sum as `findingLoad` over each of them. */
export function findingsLoadOf(counts: OpenFindingCounts): number {
  let load = 0;
  for (const severity of Object.keys(SEVERITY_LOAD) as FindingSeverity[]) {
    const n = counts[severity];
    if (n) load += SEVERITY_LOAD[severity] * (n.due + PAST_DUE_FACTOR * n.pastDue);
  }
  return load;
}

/** Orders open findings as the breakdown lists them: heaviest load first, then by title and id. */
export const byLoadThenTitle = (a: { load: number; title: string; id: string }, b: { load: number; title: string; id: string }) =>
  b.load - a.load || byText(a.title, b.title) || byText(a.id, b.id);

const PART_ORDER: readonly ReadinessPart[] = ['checklist', 'findings', 'software', 'validation'];

/** Code-unit order: stable and fast (localeCompare builds a collator per call, which a roll-up of thousands of assets feels). */
export const byText = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

/** Hundredths, with the float noise of a sum of products (89.99999999999999) taken out first. */
export const roundScore = (x: number) => Math.round(Math.round(x * 1e6) / 1e4) / 100;
const round2 = (x: number) => Math.round(x * 100) / 100;
const ratio = (num: number, den: number) => (den > 0 ? Math.min(1, Math.max(0, num / den)) : 1);

const WORDS = ['no', 'one', 'two', 'three', 'four', 'five', 'six', 'seven', 'eight', 'nine', 'ten'];
/** "four open blocking findings", "one ECU": numbers up to ten in words, larger ones in digits. */
export const countWords = (n: number) => (n >= 0 && n < WORDS.length ? WORDS[n] : String(n));
const plural = (n: number, one: string, many = `${one}s`) => (n === 1 ? one : many);
/** "-12", "-0.4": whole points from one up, one decimal below. */
export const pointsText = (points: number) => {
  const abs = Math.abs(points);
  const shown = abs >= 1 ? String(Math.round(abs)) : String(Math.round(abs * 10) / 10);
  return `-${shown}`;
};

export function resultFor(score: number, cleared: boolean, gate: Pick<GateSettings, 'goThreshold' | 'conditionalThreshold'>): ReadinessResult {
  if (!cleared) return 'no-go';
  if (score >= gate.goThreshold) return 'go';
  if (score >= gate.conditionalThreshold) return 'conditional';
  return 'no-go';
}

/** The load weight of one open finding at `asOf` (or on the UTC day `today`); 0 for a closed one. */
export function findingLoad(f: Pick<ReadinessFinding, 'severity' | 'status' | 'dueDate'>, asOf: Date, today = utcDate(asOf)): number {
  if (isClosedStatus(f.status)) return 0;
  return SEVERITY_LOAD[f.severity] * (pastDue(f, today) ? PAST_DUE_FACTOR : 1);
}

/** isOverdue (shared/domain/finding-workflow) with the day worked out once per asset rather than per finding. */
const pastDue = (f: Pick<ReadinessFinding, 'status' | 'dueDate'>, today: string) => f.dueDate !== null && f.dueDate < today && !isClosedStatus(f.status);

/**
 * Splits `total` hundredths over `weights` by the largest remainder, so the rounded shares add up
 * to the rounded total exactly.
 */
function apportion(total: number, weights: number[]): number[] {
  const sum = weights.reduce((a, b) => a + b, 0);
  if (sum <= 0 || total <= 0) return weights.map(() => 0);
  const exact = weights.map((w) => (total * w) / sum);
  const floors = exact.map(Math.floor);
  let left = total - floors.reduce((a, b) => a + b, 0);
  const order = exact.map((e, i) => [e - floors[i], i] as const).sort((a, b) => b[0] - a[0] || a[1] - b[1]);
  for (const [, i] of order) {
    if (left <= 0) break;
    floors[i] += 1;
    left -= 1;
  }
  return floors;
}

const ECU_STATUS_WORDS: Record<ConformanceStatus, string> = {
  'on-baseline': 'on the baseline',
  behind: 'behind the baseline',
  ahead: 'ahead of the baseline with a compatibility rule broken',
  missing: 'nothing recorded',
  'not-comparable': 'version not comparable with the baseline',
  'rule-broken': 'breaks a compatibility rule',
};
const TEST_STATUS_WORDS: Record<NotPassedTest['status'], string> = { planned: 'planned', running: 'running', failed: 'failed' };

function findingsText(open: Array<{ severity: FindingSeverity; pastDue: boolean }>): string {
  const order: FindingSeverity[] = ['safety', 'blocking', 'major', 'minor'];
  const bySeverity = order.map((s) => [s, open.filter((f) => f.severity === s).length] as const).filter(([, n]) => n > 0);
  const late = open.filter((f) => f.pastDue).length;
  const lateText = late ? ` (${countWords(late)} past due)` : '';
  if (bySeverity.length === 1) {
    const [severity, n] = bySeverity[0];
    return `${countWords(n)} open ${severity} ${plural(n, 'finding')}${lateText}`;
  }
  const list = bySeverity.map(([s, n]) => `${countWords(n)} ${s}`).join(', ');
  return `${countWords(open.length)} open findings: ${list}${late ? `; ${countWords(late)} past due` : ''}`;
}

/** Parts, score, result and clearance from counted figures: the formula of this module, without the breakdown. */
export function summarizeReadiness(input: ReadinessNumbers): ReadinessSummary {
  const { gate } = input;
  const weights: Parts = { ...gate.weights };
  const budget = gate.findingsBudget;
  const load = input.findingsLoad;
  const notClearedBy = input.notClearedBy.map((f) => ({ id: f.id, title: f.title }));
  const cleared = notClearedBy.length === 0;
  const parts: Parts = {
    checklist: ratio(input.checklist.requiredPassedOrNa, input.checklist.requiredTotal),
    findings: Math.max(0, 1 - load / budget),
    software: ratio(input.software.onBaseline, input.software.inBaseline),
    validation: ratio(input.validation.passed, input.validation.allocated),
  };
  const score = roundScore(100 * PART_ORDER.reduce((sum, p) => sum + weights[p] * parts[p], 0));
  return {
    score,
    result: resultFor(score, cleared, gate),
    cleared,
    parts,
    weights,
    thresholds: { go: gate.goThreshold, conditional: gate.conditionalThreshold },
    findingsLoad: load,
    findingsBudget: budget,
    notClearedBy,
  };
}

export function computeReadiness(input: ReadinessInput): ReadinessOutput {
  const { gate, asOf } = input;
  const today = utcDate(asOf);

  const openFindings = input.findings
    .filter((f) => !isClosedStatus(f.status))
    .map((f) => ({ id: f.id, title: f.title, severity: f.severity, pastDue: pastDue(f, today), load: findingLoad(f, asOf, today) }))
    .sort(byLoadThenTitle);
  const summary = summarizeReadiness({
    checklist: input.checklist,
    findingsLoad: openFindings.reduce((sum, f) => sum + f.load, 0),
    notClearedBy: openFindings.filter((f) => f.severity === 'safety'),
    software: input.software,
    validation: input.validation,
    gate,
  });
  const { score, weights } = summary;
  const parts = summary.parts;

  // What each part took, in hundredths, apportioned so the entries add up to 100 - score exactly.
  const lost = PART_ORDER.map((p) => 100 * weights[p] * (1 - parts[p]));
  const hundredths = apportion(Math.round((100 - score) * 100), lost);
  const breakdown: BreakdownEntry[] = [];
  PART_ORDER.forEach((part, i) => {
    if (hundredths[i] <= 0) return;
    const points = -hundredths[i] / 100;
    let items: BreakdownItem[];
    let what: string;
    if (part === 'checklist') {
      const open = input.checklist.openRequired;
      const share = apportion(hundredths[i], open.map(() => 1));
      items = open.map((item, k) => ({ kind: 'checklist-item', id: item.id, label: item.title, points: -share[k] / 100 }));
      const n = input.checklist.requiredTotal - input.checklist.requiredPassedOrNa;
      what = `${countWords(n)} required checklist ${plural(n, 'item')} not passed`;
    } else if (part === 'findings') {
      const share = apportion(hundredths[i], openFindings.map((f) => f.load));
      items = openFindings.map((f, k) => ({
        kind: 'finding',
        id: f.id,
        label: `${f.title} (${f.severity}${f.pastDue ? ', past due' : ''})`,
        points: -share[k] / 100,
      }));
      what = findingsText(openFindings);
    } else if (part === 'software') {
      const off = input.software.offBaseline;
      const share = apportion(hundredths[i], off.map(() => 1));
      items = off.map((e, k) => ({ kind: 'ecu', id: e.ecuId, label: `${e.code}: ${ECU_STATUS_WORDS[e.status ?? 'missing']}`, points: -share[k] / 100 }));
      const n = input.software.inBaseline - input.software.onBaseline;
      what = `${countWords(n)} ${plural(n, 'ECU')} off the baseline`;
    } else {
      const notPassed = input.validation.notPassed;
      const share = apportion(hundredths[i], notPassed.map(() => 1));
      items = notPassed.map((t, k) => ({ kind: 'validation-test', id: t.testId, label: `${t.name}: ${TEST_STATUS_WORDS[t.status]}`, points: -share[k] / 100 }));
      const n = input.validation.allocated - input.validation.passed;
      what = `${countWords(n)} allocated ${plural(n, 'test')} not passed`;
    }
    breakdown.push({ part, points, text: `${pointsText(points)}: ${what}`, items });
  });

  return {
    score: summary.score,
    result: summary.result,
    cleared: summary.cleared,
    parts,
    weights,
    breakdown,
    thresholds: summary.thresholds,
    findingsLoad: summary.findingsLoad,
    findingsBudget: summary.findingsBudget,
    notClearedBy: summary.notClearedBy,
  };
}

// ---- The stage roll-up ----------------------------------------------------------------------

/** What stops one asset's gate, for its stage's blocker list: how many, and the items themselves on demand (a roll-up reads only its worst assets'). */
export interface StopList<T> {
  readonly count: number;
  items(): readonly T[];
}

/** A StopList of items at hand. (A class rather than an object with a closure: a roll-up makes thousands.) */
export class ListedStops<T> implements StopList<T> {
  constructor(private readonly list: readonly T[]) {}
  get count() {
    return this.list.length;
  }
  items() {
    return this.list;
  }
}

export type AssetStops = {
  /** Open blocking findings. */
  blockingFindings: StopList<{ id: string; title: string }>;
  /** Required checklist items not passed (nor not applicable), in checklist order. */
  openRequired: StopList<{ id: string; title: string }>;
  offBaseline: StopList<OffBaselineEcu>;
  notPassed: StopList<NotPassedTest>;
};

export type AssetFigure = {
  id: string;
  tag: string;
  readiness: ReadinessSummary;
  /** What the readiness was computed from; either this or `stops` names what stops the gate. */
  input?: Pick<ReadinessInput, 'checklist' | 'findings' | 'software' | 'validation'>;
  stops?: AssetStops;
};

const listOf = <T>(items: readonly T[]): StopList<T> => new ListedStops(items);

/** What stops the asset's gate, from `stops` or else from the full input. */
export function stopsOf(asset: AssetFigure): AssetStops {
  if (asset.stops) return asset.stops;
  const input = asset.input;
  if (!input) throw new Error(`asset ${asset.id}: a roll-up needs its stops or its input`);
  return {
    blockingFindings: listOf(input.findings.filter((f) => f.severity === 'blocking' && !isClosedStatus(f.status))),
    openRequired: listOf(input.checklist.openRequired),
    offBaseline: listOf(input.software.offBaseline),
    notPassed: listOf(input.validation.notPassed),
  };
}

/** How many items of each kind of blocker a roll-up lists (the counts cover them all). */
export const BLOCKER_TOP_ITEMS = 10;

export type StageFigures = {
  assetCount: number;
  meanScore: number | null;
  meanParts: Parts | null;
  lowest: { id: string; tag: string; score: number } | null;
  counts: ResultCounts;
  notCleared: number;
  openFindingsLoad: number;
  blockers: Blocker[];
};

/**
 * The roll-up of a stage from its assets' figures: the mean score (of the rounded scores, to
 * hundredths), the mean of each part, the lowest asset (ties by tag), the count per result, the
 * total open-findings load, and what stops the gate: assets not cleared, open blocking findings,
 * required checklist items not passed, ECUs off the baseline and allocated tests not passed, each
 * counted in full with the first BLOCKER_TOP_ITEMS listed (worst assets first).
 */
export function rollUpStage(assets: readonly AssetFigure[]): StageFigures {
  const counts: ResultCounts = { go: 0, conditional: 0, noGo: 0 };
  const n = assets.length;
  const sums = { score: 0, checklist: 0, findings: 0, software: 0, validation: 0 };
  let openFindingsLoad = 0;
  let notCleared = 0;
  for (const a of assets) {
    const r = a.readiness;
    if (r.result === 'go') counts.go += 1;
    else if (r.result === 'conditional') counts.conditional += 1;
    else counts.noGo += 1;
    if (!r.cleared) notCleared += 1;
    openFindingsLoad += r.findingsLoad;
    sums.score += r.score;
    sums.checklist += r.parts.checklist;
    sums.findings += r.parts.findings;
    sums.software += r.parts.software;
    sums.validation += r.parts.validation;
  }
  const byScore = [...assets].sort((a, b) => a.readiness.score - b.readiness.score || byText(a.tag, b.tag) || byText(a.id, b.id));
  const stops = byScore.map(stopsOf);

  // Each kind is counted over every asset; only the first BLOCKER_TOP_ITEMS items, worst assets
  // first, are read and listed.
  const blockers: Blocker[] = [];
  const add = <T>(
    kind: Blocker['kind'],
    listFor: (asset: AssetFigure, i: number) => StopList<T> | null,
    item: (value: T) => Omit<BlockerItem, 'assetId' | 'assetTag'>,
    text: (count: number, assetCount: number) => string,
  ) => {
    let count = 0;
    let assetCount = 0;
    const items: BlockerItem[] = [];
    byScore.forEach((asset, i) => {
      const list = listFor(asset, i);
      if (!list || list.count === 0) return;
      count += list.count;
      assetCount += 1;
      if (items.length >= BLOCKER_TOP_ITEMS) return;
      for (const value of list.items()) {
        if (items.length >= BLOCKER_TOP_ITEMS) break;
        items.push({ ...item(value), assetId: asset.id, assetTag: asset.tag });
      }
    });
    if (!count) return;
    const shown = kind === 'not-cleared' ? assetCount : count;
    blockers.push({ kind, count: shown, assets: assetCount, text: text(shown, assetCount), items });
  };
  const on = (k: number) => `on ${countWords(k)} ${plural(k, 'asset')}`;
  add(
    'not-cleared',
    (asset) => listOf(asset.readiness.notClearedBy),
    (f) => ({ kind: 'finding', id: f.id, label: f.title }),
    (c) => `${countWords(c)} ${plural(c, 'asset')} not cleared (open safety ${plural(c, 'finding')})`,
  );
  add(
    'blocking-findings',
    (_a, i) => stops[i].blockingFindings,
    (f) => ({ kind: 'finding', id: f.id, label: f.title }),
    (c, k) => `${countWords(c)} open blocking ${plural(c, 'finding')} ${on(k)}`,
  );
  add(
    'required-items',
    (_a, i) => stops[i].openRequired,
    (item) => ({ kind: 'checklist-item', id: item.id, label: item.title }),
    (c, k) => `${countWords(c)} required checklist ${plural(c, 'item')} not passed ${on(k)}`,
  );
  add(
    'ecus-off-baseline',
    (_a, i) => stops[i].offBaseline,
    (e) => ({ kind: 'ecu', id: e.ecuId, label: `${e.code}: ${ECU_STATUS_WORDS[e.status ?? 'missing']}` }),
    (c, k) => `${countWords(c)} ${plural(c, 'ECU')} off the baseline ${on(k)}`,
  );
  add(
    'tests-not-passed',
    (_a, i) => stops[i].notPassed,
    (t) => ({ kind: 'validation-test', id: t.testId, label: `${t.name}: ${TEST_STATUS_WORDS[t.status]}` }),
    (c, k) => `${countWords(c)} allocated ${plural(c, 'test')} not passed ${on(k)}`,
  );

  return {
    assetCount: n,
    meanScore: n ? round2(sums.score / n) : null,
    meanParts: n
      ? { checklist: sums.checklist / n, findings: sums.findings / n, software: sums.software / n, validation: sums.validation / n }
      : null,
    lowest: byScore[0] ? { id: byScore[0].id, tag: byScore[0].tag, score: byScore[0].readiness.score } : null,
    counts,
    notCleared,
    openFindingsLoad,
    blockers,
  };
}
