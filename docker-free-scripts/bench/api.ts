// API against bare SQL. The statements an endpoint runs are captured in this process, from an
// app built with createApp on the bench database, by wrapping pg's Client#query (what
// Sequelize calls underneath); their count is the statements per request. The endpoint's time
// is measured over HTTP against the started server; the bare time replays the same statements,
// with the same bind values, one after another on one pg connection.
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import pg from 'pg';
import { createApp } from '../../server/app';
import type { Deps } from '../../server/deps';
import type { RouteSpec } from '../../server/lib/routes';
import { median, repeat, timed, QUICK } from './common';

export type Statement = { text: string; values?: unknown[] };

let sink: Statement[] | null = null;
let installed = false;

/** Wraps pg's Client#query once; statements are kept only while a capture is running. */
function installCapture() {
  if (installed) return;
  installed = true;
  const proto = pg.Client.prototype as unknown as { query: (...args: unknown[]) => unknown };
  const original = proto.query;
  proto.query = function (this: unknown, ...args: unknown[]) {
    if (sink) {
      const [config, values] = args;
      const text = typeof config === 'string' ? config : (config as { text?: string } | undefined)?.text;
      const vals = Array.isArray(values) ? values : (config as { values?: unknown[] } | undefined)?.values;
      if (text) sink.push({ text, values: vals });
    }
    return original.apply(this, args);
  };
}

/** Runs `work` and returns what it gave with the statements this process sent while it ran. */
export async function recordStatements<T>(work: () => Promise<T>): Promise<{ value: T; statements: Statement[] }> {
  installCapture();
  const statements: Statement[] = [];
  sink = statements;
  try {
    return { value: await work(), statements };
  } finally {
    sink = null;
  }
}

/** An endpoint and the ways of calling it; the first that answers 200 is measured. */
export type Endpoint = { name: string; goalRatio?: number; source: string; paths: (p: Target) => string[] };
export type Target = { programId: string; assetId: string; stageId: string };

/** The endpoints measured: fixed ones, the matrix when the route exists, and any readiness route the route table lists. */
export function discoverEndpoints(routes: RouteSpec[]): { endpoints: Endpoint[]; notes: string[] } {
  const has = (method: string, p: string) => routes.some((r) => r.method === method && r.path === p);
  const endpoints: Endpoint[] = [
    { name: 'asset list', source: "the bench's bar; issue 3: fast with thousands of assets", paths: (t) => [`/api/assets?programId=${t.programId}`] },
    { name: 'asset detail', source: "the bench's bar", paths: (t) => [`/api/assets/${t.assetId}`] },
  ];
  const notes: string[] = [];
  if (has('get', '/api/software/matrix')) endpoints.push({ name: 'software matrix', source: 'issue 5', paths: (t) => [`/api/software/matrix?programId=${t.programId}`] });
  else notes.push('skipped: software matrix (route GET /api/software/matrix not present)');
  const readiness = routes.filter((r) => r.method === 'get' && /readiness|roll-?up/i.test(r.path));
  for (const r of readiness) {
    const perAsset = /\/assets\/:[a-zA-Z]+\/readiness/.test(r.path);
    endpoints.push({ name: perAsset ? `asset readiness (${r.path})` : `readiness roll-up (${r.path})`, goalRatio: perAsset ? undefined : 1.5, source: 'issue 7', paths: (t) => fillPath(r.path, t) });
  }
  if (!readiness.some((r) => !/\/assets\/:[a-zA-Z]+\/readiness/.test(r.path))) {
    notes.push('skipped: readiness roll-up (no GET route with "readiness" or "roll-up" for a stage or program in the route table)');
  }
  return { endpoints, notes };
}

/** Fills path parameters by their name or the segment before them (…/stages/:id → a stage id); query variants follow. */
function fillPath(route: string, t: Target): string[] {
  const parts = route.split('/');
  const filled = parts.map((seg, i) => {
    if (!seg.startsWith(':')) return seg;
    const name = seg.slice(1).toLowerCase();
    const before = (parts[i - 1] ?? '').toLowerCase();
    if (name.includes('stage') || before.startsWith('stage')) return t.stageId;
    if (name.includes('asset') || before.startsWith('asset')) return t.assetId;
    if (name.includes('program') || before.startsWith('program')) return t.programId;
    return t.programId;
  });
  const p = filled.join('/');
  return route.includes(':')
    ? [p, `${p}?programId=${t.programId}`]
    : [`${p}?programId=${t.programId}`, `${p}?programId=${t.programId}&stageId=${t.stageId}`, `${p}?stageId=${t.stageId}`, p];
}

export type InProcess = { routes: RouteSpec[]; capture: (path: string, token: string) => Promise<{ status: number; statements: Statement[] }>; close: () => Promise<void> };

/** createApp on the bench database, listening on a loopback port of its own, for capturing statements. */
export async function startInProcess(deps: Deps): Promise<InProcess> {
  installCapture();
  const { app, routes } = createApp(deps);
  const server: Server = await new Promise((resolve) => {
    const s = app.listen(0, '127.0.0.1', () => resolve(s));
  });
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const once = async (path: string, token: string) => {
    const { value: status, statements } = await recordStatements(async () => {
      const res = await fetch(base + path, { headers: { authorization: `Bearer ${token}` } });
      await res.arrayBuffer();
      return res.status;
    });
    return { status, statements };
  };
  return {
    routes,
    // The fewest of three: a first request may open a pool connection, whose set-up statements are not the endpoint's.
    capture: async (path, token) => {
      const runs = [await once(path, token), await once(path, token), await once(path, token)];
      return runs.reduce((a, b) => (b.statements.length < a.statements.length ? b : a));
    },
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}

export type ApiFigure = {
  name: string;
  path: string;
  status: number;
  endpointMs: number;
  bareMs: number;
  ratio: number;
  runs: number;
  statementsSmall: number;
  statementsBig: number;
  /** The statements at 5,000 assets, each cut to 300 characters (for reading, not replay). */
  statements: string[];
  goalRatio?: number;
  source: string;
  note?: string;
};

const isWrite = (sql: string) => /^\s*(INSERT|UPDATE|DELETE|MERGE|CREATE|ALTER|DROP|TRUNCATE)\b/i.test(sql) || /\bFOR UPDATE\b/i.test(sql);

/** Measures each endpoint: statements at both sizes, endpoint time over HTTP, bare SQL time. */
export async function measureApi(opts: {
  endpoints: Endpoint[];
  inProcess: InProcess;
  serverBase: string;
  databaseUrl: string;
  token: string;
  big: Target;
  small: Target;
}): Promise<ApiFigure[]> {
  const runs = QUICK ? 10 : 30;
  const client = new pg.Client({ connectionString: opts.databaseUrl });
  await client.connect();
  const figures: ApiFigure[] = [];
  try {
    for (const ep of opts.endpoints) {
      // The first way of calling it that answers 200 at 5,000 assets; the same form at 50.
      const candidates = ep.paths(opts.big);
      let index = 0;
      let big = await opts.inProcess.capture(candidates[0], opts.token);
      for (let i = 1; i < candidates.length && big.status !== 200; i += 1) {
        const next = await opts.inProcess.capture(candidates[i], opts.token);
        if (next.status === 200) [big, index] = [next, i];
      }
      const pathBig = candidates[index];
      const small = await opts.inProcess.capture(ep.paths(opts.small)[index], opts.token);
      const figure: ApiFigure = {
        name: ep.name,
        path: pathBig,
        status: big.status,
        endpointMs: NaN,
        bareMs: NaN,
        ratio: NaN,
        runs: 0,
        statementsSmall: small.statements.length,
        statementsBig: big.statements.length,
        statements: big.statements.map((st) => st.text.replace(/\s+/g, ' ').trim().slice(0, 300)),
        goalRatio: ep.goalRatio,
        source: ep.source,
      };
      if (big.status !== 200 || small.status !== 200) {
        figure.note = `answered ${big.status} (5,000) / ${small.status} (50): not timed`;
        figures.push(figure);
        continue;
      }
      const endpoint = async () => {
        const res = await fetch(opts.serverBase + pathBig, { headers: { authorization: `Bearer ${opts.token}` } });
        await res.arrayBuffer();
        if (res.status !== 200) throw new Error(`${pathBig} answered ${res.status}`);
      };
      // A GET should not write; if one does, its replay runs inside a transaction that is rolled back.
      const writes = big.statements.some((s) => isWrite(s.text));
      const bare = async () => {
        if (writes) await client.query('BEGIN');
        try {
          for (const s of big.statements) await client.query(s.text, s.values);
        } finally {
          if (writes) await client.query('ROLLBACK');
        }
      };
      // Side by side: each run times the endpoint, then its bare SQL, so a busy moment on the machine weighs on both.
      // Three unmeasured pairs first warm up the caches and the connection pool.
      for (let i = 0; i < 3; i += 1) {
        await endpoint();
        await bare();
      }
      const endpointTimes: number[] = [];
      const bareTimes: number[] = [];
      await repeat(
        async () => {
          endpointTimes.push((await timed(endpoint)).ms);
          bareTimes.push((await timed(bare)).ms);
        },
        { runs, warmup: 0, budgetMs: 90_000 },
      );
      figure.endpointMs = median(endpointTimes);
      figure.bareMs = median(bareTimes);
      figure.ratio = figure.endpointMs / figure.bareMs;
      figure.runs = Math.min(endpointTimes.length, bareTimes.length);
      if (writes) figure.note = 'its statements include writes; replayed in a rolled-back transaction';
      figures.push(figure);
    }
  } finally {
    await client.end();
  }
  return figures;
}
