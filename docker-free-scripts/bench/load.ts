// Load: autocannon on the started server (loopback only), 50 connections, a mix of reads and
// writes per connection: the asset list, an asset's detail, a PATCH of an asset's notes with the
// version last seen (a 409 is the product refusing a stale version, an expected outcome counted
// apart) and a finding filed on an asset.
import { QUICK } from './common';

type Req = { method?: string; path?: string; body?: string; headers?: Record<string, string> };
type Ctx = { assetId?: string };
type Result = {
  requests: { average: number; total: number };
  latency: { p50: number; p99: number; average: number };
  non2xx: number;
  errors: number;
  timeouts: number;
  duration: number;
  statusCodeStats?: Record<string, { count: number | string }>;
};
type Autocannon = (opts: Record<string, unknown>) => Promise<Result>;

export type LoadFigure = {
  connections: number;
  seconds: number;
  requests: number;
  rps: number;
  p50: number;
  p99: number;
  conflicts409: number;
  unexpectedNon2xx: number;
  errors: number;
  timeouts: number;
  statusCounts: Record<string, number>;
  mix: string;
};

export function loadSeconds(): number {
  const given = Number(process.env.BENCH_LOAD_SECONDS);
  if (Number.isFinite(given) && given > 0) return Math.min(given, 600);
  return QUICK ? 10 : 60;
}

export async function runLoad(opts: {
  base: string;
  token: string;
  programId: string;
  stageIds: string[];
  assets: Array<{ id: string; version: number }>;
  connections?: number;
  seconds?: number;
}): Promise<LoadFigure> {
  const autocannon = require('autocannon') as Autocannon;
  const connections = opts.connections ?? 50;
  const seconds = opts.seconds ?? loadSeconds();
  const versions = new Map(opts.assets.map((a) => [a.id, a.version]));
  const ids = opts.assets.map((a) => a.id);
  const pick = () => ids[Math.floor(Math.random() * ids.length)];
  let counter = 0;
  const json = { 'content-type': 'application/json' };

  const requests = [
    { method: 'GET', setupRequest: (req: Req) => ({ ...req, path: `/api/assets?programId=${opts.programId}` }) },
    { method: 'GET', setupRequest: (req: Req) => ({ ...req, path: `/api/assets/${pick()}` }) },
    {
      method: 'PATCH',
      setupRequest: (req: Req, context: Ctx) => {
        const id = pick();
        context.assetId = id;
        counter += 1;
        return { ...req, path: `/api/assets/${id}`, headers: { ...req.headers, ...json }, body: JSON.stringify({ notes: `Bench note ${counter}`, version: versions.get(id) ?? 0 }) };
      },
      onResponse: (status: number, body: string, context: Ctx) => {
        if (!context.assetId) return;
        try {
          const parsed = JSON.parse(body);
          const version = status === 200 ? parsed.version : status === 409 ? parsed?.error?.details?.current?.version : undefined;
          if (typeof version === 'number') versions.set(context.assetId, version);
        } catch {
          // Not JSON: the status alone is counted.
        }
      },
    },
    {
      method: 'GET',
      setupRequest: (req: Req) => ({ ...req, path: `/api/assets?programId=${opts.programId}&stage=${opts.stageIds[counter % opts.stageIds.length]}&status=in-test` }),
    },
    {
      method: 'POST',
      setupRequest: (req: Req) => {
        counter += 1;
        return {
          ...req,
          path: '/api/findings',
          headers: { ...req.headers, ...json },
          body: JSON.stringify({ assetId: pick(), title: `Bench finding ${counter}`, severity: 'minor', description: 'Filed by the load benchmark.' }),
        };
      },
    },
    { method: 'GET', setupRequest: (req: Req) => ({ ...req, path: `/api/assets/${pick()}` }) },
  ];

  const result = await autocannon({
    url: opts.base,
    connections,
    duration: seconds,
    timeout: 10,
    headers: { authorization: `Bearer ${opts.token}` },
    requests,
  });
  const statusCounts: Record<string, number> = {};
  for (const [code, s] of Object.entries(result.statusCodeStats ?? {})) statusCounts[code] = Number(s.count);
  const conflicts409 = statusCounts['409'] ?? 0;
  return {
    connections,
    seconds,
    requests: result.requests.total,
    rps: result.requests.average,
    p50: result.latency.p50,
    p99: result.latency.p99,
    conflicts409,
    unexpectedNon2xx: result.non2xx - conflicts409,
    errors: result.errors,
    timeouts: result.timeouts,
    statusCounts,
    mix: 'per connection, in turn: list, detail, PATCH notes (with version), filtered list, POST finding, detail (4 reads : 2 writes)',
  };
}
