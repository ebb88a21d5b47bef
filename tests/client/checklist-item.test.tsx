import { useQuery } from '@tanstack/react-query';
import { act, fireEvent, screen, waitFor } from '@testing-library/react';
import { ChecklistItemCard, HV_CAUTION } from '@/components/assets/checklist-item-card';
import { assetKeys } from '@/hooks/queries/assets';
import type { Checklist, ChecklistItem } from '@/shared/schemas/assets';
import { checklistItem, progress } from './support/assets';
import { jsonResponse, renderWithProviders } from './support/render';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn() }) }));
jest.mock('expo-image-picker', () => ({}));
jest.mock('expo-image-manipulator', () => ({ ImageManipulator: {}, SaveFormat: { JPEG: 'jpeg' } }));

const fetchMock = jest.fn();

beforeEach(() => {
  fetchMock.mockReset();
  global.fetch = fetchMock as unknown as typeof fetch;
});

function checklistOf(item: ChecklistItem): Checklist {
  return {
    assetId: item.assetId,
    stageId: item.stageId,
    stage: 'Early prototype',
    visitId: '9f9f9f9f-0000-4000-8000-000000000001',
    current: true,
    progress: progress({ total: 1, done: 0, requiredTotal: 1, requiredDone: 0, deviations: 0 }),
    groups: [{ system: item.system, progress: progress({ total: 1, done: 0, requiredTotal: 1, requiredDone: 0, deviations: 0 }), items: [item] }],
  };
}

/** Renders the item as the checklist screen does: from the cached checklist, so cache changes show. */
function CachedItem({ assetId }: { assetId: string }) {
  const { data } = useQuery<Checklist>({ queryKey: assetKeys.checklist(assetId), queryFn: () => new Promise(() => {}), enabled: false });
  const item = data?.groups[0].items[0];
  return item ? <ChecklistItemCard item={item} readOnly={false} /> : null;
}

async function renderItem(item: ChecklistItem) {
  const view = renderWithProviders(<CachedItem assetId={item.assetId} />);
  act(() => {
    view.queryClient.setQueryData(assetKeys.checklist(item.assetId), checklistOf(item));
  });
  await screen.findByTestId(`item-${item.id}`);
  return view;
}

describe('checklist item card', () => {
  it('when N/A is pressed, then it asks for a reason and sends nothing until one is given', async () => {
    const item = checklistItem();
    fetchMock.mockResolvedValueOnce(
      jsonResponse(200, { ...item, state: 'not-applicable', naReason: 'Bench rig has no rear seats', version: 4, updatedBy: 'Ana Ruiz' }),
    );
    const { queryClient } = await renderItem(item);

    fireEvent.click(screen.getByTestId(`item-${item.id}-na`));
    expect(screen.getByLabelText('Why does this item not apply?')).toBeTruthy();
    expect(screen.getByTestId(`item-${item.id}-state`).textContent).toBe('Open');

    fireEvent.click(screen.getByTestId('na-submit'));
    expect(await screen.findByText('Say why this item does not apply.')).toBeTruthy();
    expect(fetchMock).not.toHaveBeenCalled();

    fireEvent.change(screen.getByTestId('na-reason'), { target: { value: 'Bench rig has no rear seats' } });
    fireEvent.click(screen.getByTestId('na-submit'));

    await waitFor(() => expect(fetchMock).toHaveBeenCalledTimes(1));
    const [url, init] = fetchMock.mock.calls[0];
    expect(url).toBe(`/api/checklist-items/${item.id}`);
    expect(init.method).toBe('PATCH');
    expect(JSON.parse(init.body)).toEqual({ state: 'not-applicable', naReason: 'Bench rig has no rear seats', version: 3 });
    await waitFor(() => expect(screen.getByTestId(`item-${item.id}-state`).textContent).toBe('Not applicable'));
    const cached = queryClient.getQueryData<Checklist>(assetKeys.checklist(item.assetId));
    expect(cached?.progress.done).toBe(1);
    expect(screen.getByText('Not applicable: Bench rig has no rear seats')).toBeTruthy();
  });

  it('when a deviation is described, then it is sent as a finding and "Finding filed" shows', async () => {
    const item = checklistItem();
    const findingId = '3e3e3e3e-0000-4000-8000-000000000009';
    fetchMock.mockResolvedValueOnce(jsonResponse(200, { ...item, state: 'deviation', findingId, version: 4, updatedBy: 'Ana Ruiz' }));
    const { queryClient } = await renderItem(item);

    fireEvent.click(screen.getByTestId(`item-${item.id}-deviation`));
    fireEvent.click(screen.getByTestId('deviation-submit'));
    expect(await screen.findByText('Describe the deviation in a few words.')).toBeTruthy();
    expect(fetchMock).not.toHaveBeenCalled();

    fireEvent.change(screen.getByTestId('deviation-description'), { target: { value: 'Left anchor bolt is M8, drawing says M10' } });
    fireEvent.click(screen.getByTestId('deviation-submit'));
    await waitFor(() => expect(fetchMock).toHaveBeenCalledTimes(1));
    expect(JSON.parse(fetchMock.mock.calls[0][1].body)).toEqual({
      state: 'deviation',
      deviation: { description: 'Left anchor bolt is M8, drawing says M10' },
      version: 3,
    });

    expect((await screen.findByTestId(`item-${item.id}-finding`)).textContent).toContain('Finding filed');
    expect(queryClient.getQueryData<Checklist>(assetKeys.checklist(item.assetId))?.groups[0].items[0].findingId).toBe(findingId);
    expect(screen.queryByTestId('deviation-description')).toBeNull();
  });

  it('when the server refuses, then the optimistic answer is rolled back and a sentence shows', async () => {
    const item = checklistItem();
    fetchMock.mockResolvedValueOnce(jsonResponse(500, { error: { code: 'server/internal', message: 'boom' } }));
    const { queryClient } = await renderItem(item);

    fireEvent.click(screen.getByTestId(`item-${item.id}-passed`));
    await waitFor(() => expect(screen.getByTestId(`item-${item.id}-error`).textContent).toBe('Something went wrong on our side. Try again.'));
    expect(queryClient.getQueryData<Checklist>(assetKeys.checklist(item.assetId))?.groups[0].items[0].state).toBe('open');
  });

  it('a high-voltage item carries the caution, and each answer button names its item', async () => {
    const item = checklistItem({ hvQualified: true, system: 'high-voltage', title: 'HV interlock loop' });
    await renderItem(item);
    expect(screen.getByTestId(`item-${item.id}-hv`).textContent).toBe(HV_CAUTION);
    expect(screen.getByRole('button', { name: 'Passed: HV interlock loop' })).toBeTruthy();
    expect(screen.getByRole('button', { name: 'N/A, not applicable: HV interlock loop' })).toBeTruthy();
  });
});
