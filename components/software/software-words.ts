import type { BadgeTone } from '@/components/ui/chip';
import { CONFORMANCE_STATUS_LABELS, type ConformanceStatus } from '@/shared/schemas/software';

/** The colour of a status always goes with its words (CONFORMANCE_STATUS_LABELS), never alone. */
export const STATUS_TONES: Record<ConformanceStatus, BadgeTone> = {
  'on-baseline': 'success',
  behind: 'warning',
  ahead: 'primary',
  missing: 'danger',
  'not-comparable': 'neutral',
  'rule-broken': 'danger',
};

/** A cell with no status has nothing to compare with: no released baseline, or the ECU is not in it. */
export const NO_TARGET_LABEL = 'No target';

export function statusLabel(status: ConformanceStatus | null): string {
  return status ? CONFORMANCE_STATUS_LABELS[status] : NO_TARGET_LABEL;
}

export function statusTone(status: ConformanceStatus | null): BadgeTone {
  return status ? STATUS_TONES[status] : 'neutral';
}

/** "FZC 4.1.0, Behind, target 4.2.0" for a screen reader. */
export function cellDescription(ecuCode: string, installed: string | null, target: string | null, status: ConformanceStatus | null): string {
  const parts = [`${ecuCode} ${installed ?? 'nothing installed'}`, statusLabel(status)];
  if (target) parts.push(`target ${target}`);
  return parts.join(', ');
}

export function formatDateTime(iso: string): string {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return iso;
  return date.toLocaleString('en-GB', { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit' });
}

export function formatDay(iso: string): string {
  const date = new Date(iso);
  if (Number.isNaN(date.getTime())) return iso;
  return date.toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric' });
}

/** Who may do what (the server checks the same: server/routes/software.ts). */
export const softwareCan = {
  editBaselines: (role: string | null | undefined) => role === 'engineer' || role === 'lead',
  editCatalogue: (role: string | null | undefined) => role === 'engineer' || role === 'lead',
  recordFlash: (role: string | null | undefined) => role === 'technician' || role === 'engineer' || role === 'lead',
};
