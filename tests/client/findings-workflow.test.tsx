import { fireEvent, screen, waitFor } from '@testing-library/react';
import { FindingWorkflow } from '@/components/findings/finding-workflow';
import { findingKeys } from '@/hooks/queries/findings';
import type { FindingActor } from '@/shared/domain/finding-workflow';
import type { Role } from '@/shared/schemas/auth';
import type { FindingStatus } from '@/shared/schemas/findings';
import { ENGINEER, TECH, finding } from './support/findings';
import { jsonResponse, renderWithProviders } from './support/render';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn() }) }));

const fetchMock = jest.fn();
beforeEach(() => {
  fetchMock.mockReset();
  global.fetch = fetchMock as unknown as typeof fetch;
});

const OTHER = '11111111-1111-4111-8111-000000000099';
const shownActions = () =>
  screen
    .queryAllByTestId(/^finding-action-/)
    .map((button) => button.getAttribute('data-testid')?.replace('finding-action-', ''))
    .sort();

describe('workflow buttons follow allowedTransitions (shared/domain/finding-workflow, PRODUCT.md section 3C)', () => {
  it.each<[string, Role, 'self' | 'other' | 'none', FindingStatus, FindingStatus[]]>([
    ['a technician who does not own it sees no move on an open finding', 'technician', 'other', 'open', []],
    ['the owning technician starts work or marks it fixed', 'technician', 'self', 'open', ['fixed', 'in-work']],
    ['the owning technician may send a fixed finding back to in work or reopen it, but not verify it', 'technician', 'self', 'fixed', ['in-work', 'open']],
    ['a driver may reopen a fixed finding (reopening is open to anyone in the program)', 'driver', 'none', 'fixed', ['open']],
    ['an engineer verifies, rejects or reopens a fixed finding', 'engineer', 'other', 'fixed', ['in-work', 'open', 'rejected', 'verified']],
    ['a lead may reject an open finding nobody owns', 'lead', 'none', 'open', ['fixed', 'in-work', 'rejected']],
    ['a coordinator may only reopen a verified finding', 'coordinator', 'none', 'verified', ['open']],
    ['an admin works in no program and gets no button', 'admin', 'none', 'rejected', []],
  ])('%s', (_name, role, owner, status, expected) => {
    const actor: FindingActor = { id: TECH.id, role };
    const ownerPerson = owner === 'self' ? TECH : owner === 'other' ? { id: OTHER, name: 'Someone else' } : null;
    renderWithProviders(<FindingWorkflow finding={finding({ status, owner: ownerPerson })} actor={actor} online />);
    expect(shownActions()).toEqual([...expected].sort());
    expect(screen.getByTestId('finding-status')).toBeTruthy();
  });

  it('when offline, then the moves are shown but cannot be pressed', () => {
    renderWithProviders(<FindingWorkflow finding={finding({ status: 'fixed' })} actor={{ id: ENGINEER.id, role: 'engineer' }} online={false} />);
    expect(screen.getByTestId('finding-action-verified').getAttribute('aria-disabled')).toBe('true');
  });
});

describe('moving a finding', () => {
  it('when reject is pressed, then it asks for a reason and sends the status, the reason and the version shown', async () => {
    const shown = finding({ status: 'fixed', version: 7 });
    fetchMock.mockResolvedValueOnce(jsonResponse(200, { ...shown, status: 'rejected', rejectReason: 'Not a defect: drawing allows it', version: 8 }));
    const { queryClient } = renderWithProviders(<FindingWorkflow finding={shown} actor={{ id: ENGINEER.id, role: 'engineer' }} online />);

    fireEvent.click(screen.getByTestId('finding-action-rejected'));
    fireEvent.click(screen.getByTestId('finding-reason-submit'));
    expect(await screen.findByText('Say why the finding is rejected.')).toBeTruthy();
    expect(fetchMock).not.toHaveBeenCalled();

    fireEvent.change(screen.getByTestId('finding-reason'), { target: { value: 'Not a defect: drawing allows it' } });
    fireEvent.click(screen.getByTestId('finding-reason-submit'));
    await waitFor(() => expect(fetchMock).toHaveBeenCalledTimes(1));
    const [url, init] = fetchMock.mock.calls[0];
    expect(url).toBe(`/api/findings/${shown.id}`);
    expect(init.method).toBe('PATCH');
    expect(JSON.parse(init.body)).toEqual({ version: 7, status: 'rejected', reason: 'Not a defect: drawing allows it' });
    await waitFor(() => expect(queryClient.getQueryData(findingKeys.detail(shown.id))).toMatchObject({ status: 'rejected', version: 8 }));
  });

  it('when someone moved it first (409), then it says what it is now, takes the server copy and saves nothing of its own', async () => {
    const shown = finding({ status: 'open', owner: TECH, version: 3 });
    const current = { ...shown, status: 'in-work' as const, version: 4 };
    fetchMock.mockResolvedValueOnce(jsonResponse(409, { error: { code: 'request/conflict', message: 'Someone else changed this finding first.', details: { current } } }));
    const { queryClient } = renderWithProviders(<FindingWorkflow finding={shown} actor={{ id: TECH.id, role: 'technician' }} online />);

    fireEvent.click(screen.getByTestId('finding-action-fixed'));
    expect((await screen.findByTestId('finding-workflow-message')).textContent).toContain('it is now in work');
    expect(queryClient.getQueryData(findingKeys.detail(shown.id))).toMatchObject({ status: 'in-work', version: 4 });
    expect(fetchMock).toHaveBeenCalledTimes(1);
  });
});
