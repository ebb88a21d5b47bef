import type { Finding, FindingCounts } from '@/shared/schemas/findings';
import { PROGRAM_ID } from './assets';
import { jsonResponse } from './render';

export const ASSET_ID = '5d0c3b7e-1111-4a5b-9c3d-000000000014';
export const TECH = { id: '11111111-1111-4111-8111-000000000001', name: 'Tomas Berg' };
export const ENGINEER = { id: '11111111-1111-4111-8111-000000000002', name: 'Ana Ruiz' };

/** A finding as the API answers it; each test overrides what it is about. */
export function finding(overrides: Partial<Finding> = {}): Finding {
  return {
    id: '3e3e3e3e-0000-4000-8000-000000000001',
    programId: PROGRAM_ID,
    assetId: ASSET_ID,
    assetTag: 'FW3-EP-014',
    checklistItemId: null,
    title: 'HV connector not latched',
    description: 'Rear HV connector of the inverter sits loose.',
    system: 'high-voltage',
    severity: 'major',
    status: 'open',
    rejectReason: null,
    owner: null,
    watchers: [],
    dueDate: null,
    overdue: false,
    blocksDriving: false,
    photos: [],
    commentCount: 0,
    createdBy: TECH,
    createdAt: '2026-11-30T09:00:00.000Z',
    updatedAt: '2026-11-30T09:00:00.000Z',
    version: 1,
    ...overrides,
  };
}

export const counts = (overrides: Partial<FindingCounts> = {}): FindingCounts => ({ safety: 0, blocking: 0, major: 0, minor: 0, ...overrides });

export const me = (user: { id: string; name: string }, role: string) => ({
  user: { ...user, email: 'someone@fenwater.example', role, active: true },
  programs: [{ id: PROGRAM_ID, code: 'FW3', name: 'FW3 crossover' }],
});

type Answer = (init: RequestInit | undefined, url: string) => unknown;
type Route = { method?: string; path: RegExp; status?: number; body: Answer | object };

/** A fetch that answers by method and path, in the order the routes are listed; anything else is a 404. */
export function routedFetch(routes: Route[]) {
  return jest.fn(async (url: string, init?: RequestInit) => {
    const method = init?.method ?? 'GET';
    const route = routes.find((item) => (item.method ?? 'GET') === method && item.path.test(url));
    if (!route) return jsonResponse(404, { error: { code: 'request/not-found', message: `No route for ${method} ${url}` } });
    const body = typeof route.body === 'function' ? (route.body as Answer)(init, url) : route.body;
    return jsonResponse(route.status ?? 200, body);
  });
}
