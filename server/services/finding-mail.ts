import { QueryTypes, type Transaction } from 'sequelize';
import { utcDate } from '../../shared/domain/finding-workflow';
import {
  CLOSED_FINDING_STATUSES,
  EMAIL_KINDS,
  FINDING_SEVERITY_LABELS,
  FINDING_STATUS_LABELS,
  type EmailKind,
  type EmailPrefs,
  type Finding as FindingDto,
  type FindingSeverity,
  type FindingStatus,
} from '../../shared/schemas/findings';
import { Program } from '../db/models';
import type { Deps } from '../deps';
import type { SessionUser } from '../middleware/auth';
import { recordHistory } from './history';
import { enqueueMail } from './outbox';

/** Outbox kinds of the finding e-mails, by preference kind (the `fleet` kind is fleet-mail.ts's). */
export const MAIL_KINDS: Record<Exclude<EmailKind, 'fleet'>, string> = {
  assigned: 'finding-assigned',
  status: 'finding-status',
  digest: 'finding-digest',
};

const SAFETY_CAUTION =
  'Safety finding: the asset is not cleared. Do not drive or power it until the finding is resolved, and follow your site’s safety procedures.';

type Recipient = { id: string; name: string; email: string; email_prefs: Record<string, unknown> | null };

/** A kind is on unless the user turned it off. */
export const wants = (prefs: Record<string, unknown> | null | undefined, kind: EmailKind) => prefs?.[kind] !== false;

export const findingUrl = (deps: Deps, id: string) => `${deps.config.publicUrl}/findings/${id}`;

/** Active users among `ids` who still belong to the program. */
async function recipients(deps: Deps, programId: string, ids: string[], transaction?: Transaction): Promise<Recipient[]> {
  if (!ids.length) return [];
  return deps.sequelize.query<Recipient>(
    `SELECT u.id, u.name, u.email, u.email_prefs FROM users u
       JOIN program_members pm ON pm.user_id = u.id AND pm.program_id = $1
      WHERE u.id = ANY($2::uuid[]) AND u.active
      ORDER BY u.name`,
    { bind: [programId, [...new Set(ids)]], type: QueryTypes.SELECT, transaction },
  );
}

function summaryLines(f: FindingDto): string[] {
  return [
    f.title,
    `Asset: ${f.assetTag ?? 'none'} · Severity: ${FINDING_SEVERITY_LABELS[f.severity]} · Status: ${FINDING_STATUS_LABELS[f.status]}`,
    `Owner: ${f.owner?.name ?? 'nobody yet'} · Due: ${f.dueDate ?? 'no date'}`,
    ...(f.blocksDriving ? ['', SAFETY_CAUTION] : []),
  ];
}

const footer = (why: string) => [
  '',
  `You get this e-mail because ${why}. You can turn these e-mails off in Proofyard under your e-mail settings.`,
];

async function programCode(programId: string, transaction?: Transaction) {
  return (await Program.findByPk(programId, { attributes: ['code'], transaction }))?.code ?? 'Proofyard';
}

/** To the new owner (who wants this kind of e-mail), in the caller's transaction. */
export async function notifyAssigned(deps: Deps, f: FindingDto, actor: SessionUser, transaction: Transaction) {
  if (!f.owner) return;
  const [owner] = await recipients(deps, f.programId, [f.owner.id], transaction);
  if (!owner || !wants(owner.email_prefs, 'assigned')) return;
  const code = await programCode(f.programId, transaction);
  await enqueueMail(
    {
      to: owner.email,
      kind: MAIL_KINDS.assigned,
      subject: `[${code}] Finding assigned to you: ${f.title}`.slice(0, 300),
      text: [
        `Hello ${owner.name},`,
        '',
        `${actor.name} assigned this finding to you:`,
        '',
        ...summaryLines(f),
        '',
        `Open it: ${findingUrl(deps, f.id)}`,
        ...footer('a finding was assigned to you'),
      ].join('\n'),
    },
    transaction,
  );
}

/** To the owner and watchers (not the person who made the change), in the caller's transaction. */
export async function notifyStatusChange(
  deps: Deps,
  f: FindingDto,
  from: FindingStatus,
  actor: SessionUser,
  reason: string | null,
  transaction: Transaction,
) {
  const ids = [...(f.owner ? [f.owner.id] : []), ...f.watchers.map((w) => w.id)].filter((id) => id !== actor.id);
  const list = (await recipients(deps, f.programId, ids, transaction)).filter((r) => wants(r.email_prefs, 'status'));
  if (!list.length) return;
  const code = await programCode(f.programId, transaction);
  const to = FINDING_STATUS_LABELS[f.status];
  for (const r of list) {
    await enqueueMail(
      {
        to: r.email,
        kind: MAIL_KINDS.status,
        subject: `[${code}] ${to}: ${f.title}`.slice(0, 300),
        text: [
          `Hello ${r.name},`,
          '',
          `${actor.name} moved this finding from ${FINDING_STATUS_LABELS[from]} to ${to}.`,
          ...(reason ? [`Reason: ${reason}`] : []),
          '',
          ...summaryLines(f),
          '',
          `Open it: ${findingUrl(deps, f.id)}`,
          ...footer(f.owner?.id === r.id ? 'you own this finding' : 'you watch this finding'),
        ].join('\n'),
      },
      transaction,
    );
  }
}

// ---- The daily digest of overdue findings --------------------------------------------------

type OverdueRow = {
  id: string;
  program_id: string;
  code: string;
  title: string;
  severity: FindingSeverity;
  status: FindingStatus;
  due_date: string;
  owner_id: string | null;
  owner_name: string | null;
  tag: string | null;
};

/** At most this many findings per section of one digest; the rest are counted and linked. */
export const DIGEST_SECTION_MAX = 40;
const DAY_MS = 24 * 3600 * 1000;

function digestLine(deps: Deps, f: OverdueRow, today: string) {
  const late = Math.round((Date.parse(today) - Date.parse(f.due_date)) / DAY_MS);
  return [
    `- [${FINDING_SEVERITY_LABELS[f.severity]}] ${f.title} · ${f.tag ?? 'no asset'} · due ${f.due_date} (${late} day${late === 1 ? '' : 's'} late) · ${FINDING_STATUS_LABELS[f.status]} · owner ${f.owner_name ?? 'nobody'}`,
    `  ${findingUrl(deps, f.id)}`,
  ];
}

function section(deps: Deps, title: string, rows: OverdueRow[], today: string, moreUrl: string) {
  if (!rows.length) return [];
  const shown = rows.slice(0, DIGEST_SECTION_MAX);
  return [
    title,
    ...shown.flatMap((f) => digestLine(deps, f, today)),
    ...(rows.length > shown.length ? [`  ... and ${rows.length - shown.length} more: ${moreUrl}`] : []),
    '',
  ];
}

/**
 * Queues one e-mail per person listing overdue findings (past their due date, a UTC day, and not
 * verified or rejected): an owner gets their own; a lead also gets every other overdue finding of
 * their programs. People who turned the digest off get nothing. Runs in `transaction` when given
 * (the job loop passes its own, so the mail and the schedule commit together).
 */
export async function runOverdueDigest(
  deps: Deps,
  asOf: Date,
  options: { programIds?: string[]; transaction?: Transaction } = {},
): Promise<{ recipients: number; findings: number }> {
  const run = async (transaction: Transaction) => {
    const today = utcDate(asOf);
    const bind: unknown[] = [today, [...CLOSED_FINDING_STATUSES]];
    const scope = options.programIds ? `AND f.program_id = ANY($${bind.push(options.programIds)}::uuid[])` : '';
    const overdue = await deps.sequelize.query<OverdueRow>(
      `SELECT f.id, f.program_id, p.code, f.title, f.severity, f.status, f.due_date::text AS due_date,
              f.owner_id, o.name AS owner_name, a.tag
         FROM findings f
         JOIN programs p ON p.id = f.program_id
         LEFT JOIN assets a ON a.id = f.asset_id
         LEFT JOIN users o ON o.id = f.owner_id
        WHERE f.due_date < $1::date AND f.status <> ALL($2::enum_findings_status[]) ${scope}
        ORDER BY p.code, f.due_date, f.severity, f.id`,
      { bind, type: QueryTypes.SELECT, transaction },
    );
    if (!overdue.length) return { recipients: 0, findings: 0 };
    const programIds = [...new Set(overdue.map((f) => f.program_id))];
    const ownerIds = [...new Set(overdue.map((f) => f.owner_id).filter((v): v is string => !!v))];
    const people = await deps.sequelize.query<Recipient & { role: string; program_id: string }>(
      `SELECT u.id, u.name, u.email, u.email_prefs, u.role, pm.program_id
         FROM users u JOIN program_members pm ON pm.user_id = u.id
        WHERE u.active AND pm.program_id = ANY($1::uuid[]) AND (u.role = 'lead' OR u.id = ANY($2::uuid[]))
        ORDER BY u.name, u.id`,
      { bind: [programIds, ownerIds], type: QueryTypes.SELECT, transaction },
    );
    const byUser = new Map<string, { person: Recipient; leadOf: Set<string>; memberOf: Set<string> }>();
    for (const p of people) {
      if (!wants(p.email_prefs, 'digest')) continue;
      const entry = byUser.get(p.id) ?? { person: p, leadOf: new Set<string>(), memberOf: new Set<string>() };
      entry.memberOf.add(p.program_id);
      if (p.role === 'lead') entry.leadOf.add(p.program_id);
      byUser.set(p.id, entry);
    }
    const moreUrl = `${deps.config.publicUrl}/findings?overdue=true`;
    let sent = 0;
    for (const { person, leadOf, memberOf } of byUser.values()) {
      const own = overdue.filter((f) => f.owner_id === person.id && memberOf.has(f.program_id));
      const others = [...leadOf].map((programId) => ({
        code: overdue.find((f) => f.program_id === programId)?.code ?? '',
        rows: overdue.filter((f) => f.program_id === programId && f.owner_id !== person.id),
      }));
      const total = own.length + others.reduce((n, o) => n + o.rows.length, 0);
      if (!total) continue;
      const text = [
        `Hello ${person.name},`,
        '',
        `${total} finding${total === 1 ? ' is' : 's are'} past ${total === 1 ? 'its' : 'their'} due date as of ${today}.`,
        '',
        ...section(deps, 'Yours:', own, today, `${moreUrl}&mine=owner`),
        ...others.flatMap((o) => section(deps, `Others in ${o.code}:`, o.rows, today, moreUrl)),
        ...footer(leadOf.size ? 'you lead a program with overdue findings' : 'you own overdue findings').slice(1),
      ].join('\n');
      await enqueueMail(
        { to: person.email, kind: MAIL_KINDS.digest, subject: `Proofyard: ${total} overdue finding${total === 1 ? '' : 's'} (${today})`, text },
        transaction,
      );
      sent += 1;
    }
    return { recipients: sent, findings: overdue.length };
  };
  return options.transaction ? run(options.transaction) : deps.sequelize.transaction(run);
}

// ---- Preferences --------------------------------------------------------------------------

export function toEmailPrefs(stored: Record<string, unknown> | null | undefined): EmailPrefs {
  return Object.fromEntries(EMAIL_KINDS.map((k) => [k, wants(stored, k)])) as EmailPrefs;
}

export async function getEmailPrefs(deps: Deps, user: SessionUser): Promise<EmailPrefs> {
  const [row] = await deps.sequelize.query<{ email_prefs: Record<string, unknown> }>(`SELECT email_prefs FROM users WHERE id = $1`, {
    bind: [user.id],
    type: QueryTypes.SELECT,
  });
  return toEmailPrefs(row?.email_prefs);
}

/**
 * Saves the user's choices, keeping any other keys in users.email_prefs. The user's version is
 * left alone: it guards the administrator's edits, which a preference does not touch.
 */
export async function setEmailPrefs(deps: Deps, user: SessionUser, prefs: EmailPrefs): Promise<EmailPrefs> {
  return deps.sequelize.transaction(async (transaction) => {
    const [row] = await deps.sequelize.query<{ email_prefs: Record<string, unknown> }>(
      `SELECT email_prefs FROM users WHERE id = $1 FOR UPDATE`,
      { bind: [user.id], type: QueryTypes.SELECT, transaction },
    );
    const before = toEmailPrefs(row?.email_prefs);
    await deps.sequelize.query(`UPDATE users SET email_prefs = $2::jsonb, updated_at = now() WHERE id = $1`, {
      bind: [user.id, JSON.stringify({ ...(row?.email_prefs ?? {}), ...prefs })],
      transaction,
    });
    if (JSON.stringify(before) !== JSON.stringify(prefs)) {
      await recordHistory(
        { programId: null, entityType: 'user', entityId: user.id, action: 'email-prefs', actorId: user.id, before, after: prefs },
        transaction,
      );
    }
    return prefs;
  });
}
