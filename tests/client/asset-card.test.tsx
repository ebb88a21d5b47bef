import { render, screen } from '@testing-library/react';
import { AssetCard } from '@/components/assets/asset-card';
import { assetSummary, progress } from './support/assets';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn() }) }));

describe('asset card (phone list)', () => {
  it('when the asset is not cleared, then it shows the badge with the reason beside its checklist progress', () => {
    const asset = assetSummary({
      cleared: false,
      notClearedReason: 'open safety finding “HV interlock loop open”',
      checklist: progress({ total: 12, done: 9, deviations: 2 }),
    });
    render(<AssetCard asset={asset} />);

    const badge = screen.getByTestId('asset-card-FW3-EP-014-not-cleared');
    expect(badge.textContent).toBe('Not cleared: open safety finding “HV interlock loop open”.');

    const bar = screen.getByRole('progressbar');
    expect(bar.getAttribute('aria-valuenow')).toBe('75');
    expect(screen.getByText('9 of 12 done · 2 deviations')).toBeTruthy();
    expect(screen.getByTestId('asset-card-FW3-EP-014-tag').textContent).toBe('FW3-EP-014');
    expect(screen.getByText('In build')).toBeTruthy();
  });

  it('when the asset is cleared, then no not-cleared badge shows and the card links to the asset', () => {
    const asset = assetSummary({ checklist: progress({ total: 0, done: 0, deviations: 0 }) });
    render(<AssetCard asset={asset} />);

    expect(screen.queryByTestId('asset-card-FW3-EP-014-not-cleared')).toBeNull();
    expect(screen.getByText('No checklist items')).toBeTruthy();
    const link = screen.getByTestId('asset-card-FW3-EP-014');
    expect(link.getAttribute('href')).toBe(`/assets/${asset.id}`);
  });
});
