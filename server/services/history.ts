import type { Transaction } from 'sequelize';
import { HistoryEntry } from '../db/models';

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
