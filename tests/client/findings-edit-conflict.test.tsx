import { fireEvent, screen, waitFor } from '@testing-library/react';
import { FindingEditForm } from '@/components/findings/finding-edit-form';
import { ENGINEER, TECH, counts, finding, routedFetch } from './support/findings';
import { renderWithProviders } from './support/render';

jest.mock('expo-router', () => ({ useRouter: () => ({ push: jest.fn() }) }));

describe('editing a finding', () => {
  it('when someone saved first (409), then it shows their change and mine, and re-applies only mine on the latest version', async () => {
    const shown = finding({ version: 3, title: 'HV connector not latched', severity: 'major', owner: TECH });
    const theirs = { ...shown, version: 4, severity: 'blocking' as const, dueDate: '2026-12-20', updatedAt: '2026-12-02T10:00:00.000Z' };
    const bodies: unknown[] = [];
    global.fetch = routedFetch([
      { path: /\/api\/findings\?/, body: { items: [], nextCursor: null, counts: counts() } },
      {
        method: 'PATCH',
        path: /\/api\/findings\/[0-9a-f-]+$/,
        status: 409,
        body: (init) => {
          bodies.push(JSON.parse(String(init?.body)));
          return { error: { code: 'request/conflict', message: 'Someone else changed this finding first.', details: { current: theirs } } };
        },
      },
    ]) as unknown as typeof fetch;
    const onDone = jest.fn();
    renderWithProviders(<FindingEditForm finding={shown} me={ENGINEER} onDone={onDone} />);

    fireEvent.change(screen.getByTestId('finding-edit-title'), { target: { value: 'HV connector of the inverter not latched' } });
    fireEvent.click(screen.getByTestId('finding-edit-save'));

    const panel = await screen.findByTestId('finding-conflict');
    expect(panel.textContent).toContain('Someone else saved this finding');
    const theirChanges = screen.getByTestId('finding-conflict-theirs').textContent;
    expect(theirChanges).toContain('Severity: Major → Blocking');
    expect(theirChanges).toContain('Due date: (none) → 20 Dec 2026');
    expect(screen.getByTestId('finding-conflict-mine').textContent).toBe('Title: HV connector not latched → HV connector of the inverter not latched');
    expect(bodies).toEqual([{ version: 3, title: 'HV connector of the inverter not latched' }]);
    expect(onDone).not.toHaveBeenCalled();

    global.fetch = routedFetch([
      { path: /\/api\/findings\?/, body: { items: [], nextCursor: null, counts: counts() } },
      {
        method: 'PATCH',
        path: /\/api\/findings\/[0-9a-f-]+$/,
        body: (init) => {
          bodies.push(JSON.parse(String(init?.body)));
          return { ...theirs, version: 5, title: 'HV connector of the inverter not latched' };
        },
      },
    ]) as unknown as typeof fetch;
    fireEvent.click(screen.getByTestId('finding-conflict-apply'));
    await waitFor(() => expect(onDone).toHaveBeenCalledWith('Saved.'));
    expect(bodies[1]).toEqual({ version: 4, title: 'HV connector of the inverter not latched' });
  });
});
