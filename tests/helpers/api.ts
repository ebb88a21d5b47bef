import { BASE_URL } from './browser';

/** Signs in over the API (for test set-up; the journeys themselves sign in through the page). */
export async function apiToken(email: string, password = 'proofyard-demo'): Promise<string> {
  const res = await fetch(`${BASE_URL}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password }),
  });
  if (!res.ok) throw new Error(`sign-in ${email}: ${res.status}`);
  return ((await res.json()) as { token: string }).token;
}

export async function apiGet<T>(token: string, path: string): Promise<T> {
  const res = await fetch(`${BASE_URL}${path}`, { headers: { authorization: `Bearer ${token}` } });
  if (!res.ok) throw new Error(`GET ${path}: ${res.status}`);
  return (await res.json()) as T;
}

export async function programId(token: string, code: string): Promise<string> {
  const me = await apiGet<{ programs: Array<{ id: string; code: string }> }>(token, '/api/me');
  return me.programs.find((p) => p.code === code)!.id;
}
