import { QueryTypes } from 'sequelize';
import { ASSIGNMENT_PURPOSE_LABELS, type AssignmentPurpose } from '../../shared/schemas/fleet';
import type { PlannedUse, PlannedUseKind } from '../../shared/schemas/software';
import type { Deps } from '../deps';
import { notFound } from '../lib/app-error';

// What each asset of a program is booked or planned for, and from when: the reflash list says by
// when a flash is needed and keeps only what is needed before a chosen day or test. Read in one
// statement for the whole program, whatever the number of assets.
//
// - drive: an assignment planned or checked out that has not ended; from its start.
// - campaign: a test campaign that has started (or has a start set) and is not complete; from its start.
// - test: a validation test allocation not passed (planned, running or failed, to be run again);
//   running: now; otherwise by the gate target date of the test's stage, when one is set.
// - gate: the gate review of the asset's stage, when its target date is today or later.

type UseRow = {
  asset_id: string;
  kind: PlannedUseKind;
  name: string;
  at: Date | null;
  test_id: string | null;
};

export type AssetUses = Map<string, PlannedUse[]>;

export async function loadPlannedUses(deps: Deps, programId: string, now: Date): Promise<AssetUses> {
  const rows = await deps.sequelize.query<UseRow>(
    `SELECT s.asset_id, 'drive' AS kind, s.purpose::text AS name, s.starts_at AS at, NULL::uuid AS test_id
       FROM assignments s
      WHERE s.program_id = $1 AND s.status IN ('planned', 'checked-out') AND s.ends_at > $2
     UNION ALL
     SELECT c.asset_id, 'campaign', c.name, c.started_at, NULL
       FROM campaigns c
      WHERE c.program_id = $1 AND c.started_at IS NOT NULL
        AND EXISTS (SELECT 1 FROM campaign_steps cs
                     WHERE cs.campaign_id = c.id
                       AND CASE WHEN c.kind = 'climate' THEN cs.done_hours < coalesce(cs.duration_hours, 0)
                                ELSE cs.done_km < coalesce(cs.distance_km, 0) END)
     UNION ALL
     SELECT ta.asset_id, 'test', vt.name,
            CASE WHEN ta.status = 'running' THEN $2::timestamptz ELSE (g.target_date::timestamp AT TIME ZONE 'UTC') END,
            vt.id
       FROM test_allocations ta
       JOIN validation_tests vt ON vt.id = ta.test_id
       LEFT JOIN gate_target_dates g ON g.stage_id = vt.stage_id
      WHERE ta.program_id = $1 AND ta.status <> 'passed'
     UNION ALL
     SELECT a.id, 'gate', st.name, (g.target_date::timestamp AT TIME ZONE 'UTC'), NULL
       FROM assets a
       JOIN stages st ON st.id = a.stage_id
       JOIN gate_target_dates g ON g.stage_id = a.stage_id
      WHERE a.program_id = $1 AND a.status <> 'retired' AND g.target_date >= ($2::timestamptz AT TIME ZONE 'UTC')::date`,
    { bind: [programId, now], type: QueryTypes.SELECT },
  );
  const uses: AssetUses = new Map();
  for (const r of rows) {
    const at = r.at ? new Date(r.at) : null;
    const use: PlannedUse = {
      kind: r.kind,
      name: r.name,
      at: at ? at.toISOString() : null,
      underWay: r.kind !== 'gate' && at !== null && at.getTime() <= now.getTime(),
      testId: r.test_id,
    };
    const list = uses.get(r.asset_id);
    if (list) list.push(use);
    else uses.set(r.asset_id, [use]);
  }
  return uses;
}

/** The first instant after the chosen day (UTC): a use starting before it is needed by then. */
export function endOfDay(day: string): Date {
  const start = new Date(`${day}T00:00:00.000Z`);
  return new Date(start.getTime() + 24 * 3600_000);
}

/**
 * The use an asset's flash is needed for under the filter, or null when the asset does not pass
 * it. Without a filter every asset passes (with its earliest dated use, if any).
 */
export function neededFor(
  uses: readonly PlannedUse[] | undefined,
  filter: { before?: Date; testId?: string },
): { pass: boolean; use: PlannedUse | null } {
  let candidates = uses ?? [];
  if (filter.testId) candidates = candidates.filter((u) => u.kind === 'test' && u.testId === filter.testId);
  if (filter.before) {
    const cutoff = filter.before.getTime();
    candidates = candidates.filter((u) => u.at !== null && new Date(u.at).getTime() < cutoff);
  }
  const pass = (!filter.testId && !filter.before) || candidates.length > 0;
  const earliest = [...candidates].sort(byStart)[0] ?? null;
  return { pass, use: earliest };
}

/** Earliest first; undated last; then by kind and name, so the choice is stable. */
export function byStart(a: PlannedUse, b: PlannedUse): number {
  if (a.at !== b.at) {
    if (a.at === null) return 1;
    if (b.at === null) return -1;
    return a.at < b.at ? -1 : 1;
  }
  return a.kind.localeCompare(b.kind) || a.name.localeCompare(b.name);
}

/** The validation test of a filter, when it belongs to the program; otherwise 404. */
export async function testOfProgram(deps: Deps, programId: string, testId: string) {
  const [test] = await deps.sequelize.query<{ id: string; name: string; stage_id: string; stage: string }>(
    `SELECT vt.id, vt.name, vt.stage_id, s.name AS stage
       FROM validation_tests vt JOIN stages s ON s.id = vt.stage_id
      WHERE vt.id = $1 AND vt.program_id = $2`,
    { bind: [testId, programId], type: QueryTypes.SELECT },
  );
  if (!test) throw notFound('This validation test');
  return { id: test.id, name: test.name, stageId: test.stage_id, stage: test.stage };
}

/** One line for the CSV: what the flash is needed for. */
export function useSentence(use: PlannedUse | null): string {
  if (!use) return '';
  const since = use.underWay ? ' (under way)' : '';
  switch (use.kind) {
    case 'drive':
      return `Drive: ${ASSIGNMENT_PURPOSE_LABELS[use.name as AssignmentPurpose] ?? use.name}${since}`;
    case 'campaign':
      return `Campaign: ${use.name}${since}`;
    case 'test':
      return `Validation test: ${use.name}${since}${use.at ? '' : ' (no date set)'}`;
    case 'gate':
      return `Gate review: ${use.name}`;
  }
}
