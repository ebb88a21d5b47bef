import {
  ASSET_KIND_LABELS,
  ASSET_STATUS_LABELS,
  ITEM_STATE_LABELS,
  SYSTEM_LABELS,
  type AssetKind,
  type AssetStatus,
  type HistoryEntry,
  type ItemState,
  type System,
} from '@/shared/schemas/assets';
import { formatDate, formatKm } from './asset-words';

/** Names of the recorded fields, in the product's words. */
export const FIELD_LABELS: Record<string, string> = {
  tag: 'Tag',
  kind: 'Kind',
  status: 'Status',
  location: 'Location',
  vin: 'VIN',
  odometerKm: 'Odometer',
  buildDate: 'Build date',
  notes: 'Notes',
  stage: 'Stage',
  state: 'State',
  fittedPartNumber: 'Fitted part number',
  fittedRevision: 'Fitted revision',
  naReason: 'Reason not applicable',
  title: 'Title',
  description: 'Description',
  severity: 'Severity',
  system: 'System',
  name: 'Name',
  retired: 'Retired',
};

/** Ids and bookkeeping that mean nothing to a reader. */
const HIDDEN_FIELDS = new Set(['version', 'checklistItems', 'updatedAt', 'createdAt', 'sha256', 'bytes', 'contentType']);
const isHidden = (key: string) => HIDDEN_FIELDS.has(key) || /(^id|Id|Ids)$/.test(key);

function humanise(key: string): string {
  const words = key.replace(/([a-z0-9])([A-Z])/g, '$1 $2').toLowerCase();
  return words.charAt(0).toUpperCase() + words.slice(1);
}

export function fieldLabel(key: string): string {
  return FIELD_LABELS[key] ?? humanise(key);
}

/** A recorded value as a person would say it: labels for codes, units for numbers, "(none)" for blanks. */
export function valueWords(key: string, value: unknown): string {
  if (value === null || value === undefined || value === '') return '(none)';
  if (key === 'kind' && typeof value === 'string') return ASSET_KIND_LABELS[value as AssetKind] ?? value;
  if (key === 'status' && typeof value === 'string') return ASSET_STATUS_LABELS[value as AssetStatus] ?? value.replace(/-/g, ' ');
  if (key === 'state' && typeof value === 'string') return ITEM_STATE_LABELS[value as ItemState] ?? value;
  if (key === 'system' && typeof value === 'string') return SYSTEM_LABELS[value as System] ?? value;
  if (key === 'odometerKm' && typeof value === 'number') return formatKm(value);
  if (key === 'buildDate' && typeof value === 'string') return formatDate(value);
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (typeof value === 'string' || typeof value === 'number') return String(value);
  return JSON.stringify(value);
}

export type Change = { key: string; label: string; before: string; after: string };

function record(value: unknown): Record<string, unknown> {
  return value && typeof value === 'object' && !Array.isArray(value) ? (value as Record<string, unknown>) : {};
}

/** The fields that differ between two recorded states, before -> after. */
export function changesBetween(before: unknown, after: unknown): Change[] {
  const a = record(before);
  const b = record(after);
  const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])].filter((key) => !isHidden(key));
  return keys
    .filter((key) => JSON.stringify(a[key] ?? null) !== JSON.stringify(b[key] ?? null))
    .map((key) => ({ key, label: fieldLabel(key), before: valueWords(key, a[key]), after: valueWords(key, b[key]) }));
}

export type HistoryLine = { sentence: string; changes: Change[]; note: string | null };

/** One history entry in plain words: what was done, and each field's before -> after. */
export function describeEntry(entry: HistoryEntry): HistoryLine {
  const before = record(entry.before);
  const after = record(entry.after);
  const note = entry.note && entry.note !== after.title ? entry.note : null;
  switch (`${entry.entityType}:${entry.action}`) {
    case 'asset:created':
      return {
        sentence: `Added the asset${typeof after.stage === 'string' ? ` on the stage ${after.stage}` : ''}.`,
        changes: [],
        note,
      };
    case 'asset:updated': {
      const changes = changesBetween(before, after);
      return { sentence: changes.length > 0 ? 'Changed the asset.' : 'Saved the asset without changes.', changes, note };
    }
    case 'asset:stage-moved': {
      const items = typeof after.checklistItems === 'number' ? after.checklistItems : null;
      return {
        sentence: `Moved the asset from ${String(before.stage ?? 'its stage')} to ${String(after.stage ?? 'another stage')}${
          items === null ? '' : `; a new checklist of ${items} item${items === 1 ? '' : 's'} was started`
        }.`,
        changes: [],
        note,
      };
    }
    case 'checklist-item:updated': {
      const title = entry.note ?? 'an item';
      return { sentence: `Updated the checklist item “${title}”.`, changes: changesBetween(before, after), note: null };
    }
    case 'finding:created':
      return {
        sentence: `Filed the finding “${String(after.title ?? 'untitled')}”${after.severity ? ` (${String(after.severity)})` : ''}.`,
        changes: [],
        note,
      };
    case 'finding:commented':
      return { sentence: `Commented on a finding: “${String(after.body ?? '')}”`, changes: [], note };
    case 'finding:status-changed':
      return { sentence: 'Changed the status of a finding.', changes: changesBetween(before, after), note };
    case 'finding:photo-added':
      return { sentence: 'Added a photo to a finding.', changes: [], note };
    case 'photo:uploaded':
      return { sentence: after.checklistItemId ? 'Added a photo to a checklist item.' : 'Added a photo.', changes: [], note };
    default: {
      const verb = humanise(entry.action.replace(/-/g, ' ')).toLowerCase();
      return {
        sentence: `${verb.charAt(0).toUpperCase()}${verb.slice(1)} ${entry.entityType.replace(/-/g, ' ')}.`,
        changes: changesBetween(before, after),
        note,
      };
    }
  }
}
