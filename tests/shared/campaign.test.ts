import { campaignProgress, currentStep, projectedFinish, type ProgressStep } from '../../shared/domain/campaign';

const step = (id: string, plan: { h?: number; km?: number }, done: { h?: number; km?: number } = {}): ProgressStep => ({
  id,
  name: `Step ${id}`,
  durationHours: plan.h ?? null,
  distanceKm: plan.km ?? null,
  doneHours: done.h ?? 0,
  doneKm: done.km ?? 0,
});

// The demo's climate sequence: 12 + 2 + 48 + 8 + 4 = 74 h planned; 12 + 2 + 30 = 44 h done.
const climate = [step('soak', { h: 12 }, { h: 12 }), step('ramp', { h: 2 }, { h: 2 }), step('damp', { h: 48 }, { h: 30 }), step('cold', { h: 8 }), step('recovery', { h: 4 })];

describe('campaignProgress', () => {
  it('when a climate run has 44 of 74 hours done, then progress is 44/74 in hours', () => {
    expect(campaignProgress('climate', climate)).toEqual({ unit: 'hours', done: 44, planned: 74, fraction: 0.595, complete: false });
  });

  it('when a durability route counts km, then hours are ignored and km count', () => {
    const route = [step('city', { km: 4000, h: 100 }, { km: 4000, h: 90 }), step('motorway', { km: 10000 }, { km: 5400 }), step('pass', { km: 6000 })];
    expect(campaignProgress('durability', route)).toEqual({ unit: 'km', done: 9400, planned: 20000, fraction: 0.47, complete: false });
  });

  it('when a step ran over its plan, then the extra does not count for the steps still to run', () => {
    const over = [step('a', { h: 10 }, { h: 25 }), step('b', { h: 10 })];
    expect(campaignProgress('climate', over)).toMatchObject({ done: 10, planned: 20, fraction: 0.5, complete: false });
  });

  it('when every step is done, then it is complete at fraction 1', () => {
    expect(campaignProgress('climate', [step('a', { h: 3 }, { h: 3 }), step('b', { h: 0.5 }, { h: 0.5 })])).toMatchObject({ fraction: 1, complete: true });
  });

  it('when fractions of hours add up, then float dust is rounded away', () => {
    const tenths = [step('a', { h: 0.3 }, { h: 0.1 + 0.2 })];
    expect(campaignProgress('climate', tenths)).toMatchObject({ done: 0.3, complete: true });
  });
});

describe('currentStep', () => {
  it('when the first steps are done, then the first unfinished one is running', () => {
    expect(currentStep('climate', climate)).toEqual({ id: 'damp', name: 'Step damp', index: 2 });
  });

  it('when nothing is done yet, then the first step is current; when all are done, none is', () => {
    expect(currentStep('climate', [step('a', { h: 1 }), step('b', { h: 1 })])?.id).toBe('a');
    expect(currentStep('climate', [step('a', { h: 1 }, { h: 1 })])).toBeNull();
  });

  it('when an earlier step was left short and a later one done, then the short one is current (steps run in order)', () => {
    expect(currentStep('durability', [step('a', { km: 10 }, { km: 5 }), step('b', { km: 10 }, { km: 10 })])?.id).toBe('a');
  });
});

describe('projectedFinish', () => {
  const startedAt = '2026-12-01T00:00:00.000Z';

  it('when 44 of 74 hours took 46 hours of wall-clock time, then the remaining 30 hours take 30 x 46/44 = 31.36 hours more', () => {
    const asOf = new Date('2026-12-02T22:00:00.000Z'); // 46 h after the start
    const progress = campaignProgress('climate', climate);
    const finish = projectedFinish(progress, startedAt, asOf)!;
    const hoursLater = (new Date(finish).getTime() - asOf.getTime()) / 3_600_000;
    expect(hoursLater).toBeCloseTo((30 * 46) / 44, 6);
    expect(finish).toBe('2026-12-04T05:21:49.091Z');
  });

  it('when a route did 9,400 of 20,000 km in 21 days, then the rest takes 10,600 / (9,400 / 21) = 23.68 days', () => {
    const asOf = new Date('2026-12-22T00:00:00.000Z');
    const finish = projectedFinish({ done: 9400, planned: 20000, complete: false }, startedAt, asOf)!;
    expect((new Date(finish).getTime() - asOf.getTime()) / 86_400_000).toBeCloseTo((10600 * 21) / 9400, 6);
  });

  it('when it has not started, nothing is done, no time has passed or it is complete, then there is no projection', () => {
    const asOf = new Date('2026-12-02T00:00:00.000Z');
    expect(projectedFinish({ done: 5, planned: 10, complete: false }, null, asOf)).toBeNull();
    expect(projectedFinish({ done: 0, planned: 10, complete: false }, startedAt, asOf)).toBeNull();
    expect(projectedFinish({ done: 5, planned: 10, complete: false }, startedAt, new Date(startedAt))).toBeNull();
    expect(projectedFinish({ done: 10, planned: 10, complete: true }, startedAt, asOf)).toBeNull();
  });

  it('when the clock moves on without progress, then the projection slips (the rate is the rate so far)', () => {
    const progress = { done: 10, planned: 20, complete: false };
    const early = projectedFinish(progress, startedAt, new Date('2026-12-01T10:00:00.000Z'))!;
    const late = projectedFinish(progress, startedAt, new Date('2026-12-01T20:00:00.000Z'))!;
    expect(early).toBe('2026-12-01T20:00:00.000Z');
    expect(late).toBe('2026-12-02T16:00:00.000Z');
  });
});
