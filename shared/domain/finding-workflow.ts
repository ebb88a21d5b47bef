import type { Role } from '../schemas/auth';
import {
  CLOSED_FINDING_STATUSES,
  FINDING_SEVERITY_LABELS,
  FINDING_STATUS_LABELS,
  type FindingSeverity,
  type FindingStatus,
} from '../schemas/finding-enums';

/** PRODUCT.md section 3C: only an engineer or a lead verifies (and rejects) a finding. */
export const VERIFIER_ROLES: readonly Role[] = ['engineer', 'lead'];
/** The roles that work in a program: each files and comments on findings. */
export const FINDING_MEMBER_ROLES = ['technician', 'engineer', 'coordinator', 'driver', 'lead'] as const satisfies readonly Role[];

export type FindingActor = { id: string; role: Role };
export type FindingState = { status: FindingStatus; severity: FindingSeverity; ownerId: string | null; createdBy: string | null };

/**
 * Who may make a transition: `owner` = the finding's owner or an engineer or lead; `verifier` =
 * an engineer or lead; `member` = anyone in the program. `reason`: a reason is required.
 */
type Rule = { who: 'owner' | 'verifier' | 'member'; reason: boolean };
const OWNER: Rule = { who: 'owner', reason: false };
const VERIFY: Rule = { who: 'verifier', reason: false };
const REJECT: Rule = { who: 'verifier', reason: true };
const REOPEN: Rule = { who: 'member', reason: true };

export const FINDING_TRANSITIONS: Record<FindingStatus, Partial<Record<FindingStatus, Rule>>> = {
  open: { 'in-work': OWNER, fixed: OWNER, rejected: REJECT },
  'in-work': { open: OWNER, fixed: OWNER, rejected: REJECT },
  fixed: { 'in-work': OWNER, verified: VERIFY, rejected: REJECT, open: REOPEN },
  verified: { open: REOPEN },
  rejected: { open: REOPEN },
};

export const isClosedStatus = (status: FindingStatus) => CLOSED_FINDING_STATUSES.includes(status);
export const isVerifier = (actor: FindingActor) => VERIFIER_ROLES.includes(actor.role);

export type RuleResult =
  | { ok: true; reasonRequired: boolean }
  | { ok: false; status: 400 | 403; code: string; message: string; field?: string };

const label = (s: FindingStatus) => FINDING_STATUS_LABELS[s].toLowerCase();

/** Whether `actor` may move `finding` to `to` (a missing reason is reported apart, by `reasonMissing`). */
export function checkTransition(finding: FindingState, to: FindingStatus, actor: FindingActor): RuleResult {
  const rule = FINDING_TRANSITIONS[finding.status][to];
  if (!rule) {
    const hint =
      to === 'verified'
        ? ' A finding is verified once it is fixed.'
        : isClosedStatus(finding.status)
          ? ' Reopen it first.'
          : '';
    return {
      ok: false,
      status: 400,
      code: 'finding/invalid-transition',
      message: `A finding cannot go from ${label(finding.status)} to ${label(to)}.${hint}`,
      field: 'status',
    };
  }
  const allowed =
    rule.who === 'member' || isVerifier(actor) || (rule.who === 'owner' && finding.ownerId !== null && finding.ownerId === actor.id);
  if (!allowed) {
    const message =
      rule.who === 'verifier'
        ? `Only an engineer or a lead can ${to === 'verified' ? 'verify' : 'reject'} a finding.`
        : `Only the finding's owner, an engineer or a lead can move it to ${label(to)}.`;
    return { ok: false, status: 403, code: 'finding/transition-forbidden', message };
  }
  return { ok: true, reasonRequired: rule.reason };
}

/** The statuses `actor` may move `finding` to, for the buttons of the finding page. */
export function allowedTransitions(finding: FindingState, actor: FindingActor): FindingStatus[] {
  return (Object.keys(FINDING_TRANSITIONS[finding.status]) as FindingStatus[]).filter((to) => checkTransition(finding, to, actor).ok);
}

/** Creator, owner, engineer or lead may change a finding's details (title, severity, owner, due date...). */
export function mayEditDetails(finding: FindingState, actor: FindingActor): boolean {
  return isVerifier(actor) || (finding.ownerId !== null && finding.ownerId === actor.id) || (finding.createdBy !== null && finding.createdBy === actor.id);
}

/**
 * Checks the detail changes of an update. Lowering a `safety` finding clears the asset, so only
 * an engineer or lead may do it. Anyone else in the program may add or remove only themselves
 * as a watcher.
 */
export function checkDetailEdit(
  finding: FindingState,
  changes: { fields: string[]; severity?: FindingSeverity; watchersAdded: string[]; watchersRemoved: string[] },
  actor: FindingActor,
): RuleResult {
  const forbidden = (message: string): RuleResult => ({ ok: false, status: 403, code: 'finding/edit-forbidden', message });
  if (changes.severity !== undefined && finding.severity === 'safety' && changes.severity !== 'safety' && !isVerifier(actor)) {
    return forbidden(
      `Only an engineer or a lead can lower a safety finding to ${FINDING_SEVERITY_LABELS[changes.severity].toLowerCase()}: it would clear the asset.`,
    );
  }
  if (mayEditDetails(finding, actor)) return { ok: true, reasonRequired: false };
  if (changes.fields.length) {
    return forbidden(`Only the finding's creator, its owner, an engineer or a lead can change ${changes.fields.join(', ')}.`);
  }
  const others = [...changes.watchersAdded, ...changes.watchersRemoved].filter((id) => id !== actor.id);
  if (others.length) return forbidden('You can add or remove only yourself as a watcher.');
  return { ok: true, reasonRequired: false };
}

// ---- Dates --------------------------------------------------------------------------------

const DAY_MS = 24 * 3600 * 1000;

/** Today's date (YYYY-MM-DD) in UTC at `asOf`. */
export const utcDate = (asOf: Date) => asOf.toISOString().slice(0, 10);

/**
 * A due date is in the past when it is before today in the earliest time zone on Earth (UTC-12),
 * so a date that is still today for the person picking it is never refused.
 */
export function isPastDueDate(date: string, asOf: Date): boolean {
  return date < utcDate(new Date(asOf.getTime() - DAY_MS / 2));
}

/** Overdue: past the due date (a UTC day) and not verified or rejected. */
export function isOverdue(finding: { dueDate: string | null; status: FindingStatus }, asOf: Date): boolean {
  return finding.dueDate !== null && finding.dueDate < utcDate(asOf) && !isClosedStatus(finding.status);
}
