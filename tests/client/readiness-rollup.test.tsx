import { render, screen, within } from '@testing-library/react';
import { StageReadinessCard } from '@/components/readiness/stage-readiness-card';
import type { Forecast, StageRollup } from '@/shared/schemas/readiness';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn() }) }));

const forecast = (overrides: Partial<Forecast> = {}): Forecast => ({
  status: 'converging',
  date: '2026-06-12',
  targetLoad: 40,
  currentLoad: 80,
  slopePerDay: -2,
  intercept: 100,
  fromDate: '2026-05-01',
  toDate: '2026-05-14',
  points: 14,
  text: 'At this rate the stage reaches its threshold on 2026-06-12.',
  ...overrides,
});

function stage(overrides: Partial<StageRollup> = {}): StageRollup {
  return {
    stageId: 'st-ep',
    name: 'EP build',
    position: 1,
    gate: { goThreshold: 90, conditionalThreshold: 75, findingsBudget: 20, weights: { checklist: 0.4, findings: 0.3, software: 0.2, validation: 0.1 } },
    assetCount: 6,
    meanScore: 78.25,
    meanParts: null,
    lowest: { id: 'a-7', tag: 'FW3-EP-007', score: 52 },
    counts: { go: 2, conditional: 1, noGo: 3 },
    notCleared: 1,
    openFindingsLoad: 80,
    blockers: [
      {
        kind: 'blocking-findings',
        count: 3,
        assets: 2,
        text: 'three open blocking findings on two assets',
        items: [
          { kind: 'finding', id: 'f-1', label: 'Coolant weep', assetId: 'a-7', assetTag: 'FW3-EP-007' },
          { kind: 'finding', id: 'f-2', label: 'Loose connector', assetId: 'a-3', assetTag: 'FW3-EP-003' },
        ],
      },
    ],
    targetDate: '2026-06-30',
    forecast: forecast(),
    meetsTarget: true,
    ...overrides,
  };
}

describe('stage readiness card', () => {
  it('shows the mean, the counts in words, the lowest asset and the blockers with links', () => {
    render(<StageReadinessCard stage={stage()} />);
    expect(screen.getByTestId('stage-mean-st-ep').textContent).toBe('Mean score 78.3');
    expect(screen.getByTestId('stage-counts-st-ep').textContent).toBe('2 go1 conditional go3 no-go');
    expect(screen.getByTestId('stage-lowest-st-ep').getAttribute('href')).toBe('/assets/a-7');

    const blockers = within(screen.getByTestId('stage-blockers-st-ep'));
    expect(blockers.getByText('three open blocking findings on two assets')).toBeTruthy();
    const hrefs = blockers.getAllByRole('link').map((l) => l.getAttribute('href'));
    expect(hrefs).toEqual(['/findings/f-1', '/assets/a-7', '/findings/f-2', '/assets/a-3']);
    expect(blockers.getByText('and 1 more')).toBeTruthy();

    expect(screen.getByTestId('stage-forecast-st-ep').textContent).toBe('At this rate the stage reaches its threshold on 2026-06-12.');
    expect(screen.getByText('Target date 2026-06-30: the forecast meets it.')).toBeTruthy();
  });

  it('says "Not converging" when the load is not falling, and nothing stops a clean gate', () => {
    render(<StageReadinessCard stage={stage({ blockers: [], forecast: forecast({ status: 'not-converging', date: null, text: 'x' }) })} />);
    expect(screen.getByTestId('stage-forecast-st-ep').textContent).toMatch(/^Not converging/);
    expect(within(screen.getByTestId('stage-blockers-st-ep')).getByText('Nothing stops this gate.')).toBeTruthy();
  });
});
