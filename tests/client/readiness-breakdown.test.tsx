import { render, screen, within } from '@testing-library/react';
import { AssetReadinessBody } from '@/components/readiness/asset-readiness-card';
import { ResultBadge, ResultCountsRow } from '@/components/readiness/result-badge';
import type { AssetReadiness } from '@/shared/schemas/readiness';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn() }) }));

const ASSET = '11111111-1111-4111-8111-111111111111';

function readiness(overrides: Partial<AssetReadiness> = {}): AssetReadiness {
  return {
    assetId: ASSET,
    tag: 'FW3-EP-014',
    stageId: 'stage-1',
    stage: 'EP build',
    asOf: '2026-05-01T08:00:00Z',
    score: 71.5,
    result: 'no-go',
    cleared: true,
    parts: { checklist: 0.9, findings: 0.4, software: 1, validation: 0.75 },
    weights: { checklist: 0.4, findings: 0.3, software: 0.2, validation: 0.1 },
    thresholds: { go: 90, conditional: 75 },
    findingsLoad: 12,
    findingsBudget: 20,
    notClearedBy: [],
    breakdown: [
      { part: 'checklist', points: -4, text: '-4: one required checklist item not passed', items: [{ kind: 'checklist-item', id: 'item-1', label: 'Torque HV busbar', points: -4 }] },
      {
        part: 'findings',
        points: -12,
        text: '-12: four open blocking findings',
        items: [
          { kind: 'finding', id: 'f-1', label: 'Coolant weep', points: -6 },
          { kind: 'finding', id: 'f-2', label: 'Loose connector', points: -6 },
        ],
      },
      { part: 'validation', points: -2.5, text: '-2.5: one allocated test not passed', items: [{ kind: 'validation-test', id: 't-9', label: 'Thermal shock: running' }] },
    ],
    ...overrides,
  };
}

describe('asset readiness breakdown', () => {
  it('when parts took points, then each shows as its plain sentence with links to every item', () => {
    render(<AssetReadinessBody readiness={readiness()} />);

    expect(screen.getByTestId('asset-readiness-score').textContent).toBe('71.5');
    expect(screen.getByText('-12: four open blocking findings')).toBeTruthy();
    expect(screen.getByText('-4: one required checklist item not passed')).toBeTruthy();

    const findings = within(screen.getByTestId('asset-readiness-breakdown-findings'));
    const links = findings.getAllByRole('link');
    expect(links.map((l) => l.getAttribute('href'))).toEqual(['/findings/f-1', '/findings/f-2']);
    expect(links[0].textContent).toBe('Coolant weep (-6)');

    const checklist = within(screen.getByTestId('asset-readiness-breakdown-checklist')).getByRole('link');
    expect(checklist.getAttribute('href')).toBe(`/assets/${ASSET}/checklist`);
    const test = within(screen.getByTestId('asset-readiness-breakdown-validation')).getByRole('link');
    expect(test.getAttribute('href')).toBe('/validation/tests/t-9');

    // The parts show with their weights, in words beside each bar.
    expect(screen.getByText('Findings: 40 % (weight 30 %)')).toBeTruthy();
  });

  it('when an open safety finding stands, then it says "not cleared" and links the finding', () => {
    render(<AssetReadinessBody readiness={readiness({ cleared: false, notClearedBy: [{ id: 'f-s', title: 'HV interlock loop open' }] })} />);
    const caution = screen.getByTestId('asset-readiness-not-cleared');
    expect(caution.textContent).toMatch(/Not cleared/);
    expect(within(caution).getByRole('link').getAttribute('href')).toBe('/findings/f-s');
  });
});

describe('result shows text, not colour alone', () => {
  it.each([
    ['go', 'Go'],
    ['conditional', 'Conditional go'],
    ['no-go', 'No-go'],
  ] as const)('a %s result reads "%s"', (result, words) => {
    render(<ResultBadge result={result} testID="badge" />);
    expect(screen.getByTestId('badge').textContent).toContain(words);
    expect(screen.getByTestId('badge').getAttribute('aria-label')).toBe(`Result: ${words}`);
  });

  it('the counts per result are written out', () => {
    render(<ResultCountsRow counts={{ go: 3, conditional: 1, noGo: 2 }} testID="counts" />);
    expect(screen.getByTestId('counts').textContent).toBe('3 go1 conditional go2 no-go');
  });
});
