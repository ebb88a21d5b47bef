import type { BadgeTone } from '@/components/ui/chip';
import { formatDate } from '@/components/assets/asset-words';
import type { FindingSeverity, FindingStatus } from '@/shared/schemas/findings';

/** Severity is always written out beside its colour; safety also carries the warning sign. */
export const SEVERITY_TONES: Record<FindingSeverity, BadgeTone> = {
  safety: 'danger',
  blocking: 'warning',
  major: 'primary',
  minor: 'neutral',
};

/** What each severity means, under the big choice buttons of the capture screen (PRODUCT.md section 3C). */
export const SEVERITY_HINTS: Record<FindingSeverity, string> = {
  safety: 'Not to be driven or powered until resolved',
  blocking: 'Stops a test or the gate',
  major: 'Needs fixing before the next stage',
  minor: 'Cosmetic or small',
};

export const STATUS_TONES: Record<FindingStatus, BadgeTone> = {
  open: 'warning',
  'in-work': 'primary',
  fixed: 'primary',
  verified: 'success',
  rejected: 'neutral',
};

/** PRODUCT.md section 6: the caution shown when a finding is filed or stands as `safety`. */
export const SAFETY_CAUTION =
  'A safety finding marks the asset not cleared: it is not to be driven or powered until the finding is verified or rejected. Follow the site’s procedures.';

/** The label of the button that moves a finding from `from` to `to`. */
export function actionLabel(from: FindingStatus, to: FindingStatus): string {
  switch (to) {
    case 'in-work':
      return from === 'fixed' ? 'Back to in work' : 'Start work';
    case 'fixed':
      return 'Mark fixed';
    case 'verified':
      return 'Verify';
    case 'rejected':
      return 'Reject';
    case 'open':
      return from === 'in-work' ? 'Back to open' : 'Reopen';
  }
}

const DAY_MS = 24 * 3600 * 1000;

/** "today", "1 day", "12 days", "3 months": how long ago a finding was filed. */
export function ageWords(createdAt: string, asOf: Date): string {
  const days = Math.floor((asOf.getTime() - new Date(createdAt).getTime()) / DAY_MS);
  if (!Number.isFinite(days) || days <= 0) return 'today';
  if (days === 1) return '1 day';
  if (days < 60) return `${days} days`;
  return `${Math.round(days / 30)} months`;
}

/** "Due 3 Dec 2026", "Overdue since 3 Dec 2026", "No due date". */
export function dueWords(dueDate: string | null, overdue: boolean): string {
  if (!dueDate) return 'No due date';
  return overdue ? `Overdue since ${formatDate(dueDate)}` : `Due ${formatDate(dueDate)}`;
}

/** A local calendar day `days` from `from`, as YYYY-MM-DD (a due date is a day, not a time). */
export function dayFrom(from: Date, days: number): string {
  const date = new Date(from.getFullYear(), from.getMonth(), from.getDate() + days);
  const month = String(date.getMonth() + 1).padStart(2, '0');
  const day = String(date.getDate()).padStart(2, '0');
  return `${date.getFullYear()}-${month}-${day}`;
}

export function plural(count: number, one: string, many = `${one}s`): string {
  return `${count} ${count === 1 ? one : many}`;
}
