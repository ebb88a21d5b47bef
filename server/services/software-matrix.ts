import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import type { AssetKind } from '../../shared/schemas/assets';
import {
  REFLASH_STATUSES,
  type MatrixQuerySchema,
  type MatrixRow,
  type ReflashDoneSchema,
  type ReflashEntry,
  type ReflashList,
  type ReflashQuerySchema,
  type SoftwareMatrix,
} from '../../shared/schemas/software';
import { Program, Stage } from '../db/models';
import type { Deps } from '../deps';
import { AppError, notFound } from '../lib/app-error';
import { toCsv } from '../lib/csv';
import type { SessionUser } from '../middleware/auth';
import {
  addCount,
  decodeCursor,
  emptyCounts,
  encodeCursor,
  evaluateAsset,
  loadEcus,
  loadReleasedBaselines,
  statusReason,
  type AssetEvaluation,
  type EcuRow,
} from './software-common';
import { recordFlash } from './software-installed';
import { byStart, endOfDay, loadPlannedUses, neededFor, testOfProgram, useSentence } from './software-planned-uses';
import { assertMember } from './stages';

type MatrixQuery = z.output<typeof MatrixQuerySchema>;
type ReflashQuery = z.output<typeof ReflashQuerySchema>;
type ReflashDone = z.output<typeof ReflashDoneSchema>;

// The matrix and the reflash list read a fixed number of statements whatever the number of
// assets: the catalogue, the released baselines, and the assets with their installed versions
// folded into one JSON object per asset (`cfg`, ECU id -> version). Assets that share a stage,
// a kind and the same installed versions share one conformance, so the matrix computes each
// distinct configuration once and counts statuses over all assets from a grouped query.

async function checkFilters(user: SessionUser, q: { programId: string; stageId?: string; ecuId?: string }, ecus: EcuRow[]) {
  assertMember(user, q.programId, 'This program');
  if (q.stageId) {
    const stage = await Stage.findByPk(q.stageId, { attributes: ['id', 'programId'] });
    if (!stage || stage.programId !== q.programId) throw notFound('This stage');
  }
  if (q.ecuId && !ecus.some((e) => e.id === q.ecuId)) throw notFound('This ECU');
}

/** WHERE clauses shared by the grouped and the paged query: live assets of the program that carry or have recorded an ECU. The program id is always $1. */
function assetFilters(q: { programId: string; stageId?: string }, ecus: EcuRow[], bind: unknown[]): string[] {
  const p = (value: unknown) => `$${bind.push(value)}`;
  const kinds = [...new Set(ecus.flatMap((e) => e.assetKinds))];
  const where = [`a.program_id = ${p(q.programId)}`, `a.status <> 'retired'`, `(a.kind::text = ANY(${p(kinds)}::text[]) OR x.cfg IS NOT NULL)`];
  if (q.stageId) where.push(`a.stage_id = ${p(q.stageId)}`);
  return where;
}

/**
 * The installed versions of each asset as JSON text, keys in a fixed order so that equal
 * configurations give equal text. `ALL`: one aggregation over the program's installed rows (for
 * queries that read every asset); `PAGE`: a lookup per asset (for a page of a few dozen).
 */
const CFG_VERSIONS = `json_object_agg(i.ecu_id, i.software_version ORDER BY i.ecu_id)::text`;
const CFG_ALL = (programParam: string) =>
  `LEFT JOIN (SELECT i.asset_id, ${CFG_VERSIONS} AS cfg FROM installed_software i WHERE i.program_id = ${programParam} GROUP BY i.asset_id) x
          ON x.asset_id = a.id`;
const CFG_PAGE = `LEFT JOIN LATERAL (SELECT ${CFG_VERSIONS} AS cfg FROM installed_software i WHERE i.asset_id = a.id) x ON true`;
/** A configuration's key: stage, kind and a hash of its versions (a short key groups and compares fast). */
const CFG_KEY = `a.stage_id::text || '|' || a.kind::text || '|' || md5(coalesce(x.cfg, '{}'))`;

const parseCfg = (text: string | null): Record<string, string> => (text ? (JSON.parse(text) as Record<string, string>) : {});

type MatrixCursor = { t: string; id: string };
const isMatrixCursor = (v: unknown): v is MatrixCursor =>
  !!v && typeof v === 'object' && typeof (v as MatrixCursor).t === 'string' && (v as MatrixCursor).t.length <= 64 &&
  typeof (v as MatrixCursor).id === 'string' && /^[0-9a-f-]{36}$/i.test((v as MatrixCursor).id);

export async function softwareMatrix(deps: Deps, user: SessionUser, q: MatrixQuery): Promise<SoftwareMatrix> {
  assertMember(user, q.programId, 'This program');
  const ecus = await loadEcus(deps, q.programId);
  await checkFilters(user, q, ecus);
  const cursor = q.cursor ? decodeCursor(q.cursor, isMatrixCursor) : undefined;
  const baselines = await loadReleasedBaselines(deps, q.programId, q.stageId);
  const columns = q.ecuId ? ecus.filter((e) => e.id === q.ecuId) : ecus;

  const groupBind: unknown[] = [];
  const groupWhere = assetFilters(q, ecus, groupBind);
  const groups = await deps.sequelize.query<{ key: string; stage_id: string; kind: AssetKind; cfg: string | null; n: number }>(
    `SELECT ${CFG_KEY} AS key, a.stage_id, a.kind, min(x.cfg) AS cfg, count(*)::int AS n
       FROM assets a ${CFG_ALL('$1')}
      WHERE ${groupWhere.join(' AND ')}
      GROUP BY 1, 2, 3`,
    { bind: groupBind, type: QueryTypes.SELECT },
  );

  const evaluations = new Map<string, { evaluation: AssetEvaluation; cells: AssetEvaluation['cells'] }>();
  const counts = emptyCounts();
  let totalAssets = 0;
  const matching: string[] = [];
  for (const g of groups) {
    const evaluation = evaluateAsset({ kind: g.kind, stageId: g.stage_id }, parseCfg(g.cfg), ecus, baselines.get(g.stage_id));
    const cells = q.ecuId ? evaluation.cells.filter((c) => c.ecu.id === q.ecuId) : evaluation.cells;
    evaluations.set(g.key, { evaluation, cells });
    if (!cells.length) continue;
    for (const c of cells) addCount(counts, c.conformance.status, g.n);
    if (q.status && !cells.some((c) => c.conformance.status === q.status)) continue;
    totalAssets += g.n;
    matching.push(g.key);
  }

  const bind: unknown[] = [];
  const p = (value: unknown) => `$${bind.push(value)}`;
  const where = assetFilters(q, ecus, bind);
  // When every configuration matches, the page needs no key per asset: it reads the versions of its own rows only.
  const filtered = matching.length < groups.length;
  if (filtered) where.push(`${CFG_KEY} = ANY(${p(matching)}::text[])`);
  if (cursor) where.push(`(a.tag, a.id) > (${p(cursor.t)}::text, ${p(cursor.id)}::uuid)`);
  const page = await deps.sequelize.query<{ id: string; tag: string; kind: AssetKind; stage_id: string; stage: string; key: string; cfg: string | null }>(
    `SELECT a.id, a.tag, a.kind, a.stage_id, s.name AS stage, ${CFG_KEY} AS key, x.cfg
       FROM assets a ${filtered ? CFG_ALL('$1') : CFG_PAGE} JOIN stages s ON s.id = a.stage_id
      WHERE ${where.join(' AND ')}
      ORDER BY a.tag, a.id
      LIMIT ${p(q.limit + 1)}`,
    { bind, type: QueryTypes.SELECT },
  );
  const more = page.length > q.limit;
  const rows = more ? page.slice(0, q.limit) : page;
  const last = rows[rows.length - 1];

  return {
    ecus: columns.map((e) => ({ id: e.id, code: e.code, name: e.name })),
    baselines: [...baselines.values()].map((b) => ({ id: b.id, stageId: b.stageId, name: b.name, releaseLabel: b.releaseLabel, date: b.date })),
    rows: rows.map((r): MatrixRow => {
      // A configuration written between the two statements is not in the map: evaluate it on its own.
      const known = evaluations.get(r.key);
      const evaluation = known?.evaluation ?? evaluateAsset({ kind: r.kind, stageId: r.stage_id }, parseCfg(r.cfg), ecus, baselines.get(r.stage_id));
      const cells = known?.cells ?? (q.ecuId ? evaluation.cells.filter((c) => c.ecu.id === q.ecuId) : evaluation.cells);
      return {
        assetId: r.id,
        tag: r.tag,
        kind: r.kind,
        stageId: r.stage_id,
        stage: r.stage,
        baselineId: baselines.get(r.stage_id)?.id ?? null,
        cells: cells.map((c) => ({ ecuId: c.ecu.id, installed: c.conformance.installed, target: c.conformance.target, status: c.conformance.status })),
        score: { onBaseline: evaluation.result.onBaseline, expected: evaluation.result.expected },
      };
    }),
    counts,
    totalAssets,
    nextCursor: more && last ? encodeCursor({ t: last.tag, id: last.id } satisfies MatrixCursor) : null,
  };
}

// ---- Reflash list ---------------------------------------------------------------------------

/** Beyond this many assets the list asks for a narrower filter rather than holding the server. */
export const REFLASH_MAX_ASSETS = 50_000;

export async function reflashList(deps: Deps, user: SessionUser, q: ReflashQuery, now = new Date()): Promise<ReflashList> {
  assertMember(user, q.programId, 'This program');
  const ecus = await loadEcus(deps, q.programId);
  await checkFilters(user, q, ecus);
  const test = q.testId ? await testOfProgram(deps, q.programId, q.testId) : null;
  const uses = await loadPlannedUses(deps, q.programId, now);
  const filter = { before: q.before ? endOfDay(q.before) : undefined, testId: test?.id };
  const baselines = await loadReleasedBaselines(deps, q.programId, q.stageId);
  const stages = await Stage.findAll({ where: { programId: q.programId, ...(q.stageId ? { id: q.stageId } : {}) }, order: [['position', 'ASC']] });
  const bind: unknown[] = [];
  const where = assetFilters(q, ecus, bind);
  const assets = await deps.sequelize.query<{
    id: string;
    tag: string;
    vin: string | null;
    kind: AssetKind;
    stage_id: string;
    location: string;
    cfg: string | null;
    record_versions: Record<string, number> | null;
  }>(
    `SELECT a.id, a.tag, a.vin, a.kind, a.stage_id, a.location, x.cfg, x.record_versions
       FROM assets a
       LEFT JOIN (SELECT i.asset_id, ${CFG_VERSIONS} AS cfg, json_object_agg(i.ecu_id, i.version) AS record_versions
                    FROM installed_software i WHERE i.program_id = $1 GROUP BY i.asset_id) x ON x.asset_id = a.id
      WHERE ${where.join(' AND ')}
      ORDER BY a.tag, a.id
      LIMIT ${REFLASH_MAX_ASSETS + 1}`,
    { bind, type: QueryTypes.SELECT },
  );
  if (assets.length > REFLASH_MAX_ASSETS) {
    throw new AppError(413, 'export/too-many-rows', `More than ${REFLASH_MAX_ASSETS} assets match. Choose a stage and try again.`);
  }
  const stageName = new Map(stages.map((s) => [s.id, s.name]));
  const codes = new Map(ecus.map((e) => [e.id, e]));
  const items: ReflashEntry[] = [];
  const listed = new Set<string>();
  for (const a of assets) {
    const baseline = baselines.get(a.stage_id);
    if (!baseline) continue;
    const need = neededFor(uses.get(a.id), filter);
    if (!need.pass) continue;
    const { cells } = evaluateAsset({ kind: a.kind, stageId: a.stage_id }, parseCfg(a.cfg), ecus, baseline);
    for (const { ecu, conformance: c } of cells) {
      if (q.ecuId && ecu.id !== q.ecuId) continue;
      if (!c.status || !REFLASH_STATUSES.includes(c.status)) continue;
      listed.add(a.id);
      items.push({
        assetId: a.id,
        tag: a.tag,
        vin: a.vin,
        stageId: a.stage_id,
        stage: stageName.get(a.stage_id) ?? '',
        location: a.location,
        ecuId: ecu.id,
        ecuCode: ecu.code,
        ecuName: ecu.name,
        installed: c.installed,
        flashTo: c.target,
        status: c.status,
        reason: statusReason(c, codes),
        recordVersion: a.record_versions?.[ecu.id] ?? null,
        neededFor: need.use,
        neededBy: need.use?.at ?? null,
      });
    }
  }
  // What is needed first comes first; entries without a date keep the tag order after them.
  items.sort((x, y) => (x.neededFor && y.neededFor ? byStart(x.neededFor, y.neededFor) : x.neededFor ? -1 : y.neededFor ? 1 : 0));
  return {
    items,
    assets: listed.size,
    stagesWithoutBaseline: stages.filter((s) => !baselines.has(s.id) && !s.retired).map((s) => ({ id: s.id, name: s.name })),
    before: q.before ?? null,
    test,
  };
}

export const REFLASH_COLUMNS = [
  'tag',
  'vin',
  'stage',
  'location',
  'ecu',
  'ecu_name',
  'installed',
  'flash_to',
  'status',
  'reason',
  'needed_by',
  'needed_for',
] as const;

export async function reflashCsv(deps: Deps, user: SessionUser, q: ReflashQuery) {
  const list = await reflashList(deps, user, q);
  const program = await Program.findByPk(q.programId);
  const csv = toCsv(
    REFLASH_COLUMNS,
    list.items.map((i) => [
      i.tag,
      i.vin ?? '',
      i.stage,
      i.location,
      i.ecuCode,
      i.ecuName,
      i.installed ?? '',
      i.flashTo ?? '',
      i.status,
      i.reason,
      i.neededBy ?? '',
      useSentence(i.neededFor),
    ]),
  );
  const scope = [q.before ? `before-${q.before}` : '', list.test ? 'test' : ''].filter(Boolean).join('-');
  return { csv, filename: `reflash-${program?.code ?? 'program'}-${new Date().toISOString().slice(0, 10)}${scope ? `-${scope}` : ''}.csv` };
}

/** Marks a reflash list entry done: records the flash of `version` on the asset's ECU. */
export async function reflashDone(deps: Deps, user: SessionUser, input: ReflashDone) {
  const { assetId, ecuId, version, recordVersion, ...rest } = input;
  return recordFlash(
    deps,
    user,
    assetId,
    ecuId,
    { ...rest, softwareVersion: version, recordVersion, note: rest.note || 'Flashed from the reflash list.' },
    { flashedAt: 'flashedAt' },
  );
}
