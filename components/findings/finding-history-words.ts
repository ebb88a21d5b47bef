import { formatDate } from '@/components/assets/asset-words';
import { SYSTEM_LABELS, type HistoryEntry, type System } from '@/shared/schemas/assets';
import {
  FINDING_SEVERITY_LABELS,
  FINDING_STATUS_LABELS,
  type Finding,
  type FindingSeverity,
  type FindingStatus,
  type Person,
} from '@/shared/schemas/findings';

/** The finding's fields as the history records them (and as the edit form compares them). */
export type FindingSnapshot = {
  title?: string;
  description?: string;
  system?: System | null;
  severity?: FindingSeverity;
  status?: FindingStatus;
  rejectReason?: string | null;
  owner?: Person | null;
  watchers?: Person[];
  dueDate?: string | null;
};

export const FINDING_FIELD_LABELS: Record<string, string> = {
  title: 'Title',
  description: 'Description',
  system: 'System',
  severity: 'Severity',
  status: 'Status',
  rejectReason: 'Reason for rejecting',
  owner: 'Owner',
  watchers: 'Watchers',
  dueDate: 'Due date',
};

/** Fields a reader never needs (ids and bookkeeping). */
const HIDDEN = new Set(['assetId', 'checklistItemId', 'assetTag', 'version', 'commentId', 'photoId', 'sha256', 'bytes', 'contentType']);

const isPerson = (value: unknown): value is Person =>
  Boolean(value && typeof value === 'object' && 'name' in value && typeof (value as Person).name === 'string');

export function findingValueWords(key: string, value: unknown): string {
  if (value === null || value === undefined || value === '') return key === 'owner' ? 'nobody' : '(none)';
  if (key === 'severity' && typeof value === 'string') return FINDING_SEVERITY_LABELS[value as FindingSeverity] ?? value;
  if (key === 'status' && typeof value === 'string') return FINDING_STATUS_LABELS[value as FindingStatus] ?? value;
  if (key === 'system' && typeof value === 'string') return SYSTEM_LABELS[value as System] ?? value;
  if (key === 'dueDate' && typeof value === 'string') return formatDate(value);
  if (isPerson(value)) return value.name || 'someone';
  if (Array.isArray(value)) return value.length === 0 ? 'nobody' : value.map((item) => (isPerson(item) ? item.name || 'someone' : String(item))).join(', ');
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'string' || typeof value === 'number') return String(value);
  return JSON.stringify(value);
}

export type FieldChange = { key: string; label: string; before: string; after: string };

function record(value: unknown): Record<string, unknown> {
  return value && typeof value === 'object' && !Array.isArray(value) ? (value as Record<string, unknown>) : {};
}

/** People compare by id; everything else by value. */
function same(a: unknown, b: unknown): boolean {
  const norm = (v: unknown): unknown =>
    isPerson(v) ? (v as Person).id : Array.isArray(v) ? v.map(norm).sort() : v === undefined || v === '' ? null : v;
  return JSON.stringify(norm(a)) === JSON.stringify(norm(b));
}

/** The fields that differ, before -> after, in the product's words. */
export function findingChanges(before: unknown, after: unknown, keys?: readonly string[]): FieldChange[] {
  const a = record(before);
  const b = record(after);
  const all = keys ?? [...new Set([...Object.keys(a), ...Object.keys(b)])];
  return all
    .filter((key) => !HIDDEN.has(key) && !same(a[key], b[key]))
    .map((key) => ({
      key,
      label: FINDING_FIELD_LABELS[key] ?? key,
      before: findingValueWords(key, a[key]),
      after: findingValueWords(key, b[key]),
    }));
}

export function snapshotOf(finding: Finding): Required<FindingSnapshot> {
  return {
    title: finding.title,
    description: finding.description,
    system: finding.system,
    severity: finding.severity,
    status: finding.status,
    rejectReason: finding.rejectReason,
    owner: finding.owner,
    watchers: finding.watchers,
    dueDate: finding.dueDate,
  };
}

export type FindingHistoryLine = { sentence: string; changes: FieldChange[]; note: string | null };

/** One history entry of a finding in plain words: what happened, each field's before -> after, and the reason given. */
export function describeFindingEntry(entry: HistoryEntry): FindingHistoryLine {
  const before = record(entry.before);
  const after = record(entry.after);
  switch (entry.action) {
    case 'created': {
      const severity = typeof after.severity === 'string' ? FINDING_SEVERITY_LABELS[after.severity as FindingSeverity] : null;
      const tag = typeof after.assetTag === 'string' ? ` on ${after.assetTag}` : '';
      const owner = isPerson(after.owner) ? ` Owner: ${after.owner.name}.` : '';
      return {
        sentence: `Filed “${String(after.title ?? 'the finding')}”${tag}${severity ? ` as ${severity.toLowerCase()}` : ''}.${owner}`,
        changes: [],
        note: entry.note,
      };
    }
    case 'status-changed': {
      const from = findingValueWords('status', before.status);
      const to = findingValueWords('status', after.status);
      const changes = findingChanges(before, after).filter((change) => change.key !== 'status' && change.key !== 'rejectReason');
      return { sentence: `Moved it from ${from} to ${to}.`, changes, note: entry.note ? `Reason: ${entry.note}` : null };
    }
    case 'updated': {
      const changes = findingChanges(before, after);
      return { sentence: changes.length ? 'Changed the details.' : 'Saved without changes.', changes, note: entry.note };
    }
    case 'commented':
      return { sentence: `Commented: “${String(after.body ?? '')}”`, changes: [], note: null };
    case 'photo-added':
      return { sentence: 'Added a photo.', changes: [], note: null };
    default: {
      const words = entry.action.replace(/-/g, ' ');
      return { sentence: `${words.charAt(0).toUpperCase()}${words.slice(1)}.`, changes: findingChanges(before, after), note: entry.note };
    }
  }
}
