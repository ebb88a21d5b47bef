import { fireEvent, screen, waitFor, within } from '@testing-library/react';
import { BookScreen } from '@/components/fleet/book-screen';
import { TOKEN_KEY, sessionStore } from '@/hooks/api/session-store';
import { DEFAULT_GATE, type Stage } from '@/shared/schemas/assets';
import type { Assignment, DriverProfile, RefusalReason } from '@/shared/schemas/fleet';
import { PROGRAM_ID, STAGE_ID, assetSummary } from './support/assets';
import { me, routedFetch } from './support/findings';
import { renderWithProviders } from './support/render';

const mockReplace = jest.fn();
jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn(), replace: mockReplace }), usePathname: () => '/fleet/new' }));
jest.mock('expo-router/head', () => ({ __esModule: true, default: () => null }));

const COORDINATOR = { id: '11111111-1111-4111-8111-000000000010', name: 'Rosa Delmar' };
const VEHICLE = assetSummary({ id: '5d0c3b7e-1111-4a5b-9c3d-000000000021', tag: 'FW3-EP-021', status: 'available' });
const DRIVER_ID = '11111111-1111-4111-8111-000000000020';

const stage: Stage = {
  id: STAGE_ID,
  programId: PROGRAM_ID,
  name: 'Early prototype',
  position: 2,
  retired: false,
  gate: DEFAULT_GATE,
  minDriverLevel: 2,
  assetCount: 9,
  version: 1,
};

const driver: DriverProfile = {
  userId: DRIVER_ID,
  name: 'Hollis Grane',
  email: 'hollis@fenwater.example',
  role: 'driver',
  drivingLevel: 1,
  hvAwareness: false,
  hvAwarenessDate: null,
  licenceExpiry: '2026-12-14',
  notes: '',
  licenceExpiresSoon: true,
  licenceExpired: false,
  hasProfile: true,
  version: 2,
};

const reasons: Record<string, RefusalReason> = {
  overlap: {
    code: 'vehicle-overlap',
    message: 'FW3-EP-021 is already booked in this window: Joss Kettleby (2026-12-03 08:00 UTC to 2026-12-03 12:00 UTC).',
    overridable: false,
    assignmentIds: ['a1'],
  },
  safety: {
    code: 'vehicle-not-cleared',
    message: 'FW3-EP-021 is not cleared: an open safety finding (Brake line chafing). It may not be driven until it is resolved.',
    overridable: false,
  },
  level: { code: 'driver-level', message: 'Hollis Grane drives at level 1; the Early prototype stage needs level 2.', overridable: true },
  licence: { code: 'licence-expired', message: 'Hollis Grane’s driving licence expires on 2026-12-14, before the window ends.', overridable: false },
};

const assignment = (overrides: Partial<Assignment> = {}): Assignment => ({
  id: '9a9a9a9a-0000-4000-8000-000000000001',
  programId: PROGRAM_ID,
  assetId: VEHICLE.id,
  assetTag: VEHICLE.tag,
  vehicle: { status: 'available', stageId: STAGE_ID, stage: 'Early prototype', minDriverLevel: 2, odometerKm: 120, cleared: true, notClearedReason: null },
  driver: { id: DRIVER_ID, name: driver.name },
  startsAt: '2030-01-10T08:00:00.000Z',
  endsAt: '2030-01-10T12:00:00.000Z',
  purpose: 'climate',
  notes: '',
  status: 'planned',
  levelOverrideReason: null,
  cancelReason: null,
  overdueReturn: false,
  checkout: null,
  checkin: null,
  createdBy: COORDINATOR,
  createdAt: '2026-12-02T10:00:00.000Z',
  updatedAt: '2026-12-02T10:00:00.000Z',
  version: 1,
  ...overrides,
});

const refusal = (list: RefusalReason[]) => ({
  error: { code: 'assignment/refused', message: `This assignment cannot be booked. ${list.map((r) => r.message).join(' ')}`, details: { reasons: list } },
});

function routes(post: { status: number; body: (init: RequestInit | undefined) => unknown }) {
  return routedFetch([
    { path: /\/api\/me$/, body: me(COORDINATOR, 'coordinator') },
    { path: /\/api\/assets\?/, body: { items: [VEHICLE], nextCursor: null } },
    { path: /\/api\/stages\?/, body: { stages: [stage] } },
    { path: /\/api\/drivers\?/, body: { items: [driver] } },
    { method: 'POST', path: /\/api\/assignments$/, status: post.status, body: post.body },
  ]);
}

async function fillTheForm() {
  fireEvent.click(await screen.findByTestId(`book-asset-${VEHICLE.id}`));
  fireEvent.click(screen.getByTestId(`book-driver-${DRIVER_ID}`));
  fireEvent.click(screen.getByTestId('book-purpose-climate'));
}

beforeEach(() => {
  mockReplace.mockReset();
  window.localStorage.setItem(TOKEN_KEY, 'token-1');
  sessionStore.reload();
});
afterEach(() => {
  window.localStorage.clear();
  sessionStore.clear();
});

describe('booking a vehicle', () => {
  it('when the roster shows a driver, then it says level, HV awareness and a licence that expires soon, and flags the level the stage needs', async () => {
    global.fetch = routes({ status: 201, body: () => ({}) }) as unknown as typeof fetch;
    renderWithProviders(<BookScreen />);
    fireEvent.click(await screen.findByTestId(`book-asset-${VEHICLE.id}`));
    const row = screen.getByTestId(`book-driver-${DRIVER_ID}`);
    expect(row.textContent).toContain('Level 1 · No HV awareness · licence to 14 Dec 2026');
    expect(row.textContent).toContain('Licence expires soon');
    expect(row.textContent).toContain('Below level 2 for Early prototype');
  });

  it('when the server refuses for four reasons including safety, then every reason is listed and no override is offered', async () => {
    const all = [reasons.overlap, reasons.safety, reasons.level, reasons.licence];
    global.fetch = routes({ status: 422, body: () => refusal(all) }) as unknown as typeof fetch;
    renderWithProviders(<BookScreen />);
    await fillTheForm();
    fireEvent.click(screen.getByTestId('book-submit'));

    const list = await screen.findByTestId('book-refusal');
    const items = within(list).getAllByRole('listitem');
    expect(items).toHaveLength(4);
    for (const reason of all) expect(list.textContent).toContain(reason.message);
    expect(list.textContent).toContain('Vehicle not cleared (safety)');
    expect(screen.getByTestId('book-refusal-safety-note').textContent).toContain('The safety rule is never overridden');
    expect(screen.queryByTestId('book-override')).toBeNull();
    expect(screen.queryByTestId('book-override-reason')).toBeNull();
    expect(screen.getByTestId('book-refusal-no-override').textContent).toBe('The level rule cannot be overridden while the vehicle is not cleared.');
    expect(mockReplace).not.toHaveBeenCalled();
  });

  it('when the level rule is the only reason, then a coordinator may override it with a written reason, which is sent', async () => {
    const bodies: Array<Record<string, unknown>> = [];
    global.fetch = routes({
      status: 422,
      body: (init) => {
        bodies.push(JSON.parse(String(init?.body)));
        return refusal([reasons.level]);
      },
    }) as unknown as typeof fetch;
    renderWithProviders(<BookScreen />);
    await fillTheForm();
    fireEvent.click(screen.getByTestId('book-submit'));

    const list = await screen.findByTestId('book-refusal');
    expect(list.textContent).toContain(reasons.level.message);
    expect(screen.queryByTestId('book-refusal-safety-note')).toBeNull();
    fireEvent.click(screen.getByTestId('book-override'));
    fireEvent.click(screen.getByTestId('book-submit'));
    expect(await screen.findByTestId('book-override-reason-error')).toBeTruthy();
    expect(bodies).toHaveLength(1);

    const booked = assignment({ levelOverrideReason: 'Accompanied by Callum Tarrant-Ives (level 3).' });
    global.fetch = routes({
      status: 201,
      body: (init) => {
        bodies.push(JSON.parse(String(init?.body)));
        return booked;
      },
    }) as unknown as typeof fetch;
    fireEvent.change(screen.getByTestId('book-override-reason'), { target: { value: 'Accompanied by Callum Tarrant-Ives (level 3).' } });
    fireEvent.click(screen.getByTestId('book-submit'));
    await waitFor(() => expect(bodies).toHaveLength(2));
    expect(bodies[1]).toMatchObject({
      programId: PROGRAM_ID,
      assetId: VEHICLE.id,
      driverId: DRIVER_ID,
      purpose: 'climate',
      levelOverrideReason: 'Accompanied by Callum Tarrant-Ives (level 3).',
    });
    expect(bodies[0]).not.toHaveProperty('levelOverrideReason');
    await waitFor(() => expect(mockReplace).toHaveBeenCalledWith(`/fleet/assignments/${booked.id}?booked=1`));
  });

  it('when the window ends before it starts, then it says so and sends nothing', async () => {
    const fetchMock = routes({ status: 201, body: () => ({}) });
    global.fetch = fetchMock as unknown as typeof fetch;
    renderWithProviders(<BookScreen />);
    await fillTheForm();
    fireEvent.change(screen.getByTestId('book-start'), { target: { value: '2030-01-10T12:00' } });
    fireEvent.change(screen.getByTestId('book-end'), { target: { value: '2030-01-10T08:00' } });
    fireEvent.click(screen.getByTestId('book-submit'));
    expect((await screen.findByTestId('book-end-error')).textContent).toBe('The window must end after it starts.');
    expect(fetchMock.mock.calls.some(([, init]) => init?.method === 'POST')).toBe(false);
  });
});
