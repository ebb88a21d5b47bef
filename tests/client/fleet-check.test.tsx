import { fireEvent, screen, waitFor } from '@testing-library/react';
import { AssignmentDetailScreen } from '@/components/fleet/assignment-detail-screen';
import { TOKEN_KEY, sessionStore } from '@/hooks/api/session-store';
import { ROAD_USE_CAUTION, type Assignment } from '@/shared/schemas/fleet';
import { PROGRAM_ID, STAGE_ID } from './support/assets';
import { me, routedFetch } from './support/findings';
import { renderWithProviders } from './support/render';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn(), replace: jest.fn() }), usePathname: () => '/fleet/assignments/x' }));
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));
jest.mock('expo-image-picker', () => ({}));
jest.mock('expo-image-manipulator', () => ({ ImageManipulator: {}, SaveFormat: { JPEG: 'jpeg' } }));

const DRIVER = { id: '11111111-1111-4111-8111-000000000020', name: 'Joss Kettleby' };
const ID = '9a9a9a9a-0000-4000-8000-000000000002';
const hour = 3600_000;

function assignment(overrides: Partial<Assignment> = {}): Assignment {
  return {
    id: ID,
    programId: PROGRAM_ID,
    assetId: '5d0c3b7e-1111-4a5b-9c3d-000000000021',
    assetTag: 'FW3-EP-021',
    vehicle: { status: 'assigned', stageId: STAGE_ID, stage: 'Early prototype', minDriverLevel: 2, odometerKm: 12480, cleared: true, notClearedReason: null },
    driver: DRIVER,
    startsAt: new Date(Date.now() - 2 * hour).toISOString(),
    endsAt: new Date(Date.now() + 2 * hour).toISOString(),
    purpose: 'durability-route',
    notes: '',
    status: 'checked-out',
    levelOverrideReason: null,
    cancelReason: null,
    overdueReturn: false,
    checkout: { odometerKm: 12480, chargePercent: 90, at: new Date(Date.now() - 2 * hour).toISOString(), by: DRIVER, notes: '', photos: [] },
    checkin: null,
    createdBy: null,
    createdAt: '2026-12-01T10:00:00.000Z',
    updatedAt: '2026-12-01T10:00:00.000Z',
    version: 2,
    ...overrides,
  };
}

beforeEach(() => {
  window.localStorage.setItem(TOKEN_KEY, 'token-1');
  sessionStore.reload();
});
afterEach(() => {
  window.localStorage.clear();
  sessionStore.clear();
});

describe('checking a vehicle in and out', () => {
  it('when the odometer goes down at check-in, then the server’s sentence shows at the field; damage notes then lead to the finding', async () => {
    const sentence = 'The odometer read 12480 km at check-out; it cannot go down.';
    const bodies: Array<Record<string, unknown>> = [];
    const refusedReading = { error: { code: 'request/invalid', message: `odometerKm: ${sentence}`, details: { fields: { odometerKm: sentence } } } };
    global.fetch = routedFetch([
      { path: /\/api\/me$/, body: me(DRIVER, 'driver') },
      { path: /\/api\/assignments\/[0-9a-f-]+\/history$/, body: { entries: [] } },
      { path: /\/api\/assignments\/[0-9a-f-]+$/, body: assignment() },
      {
        method: 'POST',
        path: /\/check-in$/,
        status: 400,
        body: (init) => {
          bodies.push(JSON.parse(String(init?.body)));
          return refusedReading;
        },
      },
    ]) as unknown as typeof fetch;
    renderWithProviders(<AssignmentDetailScreen assignmentId={ID} />);

    expect((await screen.findByTestId('assignment-status')).textContent).toBe('Checked out');
    expect(screen.getByText(ROAD_USE_CAUTION)).toBeTruthy();
    fireEvent.change(screen.getByTestId('checkin-odometer'), { target: { value: '12400' } });
    fireEvent.change(screen.getByTestId('checkin-charge'), { target: { value: '40' } });
    fireEvent.click(screen.getByTestId('checkin-submit'));
    expect((await screen.findByTestId('checkin-odometer-error')).textContent).toBe(sentence);
    expect(bodies[0]).toMatchObject({ odometerKm: 12400, chargePercent: 40, damageNotes: '', photoIds: [] });

    const returned = assignment({
      status: 'returned',
      version: 3,
      checkin: { odometerKm: 12731, chargePercent: 40, at: new Date().toISOString(), by: DRIVER, notes: '', photos: [], damageNotes: 'Scraped rear bumper', findingId: '3e3e3e3e-0000-4000-8000-0000000000bb' },
    });
    global.fetch = routedFetch([
      { path: /\/api\/me$/, body: me(DRIVER, 'driver') },
      { path: /\/api\/assignments\/[0-9a-f-]+\/history$/, body: { entries: [] } },
      { path: /\/api\/assignments\/[0-9a-f-]+$/, body: returned },
      {
        method: 'POST',
        path: /\/check-in$/,
        body: (init) => {
          bodies.push(JSON.parse(String(init?.body)));
          return returned;
        },
      },
    ]) as unknown as typeof fetch;
    fireEvent.change(screen.getByTestId('checkin-odometer'), { target: { value: '12731' } });
    fireEvent.change(screen.getByTestId('checkin-damage'), { target: { value: 'Scraped rear bumper' } });
    fireEvent.click(screen.getByTestId('checkin-submit'));

    const link = await screen.findByTestId('checkin-finding-link');
    expect(link.getAttribute('href')).toBe('/findings/3e3e3e3e-0000-4000-8000-0000000000bb');
    expect(bodies[1]).toMatchObject({ odometerKm: 12731, damageNotes: 'Scraped rear bumper', damageSeverity: 'major' });
    await waitFor(() => expect(screen.getByTestId('assignment-status').textContent).toBe('Returned'));
    expect(screen.getByTestId('assignment-checkin').textContent).toContain('251 km');
  });

  it('when the vehicle is not cleared, then the driver is told not to take it and gets no check-out form', async () => {
    global.fetch = routedFetch([
      { path: /\/api\/me$/, body: me(DRIVER, 'driver') },
      { path: /\/api\/assignments\/[0-9a-f-]+\/history$/, body: { entries: [] } },
      {
        path: /\/api\/assignments\/[0-9a-f-]+$/,
        body: assignment({
          status: 'planned',
          checkout: null,
          vehicle: { status: 'available', stageId: STAGE_ID, stage: 'Early prototype', minDriverLevel: 2, odometerKm: 12480, cleared: false, notClearedReason: 'Brake line chafing' },
        }),
      },
    ]) as unknown as typeof fetch;
    renderWithProviders(<AssignmentDetailScreen assignmentId={ID} />);

    expect((await screen.findByTestId('assignment-not-cleared')).textContent).toContain('Do not take this vehicle. It is not cleared: Brake line chafing.');
    expect(screen.getByText(ROAD_USE_CAUTION)).toBeTruthy();
    expect(screen.queryByTestId('checkout-submit')).toBeNull();
  });
});
