import { linearRegression } from 'simple-statistics';
import type { GateSettings } from '../schemas/assets';
import type { Forecast } from '../schemas/readiness';

/**
 * The trend of a stage's open-findings load and when it reaches the stage's threshold
 * (PRODUCT.md section 4). The least-squares line comes from the `simple-statistics` package
 * (`linearRegression`: ordinary least squares, y = m x + b); x is days since the first day of the
 * window, y the stage's total open-findings load of that day's snapshot.
 *
 * The threshold (the product's own definition): the load at which the stage's mean score reaches
 * the go threshold with the other parts as they are now. The mean score is linear in the mean
 * parts, so the findings part needed is
 *   F* = (goThreshold / 100 - wC C - wS S - wV V) / wF     (C, S, V: the stage's mean parts now)
 * and, taking the stage's mean F as 1 - (load / assets) / budget, the target total load is
 *   L* = assets x budget x (1 - F*).
 * That reading of F is exact while no asset's load is above the budget; beyond it an asset's F
 * stays at 0, so the real mean F is higher and the forecast errs on the late side. F* above 1
 * means findings alone cannot bring the stage to a go (`unreachable`); F* at or below 0 means any
 * load will do.
 */

export const TREND_WINDOW_DAYS = 14;
export const TREND_SERIES_DAYS = 30;
/** Fewer daily snapshots than this in the window give no line (two points always fit exactly). */
export const MIN_FIT_POINTS = 3;

const DAY_MS = 24 * 3600 * 1000;

export const isoDay = (d: Date) => d.toISOString().slice(0, 10);
const dayNumber = (date: string) => Math.round(Date.parse(`${date}T00:00:00Z`) / DAY_MS);
export const addDays = (date: string, days: number) => isoDay(new Date(Date.parse(`${date}T00:00:00Z`) + days * DAY_MS));

export type Line = { slope: number; intercept: number };

/** Ordinary least squares through (x, y) points, by `simple-statistics`; null with fewer than two distinct x. */
export function fitLine(points: ReadonlyArray<readonly [number, number]>): Line | null {
  if (new Set(points.map((p) => p[0])).size < 2) return null;
  const { m, b } = linearRegression(points.map(([x, y]) => [x, y]));
  return Number.isFinite(m) && Number.isFinite(b) ? { slope: m, intercept: b } : null;
}

export type LoadPoint = { date: string; load: number };

export type LoadFit = Line & { fromDate: string; toDate: string; points: number };

/**
 * The line through the daily loads of the last `windowDays` days up to `asOf`'s day (UTC),
 * with x in days since `fromDate`; null with fewer than MIN_FIT_POINTS days in the window.
 */
export function fitLoadTrend(series: readonly LoadPoint[], asOf: Date, windowDays = TREND_WINDOW_DAYS): LoadFit | null {
  const toDate = isoDay(asOf);
  const fromDate = addDays(toDate, -(windowDays - 1));
  const start = dayNumber(fromDate);
  const inWindow = series.filter((p) => p.date >= fromDate && p.date <= toDate);
  if (new Set(inWindow.map((p) => p.date)).size < MIN_FIT_POINTS) return null;
  const line = fitLine(inWindow.map((p) => [dayNumber(p.date) - start, p.load] as const));
  return line && { ...line, fromDate, toDate, points: inWindow.length };
}

export type StageNow = {
  gate: Pick<GateSettings, 'goThreshold' | 'weights' | 'findingsBudget'>;
  assetCount: number;
  /** The stage's mean parts now (null without assets). */
  meanParts: { checklist: number; findings: number; software: number; validation: number } | null;
};

/** The stage's total open-findings load at which its mean score reaches the go threshold; Infinity when any load will do, null when none will. */
export function targetLoad(stage: StageNow): number | null {
  if (!stage.meanParts || stage.assetCount === 0) return null;
  const { weights, goThreshold, findingsBudget } = stage.gate;
  const others = weights.checklist * stage.meanParts.checklist + weights.software * stage.meanParts.software + weights.validation * stage.meanParts.validation;
  const needed = goThreshold / 100 - others;
  if (weights.findings <= 0) return needed <= 1e-9 ? Infinity : null;
  const fStar = needed / weights.findings;
  if (fStar > 1 + 1e-9) return null;
  if (fStar <= 0) return Infinity;
  return stage.assetCount * findingsBudget * (1 - Math.min(1, fStar));
}

/**
 * "At this rate the stage reaches its threshold on DATE", or why not. `series`: the stage's daily
 * loads (any span; the window is taken from it). In this order: no assets; `reached` when the
 * latest load is at or below the target; too few snapshots; `not-converging` when the line does
 * not fall (whether or not findings alone could reach a go: the trend is the news); `unreachable`
 * when it falls but no load would give a go; else `converging`, dated the first whole day on which
 * the fitted line is at or below the target, never before the day after the latest snapshot.
 */
export function forecastStage(series: readonly LoadPoint[], stage: StageNow, asOf: Date, windowDays = TREND_WINDOW_DAYS): Forecast {
  const toDate = isoDay(asOf);
  const fromDate = addDays(toDate, -(windowDays - 1));
  const inWindow = [...series].filter((p) => p.date >= fromDate && p.date <= toDate).sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : 0));
  const latest = inWindow[inWindow.length - 1] ?? null;
  const fit = fitLoadTrend(series, asOf, windowDays);
  const target = targetLoad(stage);
  const base = {
    date: null,
    targetLoad: target === null || !Number.isFinite(target) ? null : target,
    currentLoad: latest?.load ?? null,
    slopePerDay: fit?.slope ?? null,
    intercept: fit?.intercept ?? null,
    fromDate,
    toDate,
    points: inWindow.length,
  };
  if (stage.assetCount === 0) return { ...base, status: 'no-assets', text: 'No assets on this stage.' };
  if (target !== null && latest && latest.load <= target) {
    return { ...base, status: 'reached', text: 'The open-findings load is at or below the level a go needs.' };
  }
  if (!fit || !latest) {
    return { ...base, status: 'insufficient-data', text: `Not enough daily snapshots yet: a trend needs ${MIN_FIT_POINTS} days in the last ${windowDays}.` };
  }
  if (fit.slope >= 0) return { ...base, status: 'not-converging', text: 'Not converging: the open-findings load is not falling.' };
  if (target === null) {
    return {
      ...base,
      status: 'unreachable',
      text: 'The open-findings load is falling, but clearing findings alone cannot bring this stage to a go: the checklist, software or tests must move too.',
    };
  }
  const x = (target - fit.intercept) / fit.slope;
  const lastX = dayNumber(latest.date) - dayNumber(fromDate);
  const date = addDays(fromDate, Math.max(Math.ceil(x - 1e-9), lastX + 1));
  return { ...base, status: 'converging', date, text: `At this rate the stage reaches its threshold on ${date}.` };
}

/** Whether the forecast meets a target date: null without a target date or when there is nothing to compare. */
export function meetsTarget(forecast: Pick<Forecast, 'status' | 'date'>, targetDate: string | null): boolean | null {
  if (!targetDate) return null;
  if (forecast.status === 'reached') return true;
  if (forecast.status === 'converging') return forecast.date !== null && forecast.date <= targetDate;
  if (forecast.status === 'not-converging' || forecast.status === 'unreachable') return false;
  return null;
}
