import { QueryTypes, type Transaction } from 'sequelize';
import type { HistoryEntry as HistoryEntryDto } from '../../shared/schemas/assets';
import { HistoryEntry } from '../db/models';
import type { Deps } from '../deps';

/** Appends one entry to the history, in the caller's transaction. */
export async function recordHistory(
  entry: {
    programId: string | null;
    entityType: string;
    entityId: string;
    action: string;
    actorId: string | null;
    before?: object | null;
    after?: object | null;
    note?: string | null;
  },
  transaction: Transaction,
) {
  await HistoryEntry.create(
    {
      programId: entry.programId,
      entityType: entry.entityType,
      entityId: entry.entityId,
      action: entry.action,
      actorId: entry.actorId,
      before: entry.before ?? null,
      after: entry.after ?? null,
      note: entry.note ?? null,
    },
    { transaction },
  );
}

/** The most entries a history answer carries (the newest). */
export const HISTORY_LIMIT = 500;

type HistoryRow = {
  id: number;
  at: Date;
  actor_id: string | null;
  actor_name: string | null;
  action: string;
  entity_type: string;
  entity_id: string;
  before: unknown;
  after: unknown;
  note: string | null;
};

/**
 * The history of one entity in its program, newest first, at most HISTORY_LIMIT entries, with
 * each actor's name. `related` adds the entries of other entities tied to it: `ids` is a SELECT
 * of their ids as text, in which `$1` stands for the entity's id. One SQL statement.
 */
export async function historyOf(
  deps: Pick<Deps, 'sequelize'>,
  entityType: string,
  id: string,
  { programId, related = [] }: { programId: string; related?: ReadonlyArray<{ entityType: string; ids: string }> },
): Promise<{ entries: HistoryEntryDto[] }> {
  const conditions = [
    '(h.entity_type = $3 AND h.entity_id = $1)',
    ...related.map((r, i) => `(h.entity_type = $${i + 4} AND h.entity_id IN (${r.ids}))`),
  ];
  const rows = await deps.sequelize.query<HistoryRow>(
    `SELECT h.id, h.at, h.actor_id, u.name AS actor_name, h.action, h.entity_type, h.entity_id, h.before, h.after, h.note
       FROM history_entries h LEFT JOIN users u ON u.id = h.actor_id
      WHERE h.program_id = $2 AND (${conditions.join(' OR ')})
      ORDER BY h.at DESC, h.id DESC
      LIMIT ${HISTORY_LIMIT}`,
    { bind: [id, programId, entityType, ...related.map((r) => r.entityType)], type: QueryTypes.SELECT },
  );
  return {
    entries: rows.map((r) => ({
      id: String(r.id),
      at: r.at.toISOString(),
      actor: r.actor_id ? { id: r.actor_id, name: r.actor_name ?? '' } : null,
      action: r.action,
      entityType: r.entity_type,
      entityId: r.entity_id,
      before: r.before ?? null,
      after: r.after ?? null,
      note: r.note,
    })),
  };
}
