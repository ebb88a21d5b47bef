import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { z } from 'zod';
import {
  checkDetailEdit,
  checkTransition,
  isClosedStatus,
  isOverdue,
  isPastDueDate,
  utcDate,
  type RuleResult,
} from '../../shared/domain/finding-workflow';
import type { System } from '../../shared/schemas/assets';
import {
  CLOSED_FINDING_STATUSES,
  FINDING_SEVERITIES,
  FINDING_SORTS,
  type CreateFindingSchema,
  type Finding as FindingDto,
  type FindingCounts,
  type FindingList,
  type FindingListQuerySchema,
  type FindingSeverity,
  type FindingStatus,
  type Person,
  type UpdateFindingSchema,
} from '../../shared/schemas/findings';
import { Asset, ChecklistItem, Finding, FindingWatcher, Photo, User } from '../db/models';
import type { Deps } from '../deps';
import { AppError, conflict, fieldError, notFound } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { notifyAssigned, notifyStatusChange } from './finding-mail';
import { recordHistory } from './history';
import { toPhotoDto } from './photos';

type ListQuery = z.output<typeof FindingListQuerySchema>;
type CreateFinding = z.output<typeof CreateFindingSchema>;
type UpdateFinding = z.output<typeof UpdateFindingSchema>;
type Sort = (typeof FINDING_SORTS)[number];

const CLOSED_SQL = CLOSED_FINDING_STATUSES.map((s) => `'${s}'`).join(', ');

// ---- Reading ------------------------------------------------------------------------------

type Row = {
  id: string;
  program_id: string;
  asset_id: string | null;
  asset_tag: string | null;
  checklist_item_id: string | null;
  title: string;
  description: string;
  system: System | null;
  severity: FindingSeverity;
  status: FindingStatus;
  reject_reason: string | null;
  owner_id: string | null;
  owner_name: string | null;
  due_date: string | null;
  created_by: string | null;
  created_by_name: string | null;
  created_at: Date;
  updated_at: Date;
  version: number;
  comment_count: number;
};

/** Rows with their asset tag, people and comment count, in the order of `ids`. */
async function loadRows(deps: Deps, ids: string[], transaction?: Transaction): Promise<Row[]> {
  if (!ids.length) return [];
  const rows = await deps.sequelize.query<Row>(
    `SELECT f.id, f.program_id, f.asset_id, a.tag AS asset_tag, f.checklist_item_id, f.title, f.description, f.system,
            f.severity, f.status, f.reject_reason, f.owner_id, o.name AS owner_name, f.due_date::text AS due_date,
            f.created_by, c.name AS created_by_name, f.created_at, f.updated_at, f.version,
            (SELECT count(*)::int FROM finding_comments fc WHERE fc.finding_id = f.id) AS comment_count
       FROM findings f
       LEFT JOIN assets a ON a.id = f.asset_id
       LEFT JOIN users o ON o.id = f.owner_id
       LEFT JOIN users c ON c.id = f.created_by
      WHERE f.id = ANY($1::uuid[])`,
    { bind: [ids], type: QueryTypes.SELECT, transaction },
  );
  const byId = new Map(rows.map((r) => [r.id, r]));
  return ids.map((id) => byId.get(id)).filter((r): r is Row => !!r);
}

export async function peopleByIds(ids: Array<string | null | undefined>, transaction?: Transaction): Promise<Map<string, Person>> {
  const unique = [...new Set(ids.filter((v): v is string => !!v))];
  if (!unique.length) return new Map();
  const users = await User.findAll({ attributes: ['id', 'name'], where: { id: unique }, transaction });
  return new Map(users.map((u) => [u.id, { id: u.id, name: u.name }]));
}

/** The API shape of findings, with watchers and photos, each set read in one query. */
export async function findingDtos(deps: Deps, ids: string[], transaction?: Transaction, asOf = new Date()): Promise<FindingDto[]> {
  const rows = await loadRows(deps, ids, transaction);
  if (!rows.length) return [];
  const pageIds = rows.map((r) => r.id);
  const watchers = await deps.sequelize.query<{ finding_id: string; id: string; name: string }>(
    `SELECT w.finding_id, u.id, u.name FROM finding_watchers w JOIN users u ON u.id = w.user_id
      WHERE w.finding_id = ANY($1::uuid[]) ORDER BY u.name, u.id`,
    { bind: [pageIds], type: QueryTypes.SELECT, transaction },
  );
  const photos = await Photo.findAll({ where: { findingId: pageIds }, order: [['createdAt', 'ASC'], ['id', 'ASC']], transaction });
  const uploaders = await peopleByIds(photos.map((p) => p.createdBy), transaction);
  return rows.map((r) => ({
    id: r.id,
    programId: r.program_id,
    assetId: r.asset_id,
    assetTag: r.asset_tag,
    checklistItemId: r.checklist_item_id,
    title: r.title,
    description: r.description,
    system: r.system,
    severity: r.severity,
    status: r.status,
    rejectReason: r.reject_reason,
    owner: r.owner_id ? { id: r.owner_id, name: r.owner_name ?? '' } : null,
    watchers: watchers.filter((w) => w.finding_id === r.id).map((w) => ({ id: w.id, name: w.name })),
    dueDate: r.due_date,
    overdue: isOverdue({ dueDate: r.due_date, status: r.status }, asOf),
    blocksDriving: r.severity === 'safety' && !isClosedStatus(r.status),
    photos: photos
      .filter((p) => p.findingId === r.id)
      .map((p) => toPhotoDto(deps, p, p.createdBy ? (uploaders.get(p.createdBy)?.name ?? null) : null)),
    commentCount: r.comment_count,
    createdBy: r.created_by ? { id: r.created_by, name: r.created_by_name ?? '' } : null,
    createdAt: r.created_at.toISOString(),
    updatedAt: r.updated_at.toISOString(),
    version: r.version,
  }));
}

/** The finding when the user belongs to its program; otherwise 404, never 403. */
export async function visibleFinding(user: SessionUser, id: string, transaction?: Transaction, lock = false): Promise<Finding> {
  const finding = await Finding.findByPk(id, { transaction, ...(lock && transaction ? { lock: transaction.LOCK.UPDATE } : {}) });
  if (!finding || !user.programIds.includes(finding.programId)) throw notFound('This finding');
  return finding;
}

export async function getFinding(deps: Deps, user: SessionUser, id: string): Promise<FindingDto> {
  const finding = await visibleFinding(user, id);
  return (await findingDtos(deps, [finding.id]))[0];
}

// ---- The list -----------------------------------------------------------------------------

/** Sort keys: findings without a due date come last in either direction ('infinity' / '-infinity'). */
function sortKey(sort: Sort, dir: 'asc' | 'desc'): { sql: string; cast: string } {
  if (sort === 'due') return { sql: `coalesce(f.due_date, '${dir === 'asc' ? 'infinity' : '-infinity'}'::date)`, cast: 'date' };
  if (sort === 'age') return { sql: 'f.created_at', cast: 'timestamptz' };
  return { sql: 'f.updated_at', cast: 'timestamptz' };
}

const CursorSchema = z.object({ s: z.enum(FINDING_SORTS), d: z.enum(['asc', 'desc']), k: z.string().max(60), id: z.uuid() });
type Cursor = z.infer<typeof CursorSchema>;

function decodeCursor(raw: string, sort: Sort, dir: 'asc' | 'desc'): Cursor {
  let parsed: Cursor;
  try {
    parsed = CursorSchema.parse(JSON.parse(Buffer.from(raw, 'base64url').toString('utf8')));
  } catch {
    throw fieldError('cursor', 'This page link is not valid. Start again from the first page.');
  }
  if (parsed.s !== sort || parsed.d !== dir) {
    throw fieldError('cursor', 'This page link belongs to another sort order. Start again from the first page.');
  }
  return parsed;
}

/** WHERE clauses of the list; `withSeverity` false for the per-severity counts. */
function listFilters(user: SessionUser, q: ListQuery, asOf: Date, bind: unknown[], withSeverity: boolean): string[] {
  const p = (value: unknown) => `$${bind.push(value)}`;
  const where = [`f.program_id = ${p(q.programId)}`];
  if (q.assetId) where.push(`f.asset_id = ${p(q.assetId)}`);
  if (q.mine === 'owner') where.push(`f.owner_id = ${p(user.id)}`);
  if (q.mine === 'created') where.push(`f.created_by = ${p(user.id)}`);
  if (q.mine === 'watching') where.push(`EXISTS (SELECT 1 FROM finding_watchers w WHERE w.finding_id = f.id AND w.user_id = ${p(user.id)})`);
  if (withSeverity && q.severity) where.push(`f.severity = ${p(q.severity)}`);
  if (q.status === 'active') where.push(`f.status NOT IN (${CLOSED_SQL})`);
  else if (q.status) where.push(`f.status = ${p(q.status)}`);
  if (q.system) where.push(`f.system = ${p(q.system)}`);
  if (q.ownerId === 'none') where.push('f.owner_id IS NULL');
  else if (q.ownerId) where.push(`f.owner_id = ${p(q.ownerId)}`);
  if (q.overdue !== undefined) {
    const today = p(utcDate(asOf));
    const late = `coalesce(f.due_date, 'infinity'::date) < ${today}::date AND f.status NOT IN (${CLOSED_SQL})`;
    where.push(q.overdue ? `(${late})` : `NOT (${late})`);
  }
  return where;
}

export async function listFindings(deps: Deps, user: SessionUser, q: ListQuery, asOf = new Date()): Promise<FindingList> {
  if (!user.programIds.includes(q.programId)) throw notFound('This program');
  const key = sortKey(q.sort, q.dir);
  const dir = q.dir === 'desc' ? 'DESC' : 'ASC';
  const bind: unknown[] = [];
  const where = listFilters(user, q, asOf, bind, true);
  if (q.cursor) {
    const c = decodeCursor(q.cursor, q.sort, q.dir);
    where.push(`(${key.sql}, f.id) ${dir === 'ASC' ? '>' : '<'} ($${bind.push(c.k)}::${key.cast}, $${bind.push(c.id)}::uuid)`);
  }
  const page = await deps.sequelize.query<{ id: string; k: string }>(
    `SELECT f.id, (${key.sql})::text AS k FROM findings f
      WHERE ${where.join(' AND ')}
      ORDER BY ${key.sql} ${dir}, f.id ${dir}
      LIMIT $${bind.push(q.limit + 1)}`,
    { bind, type: QueryTypes.SELECT },
  );
  const more = page.length > q.limit;
  const rows = more ? page.slice(0, q.limit) : page;
  const last = rows[rows.length - 1];
  const nextCursor =
    more && last ? Buffer.from(JSON.stringify({ s: q.sort, d: q.dir, k: last.k, id: last.id })).toString('base64url') : null;

  const countBind: unknown[] = [];
  const countWhere = listFilters(user, q, asOf, countBind, false);
  const countRows = await deps.sequelize.query<{ severity: FindingSeverity; n: number }>(
    `SELECT f.severity, count(*)::int AS n FROM findings f
      WHERE ${countWhere.join(' AND ')} AND f.status NOT IN (${CLOSED_SQL})
      GROUP BY f.severity`,
    { bind: countBind, type: QueryTypes.SELECT },
  );
  const counts = Object.fromEntries(FINDING_SEVERITIES.map((s) => [s, countRows.find((r) => r.severity === s)?.n ?? 0])) as FindingCounts;
  return { items: await findingDtos(deps, rows.map((r) => r.id), undefined, asOf), nextCursor, counts };
}

// ---- Writing ------------------------------------------------------------------------------

/** Refuses an owner or watchers who are not active members of the program. Admins own no findings. */
async function assertPeople(
  deps: Deps,
  programId: string,
  people: { ownerId?: string | null; watcherIds?: string[] },
  transaction?: Transaction,
) {
  const ids = [...(people.ownerId ? [people.ownerId] : []), ...(people.watcherIds ?? [])];
  if (!ids.length) return;
  const rows = await deps.sequelize.query<{ id: string; role: string }>(
    `SELECT u.id, u.role FROM users u JOIN program_members pm ON pm.user_id = u.id AND pm.program_id = $1
      WHERE u.id = ANY($2::uuid[]) AND u.active`,
    { bind: [programId, ids], type: QueryTypes.SELECT, transaction },
  );
  const ok = new Map(rows.map((r) => [r.id, r.role]));
  if (people.ownerId && (!ok.has(people.ownerId) || ok.get(people.ownerId) === 'admin')) {
    throw fieldError('ownerId', 'Choose an owner who works in this program.');
  }
  if ((people.watcherIds ?? []).some((id) => !ok.has(id))) {
    throw fieldError('watcherIds', 'Choose watchers who belong to this program.');
  }
}

const pastDueDate = () => fieldError('dueDate', 'Choose today or a later date.');

/** What the history keeps of a finding. */
function snapshot(f: Finding, people: Map<string, Person>, watcherIds: string[]) {
  return {
    title: f.title,
    description: f.description,
    system: f.system,
    severity: f.severity,
    status: f.status,
    rejectReason: f.rejectReason ?? null,
    owner: f.ownerId ? (people.get(f.ownerId) ?? { id: f.ownerId, name: '' }) : null,
    watchers: watcherIds.map((id) => people.get(id) ?? { id, name: '' }),
    dueDate: f.dueDate ?? null,
    assetId: f.assetId,
    checklistItemId: f.checklistItemId,
  };
}
type Snapshot = ReturnType<typeof snapshot>;

function refuse(result: RuleResult): never {
  if (result.ok) throw new Error('refuse() called with an allowed result');
  if (result.field) throw fieldError(result.field, result.message, result.code, result.status);
  throw new AppError(result.status, result.code, result.message);
}

export async function createFinding(
  deps: Deps,
  user: SessionUser,
  input: CreateFinding,
  idempotencyKey: string | null = null,
  asOf = new Date(),
): Promise<FindingDto> {
  const asset = await Asset.findByPk(input.assetId);
  if (!asset || !user.programIds.includes(asset.programId)) throw notFound('This asset');
  if (input.dueDate && isPastDueDate(input.dueDate, asOf)) throw pastDueDate();
  let system = input.system ?? null;
  if (input.checklistItemId) {
    const item = await ChecklistItem.findByPk(input.checklistItemId);
    if (!item || item.assetId !== asset.id) throw fieldError('checklistItemId', 'This checklist item is not on this asset.');
    system ??= item.system;
  }
  const ownerId = input.ownerId ?? null;
  const watcherIds = input.watcherIds ?? [];
  await assertPeople(deps, asset.programId, { ownerId, watcherIds });
  try {
    return await deps.sequelize.transaction(async (transaction) => {
      const finding = await Finding.create(
        {
          programId: asset.programId,
          assetId: asset.id,
          checklistItemId: input.checklistItemId ?? null,
          title: input.title,
          description: input.description ?? '',
          system,
          severity: input.severity,
          ownerId,
          dueDate: input.dueDate ?? null,
          createdBy: user.id,
          idempotencyKey,
        },
        { transaction },
      );
      if (watcherIds.length) {
        await FindingWatcher.bulkCreate(watcherIds.map((userId) => ({ findingId: finding.id, userId })), { transaction });
      }
      const people = await peopleByIds([ownerId, ...watcherIds], transaction);
      await recordHistory(
        {
          programId: finding.programId,
          entityType: 'finding',
          entityId: finding.id,
          action: 'created',
          actorId: user.id,
          after: { ...snapshot(finding, people, watcherIds), assetTag: asset.tag },
        },
        transaction,
      );
      const dto = (await findingDtos(deps, [finding.id], transaction, asOf))[0];
      if (ownerId && ownerId !== user.id) await notifyAssigned(deps, dto, user, transaction);
      return dto;
    });
  } catch (err) {
    // A retry that slipped past the idempotency table (its first answer was never stored): the first finding stands.
    if (err instanceof UniqueConstraintError && idempotencyKey) {
      const existing = await Finding.findOne({ where: { createdBy: user.id, idempotencyKey } });
      if (existing) return (await findingDtos(deps, [existing.id], undefined, asOf))[0];
    }
    throw err;
  }
}

const DETAIL_FIELDS = ['title', 'description', 'system', 'severity', 'ownerId', 'dueDate'] as const;

/**
 * Applies `{ version, ...changes }` under a row lock: a stale version answers 409 with the
 * current finding; the role rules of shared/domain/finding-workflow decide the rest. One
 * history entry holds the changed fields before and after; e-mail goes to the new owner and,
 * on a status change, to the owner and watchers (never to the person who made the change).
 */
export async function updateFinding(deps: Deps, user: SessionUser, id: string, input: UpdateFinding, asOf = new Date()): Promise<FindingDto> {
  return deps.sequelize.transaction(async (transaction) => {
    const finding = await visibleFinding(user, id, transaction, true);
    if (finding.version !== input.version) {
      throw conflict('Someone else changed this finding first.', (await findingDtos(deps, [finding.id], transaction, asOf))[0]);
    }
    const watchersBefore = (await FindingWatcher.findAll({ where: { findingId: finding.id }, transaction })).map((w) => w.userId);
    const watchersAfter = input.watcherIds ?? watchersBefore;
    const watchersAdded = watchersAfter.filter((w) => !watchersBefore.includes(w));
    const watchersRemoved = watchersBefore.filter((w) => !watchersAfter.includes(w));
    const changed = DETAIL_FIELDS.filter((k) => input[k] !== undefined && (input[k] ?? null) !== (finding[k] ?? null));
    const statusTo = input.status !== undefined && input.status !== finding.status ? input.status : undefined;

    const state = { status: finding.status, severity: finding.severity, ownerId: finding.ownerId ?? null, createdBy: finding.createdBy };
    const actor = { id: user.id, role: user.role };
    const edit = checkDetailEdit(
      state,
      { fields: changed, severity: changed.includes('severity') ? input.severity : undefined, watchersAdded, watchersRemoved },
      actor,
    );
    if (!edit.ok) refuse(edit);
    if (statusTo) {
      const move = checkTransition(state, statusTo, actor);
      if (!move.ok) refuse(move);
      if (move.reasonRequired && !input.reason) {
        throw fieldError('reason', statusTo === 'rejected' ? 'Say why the finding is rejected.' : 'Say why the finding is reopened.');
      }
    }
    if (changed.includes('dueDate') && input.dueDate && isPastDueDate(input.dueDate, asOf)) throw pastDueDate();
    await assertPeople(
      deps,
      finding.programId,
      { ownerId: changed.includes('ownerId') ? input.ownerId : null, watcherIds: watchersAdded },
      transaction,
    );
    if (!changed.length && !statusTo && !watchersAdded.length && !watchersRemoved.length) {
      return (await findingDtos(deps, [finding.id], transaction, asOf))[0];
    }

    const people = await peopleByIds([finding.ownerId, input.ownerId, ...watchersBefore, ...watchersAfter], transaction);
    const before = snapshot(finding, people, watchersBefore);
    const statusFrom = finding.status;
    const ownerFrom = finding.ownerId ?? null;
    if (input.title !== undefined) finding.title = input.title;
    if (input.description !== undefined) finding.description = input.description;
    if (input.system !== undefined) finding.system = input.system;
    if (input.severity !== undefined) finding.severity = input.severity;
    if (input.ownerId !== undefined) finding.ownerId = input.ownerId;
    if (input.dueDate !== undefined) finding.dueDate = input.dueDate;
    if (statusTo) {
      finding.status = statusTo;
      finding.rejectReason = statusTo === 'rejected' ? (input.reason ?? null) : null;
    }
    // Watchers live in their own table; the finding's version still moves with them.
    finding.changed('updatedAt', true);
    await finding.save({ transaction });
    if (watchersRemoved.length) await FindingWatcher.destroy({ where: { findingId: finding.id, userId: watchersRemoved }, transaction });
    if (watchersAdded.length) {
      await FindingWatcher.bulkCreate(watchersAdded.map((userId) => ({ findingId: finding.id, userId })), { transaction });
    }
    const after = snapshot(finding, people, watchersAfter);
    const keys = (Object.keys(after) as Array<keyof Snapshot>).filter((k) => JSON.stringify(before[k]) !== JSON.stringify(after[k]));
    await recordHistory(
      {
        programId: finding.programId,
        entityType: 'finding',
        entityId: finding.id,
        action: statusTo ? 'status-changed' : 'updated',
        actorId: user.id,
        before: Object.fromEntries(keys.map((k) => [k, before[k]])),
        after: Object.fromEntries(keys.map((k) => [k, after[k]])),
        note: input.reason ?? null,
      },
      transaction,
    );
    const dto = (await findingDtos(deps, [finding.id], transaction, asOf))[0];
    const newOwner = finding.ownerId ?? null;
    if (newOwner && newOwner !== ownerFrom && newOwner !== user.id) await notifyAssigned(deps, dto, user, transaction);
    if (statusTo) await notifyStatusChange(deps, dto, statusFrom, user, input.reason ?? null, transaction);
    return dto;
  });
}
