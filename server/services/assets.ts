import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { z } from 'zod';
import { checkVin } from '../../shared/domain/vin';
import {
  ASSET_SORTS,
  ASSET_STATUSES,
  type AssetDetail,
  type AssetListQuerySchema,
  type AssetSummary,
  type ChecklistProgress,
  type CreateAssetSchema,
  type HistoryEntry as HistoryEntryDto,
  type MoveStageSchema,
  type UpdateAssetSchema,
} from '../../shared/schemas/assets';
import { Asset, Photo, Program, Stage, StageVisit } from '../db/models';
import type { Deps } from '../deps';
import { AppError, conflict, fieldError, notFound } from '../lib/app-error';
import { toCsv } from '../lib/csv';
import type { SessionUser } from '../middleware/auth';
import { historyOf, recordHistory } from './history';
import { photoDtos, signedPhotoUrl } from './photos';
import { assertMember } from './stages';

type ListQuery = z.output<typeof AssetListQuerySchema>;
type CreateAsset = z.output<typeof CreateAssetSchema>;
type UpdateAsset = z.output<typeof UpdateAssetSchema>;
type MoveStage = z.output<typeof MoveStageSchema>;
type Sort = (typeof ASSET_SORTS)[number];

// ---- The summary query (list, export and detail share it) ---------------------------------

/**
 * Each sort is a list of keys, always followed by the asset id, so the order is total and a
 * keyset cursor is stable when sort values tie. Casts turn the cursor's JSON values back into
 * the column types for the row comparison.
 */
const SORT_KEYS: Record<Sort, Array<{ sql: string; cast: string }>> = {
  tag: [{ sql: 'a.tag', cast: 'text' }],
  updated: [{ sql: 'a.updated_at', cast: 'timestamptz' }],
  stage: [
    { sql: 's.position', cast: 'int' },
    { sql: 'a.tag', cast: 'text' },
  ],
  status: [
    { sql: 'a.status', cast: 'enum_assets_status' },
    { sql: 'a.tag', cast: 'text' },
  ],
  location: [
    { sql: 'a.location', cast: 'text' },
    { sql: 'a.tag', cast: 'text' },
  ],
};

const CursorSchema = z.object({
  s: z.enum(ASSET_SORTS),
  d: z.enum(['asc', 'desc']),
  k: z.array(z.union([z.string().max(200), z.number()])).max(2),
  id: z.uuid(),
});
type Cursor = z.infer<typeof CursorSchema>;

const encodeCursor = (c: Cursor) => Buffer.from(JSON.stringify(c)).toString('base64url');

function decodeCursor(raw: string, sort: Sort, dir: 'asc' | 'desc'): Cursor {
  let parsed: Cursor;
  try {
    parsed = CursorSchema.parse(JSON.parse(Buffer.from(raw, 'base64url').toString('utf8')));
  } catch {
    throw fieldError('cursor', 'This page link is not valid. Start again from the first page.');
  }
  if (parsed.s !== sort || parsed.d !== dir || parsed.k.length !== SORT_KEYS[sort].length) {
    throw fieldError('cursor', 'This page link belongs to another sort order. Start again from the first page.');
  }
  // Each value must fit its column's type, or the database would refuse the comparison.
  if (!parsed.k.every((value, i) => cursorValueFits(SORT_KEYS[sort][i].cast, value))) {
    throw fieldError('cursor', 'This page link is not valid. Start again from the first page.');
  }
  return parsed;
}

function cursorValueFits(cast: string, value: string | number): boolean {
  if (cast === 'int') return Number.isInteger(value);
  if (typeof value !== 'string') return false;
  if (cast === 'timestamptz') return /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d{1,6})?Z$/.test(value) && !Number.isNaN(Date.parse(value));
  if (cast === 'enum_assets_status') return (ASSET_STATUSES as readonly string[]).includes(value);
  return true;
}

type SummaryRow = {
  id: string;
  program_id: string;
  tag: string;
  kind: AssetSummary['kind'];
  stage_id: string;
  stage: string;
  status: AssetSummary['status'];
  location: string;
  vin: string | null;
  odometer_km: number;
  updated_at: Date;
  k1: string | number | Date;
  k2: string | number | Date | null;
  total: number;
  done: number;
  required_total: number;
  required_done: number;
  deviations: number;
  thumb_id: string | null;
  blocker: string | null;
};

type Filters = {
  programId: string;
  ids?: string[];
  stage?: string;
  status?: string;
  kind?: string;
  location?: string;
  q?: string;
  sort: Sort;
  dir: 'asc' | 'desc';
  cursor?: Cursor;
  limit?: number;
};

const escapeLike = (text: string) => text.replace(/[\\%_]/g, (c) => `\\${c}`);

/**
 * One statement: the page of assets (keyset), then, for that page only, the open stage visit's
 * checklist progress, the newest photo and the first open safety finding, each set-based.
 */
async function selectSummaries(deps: Deps, f: Filters, transaction?: Transaction): Promise<SummaryRow[]> {
  const bind: unknown[] = [];
  const p = (value: unknown) => `$${bind.push(value)}`;
  const where = [`a.program_id = ${p(f.programId)}`];
  if (f.ids) where.push(`a.id = ANY(${p(f.ids)}::uuid[])`);
  if (f.stage) where.push(`a.stage_id = ${p(f.stage)}`);
  if (f.status) where.push(`a.status = ${p(f.status)}`);
  if (f.kind) where.push(`a.kind = ${p(f.kind)}`);
  if (f.location) where.push(`lower(a.location) = lower(${p(f.location)})`);
  if (f.q) where.push(`a.search ILIKE ${p(`%${escapeLike(f.q)}%`)}`);
  const keys = SORT_KEYS[f.sort];
  const dir = f.dir === 'desc' ? 'DESC' : 'ASC';
  if (f.cursor) {
    const left = [...keys.map((k) => k.sql), 'a.id'].join(', ');
    const right = [...keys.map((k, i) => `${p(f.cursor!.k[i])}::${k.cast}`), `${p(f.cursor.id)}::uuid`].join(', ');
    where.push(`(${left}) ${dir === 'ASC' ? '>' : '<'} (${right})`);
  }
  const orderInner = [...keys.map((k) => `${k.sql} ${dir}`), `a.id ${dir}`].join(', ');
  const orderOuter = [...keys.map((_, i) => `page.k${i + 1} ${dir}`), `page.id ${dir}`].join(', ');
  const limit = f.limit ? `LIMIT ${p(f.limit)}` : '';
  const sql = `
    WITH page AS (
      SELECT a.id, a.program_id, a.tag, a.kind, a.stage_id, s.name AS stage, a.status, a.location, a.vin,
             a.odometer_km, a.updated_at, ${keys[0].sql} AS k1, ${keys[1]?.sql ?? 'NULL'} AS k2
        FROM assets a JOIN stages s ON s.id = a.stage_id
       WHERE ${where.join(' AND ')}
       ORDER BY ${orderInner}
       ${limit}
    ),
    progress AS (
      SELECT ci.asset_id,
             count(*)::int AS total,
             count(*) FILTER (WHERE ci.state IN ('passed', 'not-applicable'))::int AS done,
             count(*) FILTER (WHERE ci.required_for_gate)::int AS required_total,
             count(*) FILTER (WHERE ci.required_for_gate AND ci.state IN ('passed', 'not-applicable'))::int AS required_done,
             count(*) FILTER (WHERE ci.state = 'deviation')::int AS deviations
        FROM stage_visits v JOIN checklist_items ci ON ci.visit_id = v.id
       WHERE v.left_at IS NULL AND v.asset_id IN (SELECT id FROM page)
       GROUP BY ci.asset_id
    ),
    thumb AS (
      SELECT DISTINCT ON (ph.asset_id) ph.asset_id, ph.id
        FROM photos ph WHERE ph.asset_id IN (SELECT id FROM page)
       ORDER BY ph.asset_id, ph.created_at DESC, ph.id DESC
    ),
    blocker AS (
      SELECT DISTINCT ON (fi.asset_id) fi.asset_id, fi.title
        FROM findings fi
       WHERE fi.asset_id IN (SELECT id FROM page) AND fi.severity = 'safety' AND fi.status NOT IN ('verified', 'rejected')
       ORDER BY fi.asset_id, fi.created_at, fi.id
    )
    SELECT page.*, coalesce(pr.total, 0) AS total, coalesce(pr.done, 0) AS done,
           coalesce(pr.required_total, 0) AS required_total, coalesce(pr.required_done, 0) AS required_done,
           coalesce(pr.deviations, 0) AS deviations, thumb.id AS thumb_id, blocker.title AS blocker
      FROM page
      LEFT JOIN progress pr ON pr.asset_id = page.id
      LEFT JOIN thumb ON thumb.asset_id = page.id
      LEFT JOIN blocker ON blocker.asset_id = page.id
     ORDER BY ${orderOuter}`;
  return deps.sequelize.query<SummaryRow>(sql, { bind, type: QueryTypes.SELECT, transaction });
}

const progressOf = (r: { total: number; done: number; required_total: number; required_done: number; deviations: number }): ChecklistProgress => ({
  total: r.total,
  done: r.done,
  requiredTotal: r.required_total,
  requiredDone: r.required_done,
  deviations: r.deviations,
});

function toSummary(deps: Deps, r: SummaryRow): AssetSummary {
  return {
    id: r.id,
    programId: r.program_id,
    tag: r.tag,
    kind: r.kind,
    stageId: r.stage_id,
    stage: r.stage,
    status: r.status,
    location: r.location,
    vin: r.vin,
    odometerKm: r.odometer_km,
    updatedAt: r.updated_at.toISOString(),
    checklist: progressOf(r),
    thumbnailUrl: r.thumb_id ? signedPhotoUrl(deps, r.thumb_id, 'thumb') : null,
    cleared: r.blocker === null,
    notClearedReason: r.blocker,
  };
}

const cursorValue = (v: string | number | Date | null) => (v instanceof Date ? v.toISOString() : (v ?? ''));

export async function listAssets(deps: Deps, user: SessionUser, query: ListQuery) {
  assertMember(user, query.programId, 'This program');
  const cursor = query.cursor ? decodeCursor(query.cursor, query.sort, query.dir) : undefined;
  const rows = await selectSummaries(deps, { ...query, cursor, limit: query.limit + 1 });
  const more = rows.length > query.limit;
  const page = more ? rows.slice(0, query.limit) : rows;
  const last = page[page.length - 1];
  const nKeys = SORT_KEYS[query.sort].length;
  const nextCursor =
    more && last
      ? encodeCursor({ s: query.sort, d: query.dir, k: [last.k1, last.k2].slice(0, nKeys).map(cursorValue), id: last.id })
      : null;
  return { items: page.map((r) => toSummary(deps, r)), nextCursor };
}

/** Beyond this many rows the export asks for a narrower filter rather than holding the server. */
export const EXPORT_MAX_ROWS = 50_000;
export const EXPORT_COLUMNS = [
  'tag', 'kind', 'stage', 'status', 'location', 'vin', 'odometer_km', 'checklist_done', 'checklist_total', 'updated_at',
] as const;

export async function exportAssetsCsv(deps: Deps, user: SessionUser, query: Omit<ListQuery, 'cursor' | 'limit'>) {
  assertMember(user, query.programId, 'This program');
  const rows = await selectSummaries(deps, { ...query, limit: EXPORT_MAX_ROWS + 1 });
  if (rows.length > EXPORT_MAX_ROWS) {
    throw new AppError(413, 'export/too-many-rows', `More than ${EXPORT_MAX_ROWS} assets match. Narrow the filter and export again.`);
  }
  const program = await Program.findByPk(query.programId);
  const csv = toCsv(
    EXPORT_COLUMNS,
    rows.map((r) => [r.tag, r.kind, r.stage, r.status, r.location, r.vin ?? '', r.odometer_km, r.done, r.total, r.updated_at.toISOString()]),
  );
  return { csv, filename: `assets-${program?.code ?? 'program'}-${new Date().toISOString().slice(0, 10)}.csv` };
}

// ---- One asset ----------------------------------------------------------------------------

/** The asset when the user belongs to its program; otherwise 404, never 403. */
export async function visibleAsset(user: SessionUser, id: string, transaction?: Transaction, lock = false): Promise<Asset> {
  const asset = await Asset.findByPk(id, { transaction, ...(lock && transaction ? { lock: transaction.LOCK.UPDATE } : {}) });
  if (!asset || !user.programIds.includes(asset.programId)) throw notFound('This asset');
  return asset;
}

type VisitRow = {
  id: string;
  stage_id: string;
  stage: string;
  entered_at: Date;
  left_at: Date | null;
  by: string | null;
  total: number;
  done: number;
  required_total: number;
  required_done: number;
  deviations: number;
};

export async function assetDetail(deps: Deps, asset: Asset, transaction?: Transaction): Promise<AssetDetail> {
  const [row] = await selectSummaries(deps, { programId: asset.programId, ids: [asset.id], sort: 'tag', dir: 'asc' }, transaction);
  const visits = await deps.sequelize.query<VisitRow>(
    `SELECT v.id, v.stage_id, s.name AS stage, v.entered_at, v.left_at, u.name AS by,
            count(ci.id)::int AS total,
            count(ci.id) FILTER (WHERE ci.state IN ('passed', 'not-applicable'))::int AS done,
            count(ci.id) FILTER (WHERE ci.required_for_gate)::int AS required_total,
            count(ci.id) FILTER (WHERE ci.required_for_gate AND ci.state IN ('passed', 'not-applicable'))::int AS required_done,
            count(ci.id) FILTER (WHERE ci.state = 'deviation')::int AS deviations
       FROM stage_visits v
       JOIN stages s ON s.id = v.stage_id
       LEFT JOIN users u ON u.id = v.entered_by
       LEFT JOIN checklist_items ci ON ci.visit_id = v.id
      WHERE v.asset_id = $1
      GROUP BY v.id, s.name, u.name
      ORDER BY v.entered_at DESC, v.left_at DESC NULLS FIRST`,
    { bind: [asset.id], type: QueryTypes.SELECT, transaction },
  );
  const photos = await Photo.findAll({ where: { assetId: asset.id }, order: [['createdAt', 'DESC'], ['id', 'DESC']], limit: 200, transaction });
  const program = (await Program.findByPk(asset.programId, { transaction }))!;
  return {
    ...toSummary(deps, row),
    buildDate: asset.buildDate,
    notes: asset.notes,
    version: asset.version,
    vinCheck: asset.vin ? checkVin(asset.vin) : null,
    stageHistory: visits.map((v) => ({
      id: v.id,
      stageId: v.stage_id,
      stage: v.stage,
      enteredAt: v.entered_at.toISOString(),
      leftAt: v.left_at ? v.left_at.toISOString() : null,
      by: v.by,
      checklist: progressOf(v),
    })),
    photos: await photoDtos(deps, photos),
    program: { id: program.id, code: program.code, name: program.name },
  };
}

export async function getAsset(deps: Deps, user: SessionUser, id: string) {
  return assetDetail(deps, await visibleAsset(user, id));
}

/** A VIN as the input schema left it: empty means none; a malformed one is refused with the reasons. */
function acceptVin(vin: string | null | undefined): string | null | undefined {
  if (vin === undefined) return undefined;
  if (vin === null || vin === '') return null;
  const check = checkVin(vin);
  if (!check.wellFormed) throw fieldError('vin', check.problems.join(' '));
  return vin;
}

const tagTaken = (tag: string) => fieldError('tag', `Another asset of this program already has the tag ${tag}.`, 'asset/tag-taken', 409);

async function assertTagFree(programId: string, tag: string, exceptId: string | null, transaction: Transaction) {
  const clash = await Asset.findOne({ attributes: ['id'], where: { programId, tag }, transaction });
  if (clash && clash.id !== exceptId) throw tagTaken(tag);
}

/** Two saves racing for one tag: the unique index refuses the second, answered like the check above. */
async function guardTag<T>(tag: string | undefined, work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (err) {
    if (err instanceof UniqueConstraintError && tag && JSON.stringify(err.fields ?? {}).includes('tag')) throw tagTaken(tag);
    throw err;
  }
}

async function stageForMove(programId: string, stageId: string, transaction: Transaction) {
  const stage = await Stage.findByPk(stageId, { transaction });
  if (!stage || stage.programId !== programId) throw fieldError('stageId', "Choose a stage of this asset's program.");
  if (stage.retired) throw fieldError('stageId', `The stage "${stage.name}" is retired; choose another.`, 'stage/retired');
  return stage;
}

/** Opens a stage visit and copies the stage's current checklist template into it, in one statement. */
async function enterStage(deps: Deps, asset: Asset, stage: Stage, actorId: string | null, transaction: Transaction) {
  const visit = await StageVisit.create(
    { programId: asset.programId, assetId: asset.id, stageId: stage.id, enteredBy: actorId },
    { transaction },
  );
  const [, count] = await deps.sequelize.query(
    `INSERT INTO checklist_items (id, program_id, asset_id, visit_id, stage_id, template_item_id, system, title, instructions,
                                  expected_part_number, expected_revision, required_for_gate, hv_qualified, position)
     SELECT gen_random_uuid(), t.program_id, $1, $2, t.stage_id, t.id, t.system, t.title, t.instructions,
            t.expected_part_number, t.expected_revision, t.required_for_gate, t.hv_qualified, t.position
       FROM template_items t WHERE t.stage_id = $3 AND NOT t.retired`,
    { bind: [asset.id, visit.id, stage.id], transaction, type: QueryTypes.INSERT },
  );
  return { visit, items: Number(count ?? 0) };
}

const editable = (a: Asset) => ({
  tag: a.tag,
  kind: a.kind,
  status: a.status,
  location: a.location,
  vin: a.vin,
  odometerKm: a.odometerKm,
  buildDate: a.buildDate,
  notes: a.notes,
});

export async function createAsset(deps: Deps, user: SessionUser, input: CreateAsset) {
  assertMember(user, input.programId, 'This program');
  const vin = acceptVin(input.vin) ?? null;
  return guardTag(input.tag, () => deps.sequelize.transaction(async (transaction) => {
    const stage = await stageForMove(input.programId, input.stageId, transaction);
    await assertTagFree(input.programId, input.tag, null, transaction);
    const asset = await Asset.create(
      {
        programId: input.programId,
        tag: input.tag,
        kind: input.kind,
        stageId: stage.id,
        status: input.status,
        location: input.location,
        vin,
        odometerKm: input.odometerKm,
        buildDate: input.buildDate ?? null,
        notes: input.notes,
        createdBy: user.id,
      },
      { transaction },
    );
    const { items } = await enterStage(deps, asset, stage, user.id, transaction);
    await recordHistory(
      {
        programId: asset.programId,
        entityType: 'asset',
        entityId: asset.id,
        action: 'created',
        actorId: user.id,
        after: { ...editable(asset), stageId: stage.id, stage: stage.name, checklistItems: items },
      },
      transaction,
    );
    return assetDetail(deps, asset, transaction);
  }));
}

export async function updateAsset(deps: Deps, user: SessionUser, id: string, input: UpdateAsset) {
  const vin = acceptVin(input.vin);
  return guardTag(input.tag, () => deps.sequelize.transaction(async (transaction) => {
    const asset = await visibleAsset(user, id, transaction, true);
    if (asset.version !== input.version) throw conflict('Someone else changed this asset first.', await assetDetail(deps, asset, transaction));
    const before = editable(asset);
    if (input.tag !== undefined && input.tag !== asset.tag) {
      await assertTagFree(asset.programId, input.tag, asset.id, transaction);
      asset.tag = input.tag;
    }
    if (input.kind !== undefined) asset.kind = input.kind;
    if (input.status !== undefined) asset.status = input.status;
    if (input.location !== undefined) asset.location = input.location;
    if (vin !== undefined) asset.vin = vin;
    if (input.odometerKm !== undefined) asset.odometerKm = input.odometerKm;
    if (input.buildDate !== undefined) asset.buildDate = input.buildDate;
    if (input.notes !== undefined) asset.notes = input.notes;
    asset.changed('updatedAt', true);
    await asset.save({ transaction });
    await recordHistory(
      { programId: asset.programId, entityType: 'asset', entityId: asset.id, action: 'updated', actorId: user.id, before, after: editable(asset) },
      transaction,
    );
    return assetDetail(deps, asset, transaction);
  }));
}

/** Moves an asset to another stage: closes the open visit (its checklist stays readable) and instantiates the new stage's checklist. */
export async function moveAssetStage(deps: Deps, user: SessionUser, id: string, input: MoveStage) {
  return deps.sequelize.transaction(async (transaction) => {
    const asset = await visibleAsset(user, id, transaction, true);
    if (asset.version !== input.version) throw conflict('Someone else changed this asset first.', await assetDetail(deps, asset, transaction));
    const target = await stageForMove(asset.programId, input.stageId, transaction);
    if (target.id === asset.stageId) throw fieldError('stageId', `The asset is already on the stage "${target.name}".`);
    const from = (await Stage.findByPk(asset.stageId, { transaction }))!;
    await StageVisit.update({ leftAt: new Date() }, { where: { assetId: asset.id, leftAt: null }, transaction });
    const { visit, items } = await enterStage(deps, asset, target, user.id, transaction);
    asset.stageId = target.id;
    asset.changed('updatedAt', true);
    await asset.save({ transaction });
    await recordHistory(
      {
        programId: asset.programId,
        entityType: 'asset',
        entityId: asset.id,
        action: 'stage-moved',
        actorId: user.id,
        before: { stageId: from.id, stage: from.name },
        after: { stageId: target.id, stage: target.name, visitId: visit.id, checklistItems: items },
      },
      transaction,
    );
    return assetDetail(deps, asset, transaction);
  });
}

// ---- History ------------------------------------------------------------------------------

/** The asset's own entries and those of its checklist items, findings and photos. */
export async function assetHistory(deps: Deps, user: SessionUser, id: string): Promise<{ entries: HistoryEntryDto[] }> {
  const asset = await visibleAsset(user, id);
  return historyOf(deps, 'asset', asset.id, {
    programId: asset.programId,
    related: [
      { entityType: 'checklist-item', ids: 'SELECT id::text FROM checklist_items WHERE asset_id = $1::uuid' },
      { entityType: 'finding', ids: 'SELECT id::text FROM findings WHERE asset_id = $1::uuid' },
      { entityType: 'photo', ids: 'SELECT id::text FROM photos WHERE asset_id = $1::uuid' },
    ],
  });
}
