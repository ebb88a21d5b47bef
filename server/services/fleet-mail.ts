import { QueryTypes, type Transaction } from 'sequelize';
import { formatUtc } from '../../shared/domain/fleet';
import { ASSIGNMENT_PURPOSE_LABELS, ROAD_USE_CAUTION, type Assignment } from '../../shared/schemas/fleet';
import type { Deps } from '../deps';
import type { SessionUser } from '../middleware/auth';
import { recordHistory } from './history';
import { enqueueMail } from './outbox';

/** Outbox kinds of the fleet e-mails. */
export const FLEET_MAIL_KINDS = {
  created: 'assignment-created',
  changed: 'assignment-changed',
  cancelled: 'assignment-cancelled',
  unassigned: 'assignment-unassigned',
  overdue: 'assignment-overdue',
} as const;

/**
 * Fleet e-mails (a booking for me, its changes, an overdue return) go out unless the user turned
 * "Vehicle bookings" off on the home screen's e-mail card (`fleet: false` in email_prefs).
 */
export const wantsFleetMail = (prefs: Record<string, unknown> | null | undefined) => prefs?.fleet !== false;

export const assignmentUrl = (deps: Deps, id: string) => `${deps.config.publicUrl}/fleet/assignments/${id}`;

type Person = { id: string; name: string; email: string; email_prefs: Record<string, unknown> | null };

async function person(deps: Deps, id: string, transaction: Transaction): Promise<Person | null> {
  const [row] = await deps.sequelize.query<Person & { active: boolean }>(
    `SELECT id, name, email, email_prefs, active FROM users WHERE id = $1`,
    { bind: [id], type: QueryTypes.SELECT, transaction },
  );
  return row && row.active ? row : null;
}

async function programCode(deps: Deps, programId: string, transaction: Transaction) {
  const [row] = await deps.sequelize.query<{ code: string }>(`SELECT code FROM programs WHERE id = $1`, {
    bind: [programId],
    type: QueryTypes.SELECT,
    transaction,
  });
  return row?.code ?? 'Proofyard';
}

function summary(a: Assignment): string[] {
  return [
    `Vehicle: ${a.assetTag} (${a.vehicle.stage})`,
    `From: ${formatUtc(a.startsAt)}`,
    `To: ${formatUtc(a.endsAt)}`,
    `Purpose: ${ASSIGNMENT_PURPOSE_LABELS[a.purpose]}`,
    ...(a.notes ? [`Notes: ${a.notes}`] : []),
    ...(!a.vehicle.cleared ? ['', `Caution: ${a.assetTag} is not cleared (${a.vehicle.notClearedReason}). Do not drive it until it is.`] : []),
  ];
}

const FOOTER = ['', ROAD_USE_CAUTION];

export type DriverMail = 'created' | 'changed' | 'cancelled' | 'unassigned';

/**
 * To the assignment's driver (or `to`, for the driver taken off it), in the caller's transaction.
 * Nothing goes to the person who made the change: they know.
 */
export async function notifyDriver(
  deps: Deps,
  kind: DriverMail,
  a: Assignment,
  actor: SessionUser,
  transaction: Transaction,
  options: { to?: string; changes?: string[]; reason?: string | null } = {},
) {
  const toId = options.to ?? a.driver.id;
  if (toId === actor.id) return;
  const driver = await person(deps, toId, transaction);
  if (!driver || !wantsFleetMail(driver.email_prefs)) return;
  const code = await programCode(deps, a.programId, transaction);
  const window = `${a.assetTag}, ${formatUtc(a.startsAt)}`;
  const subject = {
    created: `[${code}] Vehicle assigned to you: ${window}`,
    changed: `[${code}] Your assignment changed: ${window}`,
    cancelled: `[${code}] Assignment cancelled: ${window}`,
    unassigned: `[${code}] Assignment moved to another driver: ${window}`,
  }[kind];
  const opening = {
    created: `${actor.name} assigned a vehicle to you:`,
    changed: `${actor.name} changed your assignment:`,
    cancelled: `${actor.name} cancelled your assignment:`,
    unassigned: `${actor.name} gave this assignment to ${a.driver.name}; you no longer have it:`,
  }[kind];
  await enqueueMail(
    {
      to: driver.email,
      kind: FLEET_MAIL_KINDS[kind],
      subject: subject.slice(0, 300),
      text: [
        `Hello ${driver.name},`,
        '',
        opening,
        '',
        ...summary(a),
        ...(options.changes?.length ? ['', 'What changed:', ...options.changes.map((c) => `- ${c}`)] : []),
        ...(options.reason ? ['', `Reason: ${options.reason}`] : []),
        '',
        `Open it: ${assignmentUrl(deps, a.id)}`,
        ...(kind === 'created' || kind === 'changed' ? FOOTER : []),
      ].join('\n'),
    },
    transaction,
  );
}

// ---- Overdue returns ----------------------------------------------------------------------

type OverdueRow = {
  id: string;
  program_id: string;
  code: string;
  tag: string;
  driver_name: string;
  driver_email: string;
  ends_at: Date;
};

/**
 * E-mails each program's coordinators (its leads when it has no coordinator) once about every
 * assignment checked out and past its end without a check-in, then marks it notified (a changed
 * end clears the mark, so a new end that passes is reported again). Runs in `transaction` when
 * given: the job loop passes its own, so the mail, the marks and the schedule commit together.
 */
export async function runOverdueReturns(
  deps: Deps,
  asOf: Date,
  options: { programIds?: string[]; transaction?: Transaction } = {},
): Promise<{ assignments: number; recipients: number }> {
  const run = async (transaction: Transaction) => {
    const bind: unknown[] = [asOf];
    const scope = options.programIds ? `AND a.program_id = ANY($${bind.push(options.programIds)}::uuid[])` : '';
    const rows = await deps.sequelize.query<OverdueRow>(
      `SELECT a.id, a.program_id, p.code, v.tag, d.name AS driver_name, d.email AS driver_email, a.ends_at
         FROM assignments a
         JOIN programs p ON p.id = a.program_id
         JOIN assets v ON v.id = a.asset_id
         JOIN users d ON d.id = a.driver_id
        WHERE a.status = 'checked-out' AND a.ends_at <= $1 AND a.overdue_notified_at IS NULL ${scope}
        ORDER BY p.code, a.ends_at, a.id
        FOR UPDATE OF a SKIP LOCKED`,
      { bind, type: QueryTypes.SELECT, transaction },
    );
    if (!rows.length) return { assignments: 0, recipients: 0 };
    const programIds = [...new Set(rows.map((r) => r.program_id))];
    const people = await deps.sequelize.query<Person & { role: string; program_id: string }>(
      `SELECT u.id, u.name, u.email, u.email_prefs, u.role, pm.program_id
         FROM users u JOIN program_members pm ON pm.user_id = u.id
        WHERE u.active AND pm.program_id = ANY($1::uuid[]) AND u.role IN ('coordinator', 'lead')
        ORDER BY u.name, u.id`,
      { bind: [programIds], type: QueryTypes.SELECT, transaction },
    );
    let recipients = 0;
    for (const programId of programIds) {
      const overdue = rows.filter((r) => r.program_id === programId);
      const staff = people.filter((p) => p.program_id === programId);
      const coordinators = staff.filter((p) => p.role === 'coordinator');
      const to = (coordinators.length ? coordinators : staff).filter((p) => wantsFleetMail(p.email_prefs));
      const code = overdue[0].code;
      const lines = overdue.flatMap((r) => {
        const hours = Math.max(0, Math.round((asOf.getTime() - r.ends_at.getTime()) / 3600_000));
        return [
          `- ${r.tag} with ${r.driver_name} (${r.driver_email}): due back ${formatUtc(r.ends_at)}, ${hours} h ago`,
          `  ${assignmentUrl(deps, r.id)}`,
        ];
      });
      for (const p of to) {
        await enqueueMail(
          {
            to: p.email,
            kind: FLEET_MAIL_KINDS.overdue,
            subject: `[${code}] ${overdue.length} vehicle${overdue.length === 1 ? '' : 's'} not returned on time`,
            text: [
              `Hello ${p.name},`,
              '',
              `${overdue.length === 1 ? 'This vehicle was' : 'These vehicles were'} checked out and not checked in by the end of ${overdue.length === 1 ? 'its' : 'their'} window:`,
              '',
              ...lines,
              '',
              'Proofyard reports each overdue return once.',
            ].join('\n'),
          },
          transaction,
        );
        recipients += 1;
      }
      for (const r of overdue) {
        await recordHistory(
          { programId, entityType: 'assignment', entityId: r.id, action: 'overdue-reported', actorId: null, after: { endsAt: r.ends_at.toISOString(), notified: to.map((p) => p.email) } },
          transaction,
        );
      }
    }
    await deps.sequelize.query(`UPDATE assignments SET overdue_notified_at = $2 WHERE id = ANY($1::uuid[])`, {
      bind: [rows.map((r) => r.id), asOf],
      transaction,
    });
    return { assignments: rows.length, recipients };
  };
  return options.transaction ? run(options.transaction) : deps.sequelize.transaction(run);
}
