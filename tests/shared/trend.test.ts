import { linearRegression } from 'simple-statistics';
import { DEFAULT_GATE } from '../../shared/schemas/assets';
import { addDays, fitLine, fitLoadTrend, forecastStage, meetsTarget, targetLoad, type LoadPoint } from '../../shared/domain/trend';

const AS_OF = new Date('2026-12-02T15:00:00Z');
const TODAY = '2026-12-02';

/** A daily series ending today: loads[i] on the day (loads.length - 1 - i) days ago. */
const daily = (loads: number[]): LoadPoint[] => loads.map((load, i) => ({ date: addDays(TODAY, i - (loads.length - 1)), load }));

describe('least-squares line', () => {
  // Anscombe, F. J. (1973), "Graphs in Statistical Analysis", The American Statistician 27(1),
  // 17-21, data set I: the paper gives the fitted line y = 3.00 + 0.500 x. Recomputed by hand:
  // n = 11, sum x = 99 (mean 9), sum y = 82.51 (mean 7.500909), Sxx = sum (x - 9)^2 = 110,
  // Sxy = sum x y - n mean(x) mean(y) = 797.60 - 742.59 = 55.01; slope = 55.01 / 110 = 0.500091,
  // intercept = 7.500909 - 0.500091 x 9 = 3.000091.
  const X = [10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5];
  const Y = [8.04, 6.95, 7.58, 8.81, 8.33, 9.96, 7.24, 4.26, 10.84, 4.82, 5.68];

  it('when Anscombe\'s data set I is fitted (Anscombe 1973, recomputed by hand), then slope 0.500091 and intercept 3.000091', () => {
    const line = fitLine(X.map((x, i) => [x, Y[i]] as const))!;
    expect(line.slope).toBeCloseTo(55.01 / 110, 10);
    expect(line.intercept).toBeCloseTo(82.51 / 11 - (55.01 / 110) * 9, 10);
    expect(line.slope).toBeCloseTo(0.5, 3);
    expect(line.intercept).toBeCloseTo(3.0, 3);
  });

  // The normal equations (any statistics textbook: slope = Sxy / Sxx, intercept = mean(y) - slope mean(x)),
  // written out here as a second implementation beside the package.
  function byHand(points: Array<[number, number]>) {
    const n = points.length;
    const mx = points.reduce((s, p) => s + p[0], 0) / n;
    const my = points.reduce((s, p) => s + p[1], 0) / n;
    const sxy = points.reduce((s, p) => s + (p[0] - mx) * (p[1] - my), 0);
    const sxx = points.reduce((s, p) => s + (p[0] - mx) ** 2, 0);
    return { slope: sxy / sxx, intercept: my - (sxy / sxx) * mx };
  }

  it.each([
    ['a falling load', [120, 118, 111, 109, 104, 99, 97, 90, 88, 84, 80, 79, 73, 70]],
    ['a rising load', [40, 42, 41, 45, 47, 46, 50, 52, 51, 55, 58, 57, 60, 61]],
    ['a flat load', [30, 30, 30, 30, 30]],
    ['a noisy load', [88, 61, 97, 70, 75, 102, 66, 59, 90, 84, 71, 77, 80, 68]],
  ])('when %s over daily snapshots is fitted, then it matches simple-statistics 7.12.1 linearRegression and the normal equations', (_name, loads) => {
    const series = daily(loads);
    const fit = fitLoadTrend(series, AS_OF)!;
    // x is days since the first day of the 14-day window.
    const start = 14 - loads.length;
    const points = loads.map((y, i) => [start + i, y] as [number, number]);
    const reference = linearRegression(points);
    expect(fit.slope).toBeCloseTo(reference.m, 10);
    expect(fit.intercept).toBeCloseTo(reference.b, 10);
    const hand = byHand(points);
    expect(fit.slope).toBeCloseTo(hand.slope, 10);
    expect(fit.intercept).toBeCloseTo(hand.intercept, 10);
    expect(fit.fromDate).toBe(addDays(TODAY, -13));
    expect(fit.toDate).toBe(TODAY);
  });

  it('when days are missing and older snapshots lie outside the window, then only the last 14 days count, at their real day offsets', () => {
    const series: LoadPoint[] = [
      { date: addDays(TODAY, -20), load: 500 },
      { date: addDays(TODAY, -13), load: 100 },
      { date: addDays(TODAY, -10), load: 90 },
      { date: addDays(TODAY, -4), load: 70 },
      { date: TODAY, load: 50 },
    ];
    const fit = fitLoadTrend(series, AS_OF)!;
    const reference = linearRegression([[0, 100], [3, 90], [9, 70], [13, 50]]);
    expect(fit.points).toBe(4);
    expect(fit.slope).toBeCloseTo(reference.m, 10);
    expect(fit.intercept).toBeCloseTo(reference.b, 10);
  });

  it('when fewer than three days are in the window, then there is no line', () => {
    expect(fitLoadTrend(daily([10, 9]), AS_OF)).toBeNull();
    expect(fitLine([[1, 2], [1, 3]])).toBeNull();
  });
});

describe('the forecast (the product\'s own threshold: the load at which the mean score reaches go)', () => {
  // Mean parts C 0.8, S 1, V 0.5 with the default weights: others = 0.32 + 0.2 + 0.05 = 0.57;
  // F* = (0.90 - 0.57) / 0.3 = 1.1 > 1: unreachable. With C 0.9: others 0.61, F* = 0.29 / 0.3 = 0.96667,
  // and for 4 assets on a budget of 20 the target load is 4 x 20 x (1 - 0.96667) = 2.6667.
  const reachable = { gate: DEFAULT_GATE, assetCount: 4, meanParts: { checklist: 0.9, findings: 0.5, software: 1, validation: 0.5 } };
  const unreachable = { ...reachable, meanParts: { ...reachable.meanParts, checklist: 0.8 } };

  it('when the target load is worked out by hand, then it matches', () => {
    expect(targetLoad(reachable)).toBeCloseTo(80 * (1 - 0.29 / 0.3), 10);
    expect(targetLoad(unreachable)).toBeNull();
    // With a go threshold of 60, C, S and V at 1 already give 70: any load will do.
    expect(targetLoad({ ...reachable, gate: { ...DEFAULT_GATE, goThreshold: 60 }, meanParts: { checklist: 1, findings: 0, software: 1, validation: 1 } })).toBe(Infinity);
    expect(targetLoad({ ...reachable, assetCount: 0, meanParts: null })).toBeNull();
  });

  it('when the load falls 5 a day from 100 to 35, then the line reaches 2.67 at x = 19.47, so on day 20 of the window, and the text says the date', () => {
    // Exactly on a line: load = 100 - 5 x (x = day in the window, today x = 13, load 35).
    const loads = Array.from({ length: 14 }, (_, i) => 100 - 5 * i);
    const f = forecastStage(daily(loads), reachable, AS_OF);
    expect(f).toMatchObject({ status: 'converging', date: addDays(TODAY, -13 + 20), points: 14, currentLoad: 35 });
    expect(f.slopePerDay).toBeCloseTo(-5, 10);
    expect(f.intercept).toBeCloseTo(100, 10);
    expect(f.text).toBe(`At this rate the stage reaches its threshold on ${addDays(TODAY, 7)}.`);
  });

  it('when the line has already crossed the target but today\'s load has not, then the date is tomorrow', () => {
    // load = 26 - 2 x down to 2 at x = 12, then today 3: the line is near 0 at x = 13, today's snapshot above 2.67.
    const loads = [...Array.from({ length: 13 }, (_, i) => 26 - 2 * i), 3];
    const f = forecastStage(daily(loads), reachable, AS_OF);
    expect(f).toMatchObject({ status: 'converging', date: addDays(TODAY, 1) });
  });

  it('when the load falls 1 a day from 40, then the date is the first whole day at or below the target', () => {
    // load = 40 - x over x = 0..13; target 2.6667 at x = 37.33, so day 38 of the window (25 days after today).
    const f = forecastStage(daily(Array.from({ length: 14 }, (_, i) => 40 - i)), reachable, AS_OF);
    expect(f).toMatchObject({ status: 'converging', date: addDays(TODAY, -13 + 38) });
  });

  it.each([
    ['rising', [10, 12, 14, 16, 18]],
    ['flat', [10, 10, 10, 10, 10]],
  ])('when the load is %s, then it is not converging', (_name, loads) => {
    expect(forecastStage(daily(loads), reachable, AS_OF)).toMatchObject({ status: 'not-converging', date: null, text: 'Not converging: the open-findings load is not falling.' });
    expect(forecastStage(daily(loads), unreachable, AS_OF).status).toBe('not-converging');
  });

  it('when the load falls but the other parts keep the stage below go, then it is unreachable by findings', () => {
    expect(forecastStage(daily([30, 25, 20, 15]), unreachable, AS_OF)).toMatchObject({ status: 'unreachable', targetLoad: null });
  });

  it('when today\'s load is already at or below the target, then it is reached', () => {
    expect(forecastStage(daily([9, 5, 2]), reachable, AS_OF)).toMatchObject({ status: 'reached', currentLoad: 2 });
  });

  it('when there are fewer than three snapshots or no assets, then it says so', () => {
    expect(forecastStage(daily([30, 20]), reachable, AS_OF).status).toBe('insufficient-data');
    expect(forecastStage(daily([30, 20, 10]), { ...reachable, assetCount: 0, meanParts: null }, AS_OF).status).toBe('no-assets');
  });

  it.each([
    [{ status: 'converging', date: '2026-12-20' }, '2026-12-20', true],
    [{ status: 'converging', date: '2026-12-21' }, '2026-12-20', false],
    [{ status: 'reached', date: null }, '2026-12-03', true],
    [{ status: 'not-converging', date: null }, '2027-06-01', false],
    [{ status: 'unreachable', date: null }, '2027-06-01', false],
    [{ status: 'insufficient-data', date: null }, '2027-06-01', null],
    [{ status: 'converging', date: '2026-12-20' }, null, null],
  ] as const)('when the forecast is %j and the target date %s, then meetsTarget is %s', (forecast, target, expected) => {
    expect(meetsTarget(forecast, target)).toBe(expected);
  });
});
