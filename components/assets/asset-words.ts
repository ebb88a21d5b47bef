import type { BadgeTone } from '@/components/ui/chip';
import type { AssetStatus, ChecklistProgress } from '@/shared/schemas/assets';

export const STATUS_TONES: Record<AssetStatus, BadgeTone> = {
  'in-build': 'primary',
  'in-test': 'primary',
  available: 'success',
  assigned: 'neutral',
  down: 'danger',
  retired: 'neutral',
};

export function progressFraction(progress: ChecklistProgress): number {
  return progress.total === 0 ? 0 : progress.done / progress.total;
}

/** "12 of 30 done · 2 deviations" (done = passed or not applicable). */
export function progressCaption(progress: ChecklistProgress): string {
  if (progress.total === 0) return 'No checklist items';
  const parts = [`${progress.done} of ${progress.total} done`];
  if (progress.deviations > 0) parts.push(progress.deviations === 1 ? '1 deviation' : `${progress.deviations} deviations`);
  return parts.join(' · ');
}

export const NOT_CLEARED_CAUTION =
  'Do not drive or power this asset until the finding is resolved; follow the site’s procedures.';

export function notClearedSentence(reason: string | null): string {
  return `Not cleared: ${reason?.trim() || 'an open safety finding'}.`;
}

const dateFormat = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric' });
const dateTimeFormat = new Intl.DateTimeFormat('en-GB', {
  day: 'numeric',
  month: 'short',
  year: 'numeric',
  hour: '2-digit',
  minute: '2-digit',
});

/** "3 Dec 2026"; a date-only string (YYYY-MM-DD) is read as that calendar day, not as UTC midnight. */
export function formatDate(value: string | null | undefined): string {
  if (!value) return '—';
  const dateOnly = /^\d{4}-\d{2}-\d{2}$/.exec(value);
  const date = dateOnly ? new Date(`${value}T12:00:00`) : new Date(value);
  return Number.isNaN(date.getTime()) ? value : dateFormat.format(date);
}

export function formatDateTime(value: string | null | undefined): string {
  if (!value) return '—';
  const date = new Date(value);
  return Number.isNaN(date.getTime()) ? value : dateTimeFormat.format(date);
}

export function formatKm(km: number): string {
  return `${Math.round(km).toLocaleString('en-GB')} km`;
}
