import { describeEntry } from '@/components/assets/history-words';
import { qrShape, QUIET_ZONE } from '@/components/labels/qr';
import type { HistoryEntry } from '@/shared/schemas/assets';

function entry(overrides: Partial<HistoryEntry>): HistoryEntry {
  return {
    id: '1',
    at: '2026-12-02T10:15:00.000Z',
    actor: { id: 'u1', name: 'Ana Ruiz' },
    action: 'updated',
    entityType: 'asset',
    entityId: 'a1',
    before: null,
    after: null,
    note: null,
    ...overrides,
  };
}

describe('history in plain words', () => {
  it.each<[string, Partial<HistoryEntry>, string, string[]]>([
    [
      'an asset edit lists each field before -> after, in the product words',
      { before: { location: 'Bay 4', status: 'in-build', odometerKm: 120 }, after: { location: 'Climate lab', status: 'in-test', odometerKm: 120 } },
      'Changed the asset.',
      ['Location: Bay 4 → Climate lab', 'Status: In build → In test'],
    ],
    [
      'a stage move names both stages and the new checklist',
      { action: 'stage-moved', before: { stageId: 's1', stage: 'Bench' }, after: { stageId: 's2', stage: 'Integration car', visitId: 'v', checklistItems: 29 } },
      'Moved the asset from Bench to Integration car; a new checklist of 29 items was started.',
      [],
    ],
    [
      'a checklist answer names the item (the note) and hides ids',
      { entityType: 'checklist-item', note: 'Lighting check', before: { state: 'open', naReason: '' }, after: { state: 'not-applicable', naReason: 'No lamps on a bench rig', findingId: null } },
      'Updated the checklist item “Lighting check”.',
      ['State: Open → Not applicable', 'Reason not applicable: (none) → No lamps on a bench rig'],
    ],
    [
      'an unknown action still reads as a sentence',
      { action: 'tyres-swapped', entityType: 'asset', before: { tyreSet: 'A' }, after: { tyreSet: 'B' } },
      'Tyres swapped asset.',
      ['Tyre set: A → B'],
    ],
  ])('%s', (_name, overrides, sentence, changes) => {
    const line = describeEntry(entry(overrides));
    expect(line.sentence).toBe(sentence);
    expect(line.changes.map((change) => `${change.label}: ${change.before} → ${change.after}`)).toEqual(changes);
  });
});

describe('QR shape', () => {
  beforeAll(() => {
    // jsdom lacks TextEncoder, which browsers and Hermes have; the qrcode package encodes with it.
    if (typeof globalThis.TextEncoder === 'undefined') {
      globalThis.TextEncoder = (require('node:util') as typeof import('node:util')).TextEncoder as typeof globalThis.TextEncoder;
    }
  });

  it('draws the modules of the qrcode package with a four-module quiet zone', () => {
    const shape = qrShape('https://proofyard.example/assets/5d0c3b7e-1111-4a5b-9c3d-000000000014');
    // ISO/IEC 18004: version v has 17 + 4v modules a side; this URL needs version 4 or 5 at level M.
    expect([33, 37]).toContain(shape.size - 2 * QUIET_ZONE);
    // The top-left finder pattern starts at the quiet zone's edge.
    expect(shape.path.startsWith(`M${QUIET_ZONE} ${QUIET_ZONE}h1v1h-1z`)).toBe(true);
  });
});
