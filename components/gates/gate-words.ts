import type { Attendee, GateReviewSummary } from '@/shared/schemas/readiness';
import { resultLabel } from '@/components/readiness/readiness-words';

export function decisionWords(review: Pick<GateReviewSummary, 'decision'>): string {
  return review.decision ? resultLabel(review.decision) : 'Not decided yet';
}

export function attendeeNames(attendees: Attendee[]): string {
  return attendees.length === 0 ? 'No attendees recorded.' : attendees.map((a) => a.name).join(', ');
}

/** Free-text attendee names: one per line or separated by commas, blanks dropped. */
export function splitNames(text: string): string[] {
  return text
    .split(/[\n,]/)
    .map((name) => name.trim())
    .filter(Boolean);
}

/** A calendar day `days` from `from`, as YYYY-MM-DD in local time. */
export function dayFrom(from: Date, days: number): string {
  const d = new Date(from.getFullYear(), from.getMonth(), from.getDate() + days);
  const mm = String(d.getMonth() + 1).padStart(2, '0');
  const dd = String(d.getDate()).padStart(2, '0');
  return `${d.getFullYear()}-${mm}-${dd}`;
}
