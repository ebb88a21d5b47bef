import type { AssetSummary, ChecklistItem, ChecklistProgress } from '@/shared/schemas/assets';

export const PROGRAM_ID = '0b6f1f0e-8a43-4a54-9a53-3f0f6f1f0a01';
export const STAGE_ID = '2c1d7f44-52e1-4c55-8c27-3a0bb6a4a002';

export function progress(overrides: Partial<ChecklistProgress> = {}): ChecklistProgress {
  return { total: 10, done: 3, requiredTotal: 8, requiredDone: 2, deviations: 1, ...overrides };
}

/** An asset as the list endpoint answers it; each test overrides what it is about. */
export function assetSummary(overrides: Partial<AssetSummary> = {}): AssetSummary {
  return {
    id: '5d0c3b7e-1111-4a5b-9c3d-000000000014',
    programId: PROGRAM_ID,
    tag: 'FW3-EP-014',
    kind: 'vehicle',
    stageId: STAGE_ID,
    stage: 'Early prototype',
    status: 'in-build',
    location: 'Bay 4',
    vin: null,
    odometerKm: 120,
    updatedAt: '2026-12-02T10:15:00.000Z',
    checklist: progress(),
    thumbnailUrl: null,
    cleared: true,
    notClearedReason: null,
    ...overrides,
  };
}

export function checklistItem(overrides: Partial<ChecklistItem> = {}): ChecklistItem {
  return {
    id: '7a9e2c10-2222-4b6c-8d4e-000000000001',
    assetId: '5d0c3b7e-1111-4a5b-9c3d-000000000014',
    stageId: STAGE_ID,
    system: 'body',
    title: 'Rear seat belt anchors',
    instructions: 'Torque both anchors to 45 N·m.',
    expectedPartNumber: 'FW3-BD-2201',
    expectedRevision: 'C',
    requiredForGate: true,
    hvQualified: false,
    position: 0,
    state: 'open',
    fittedPartNumber: '',
    fittedRevision: '',
    notes: '',
    naReason: '',
    findingId: null,
    updatedBy: null,
    updatedAt: '2026-12-02T10:15:00.000Z',
    version: 3,
    photos: [],
    ...overrides,
  };
}
