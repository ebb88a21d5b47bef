import { Op } from 'sequelize';
import type { z } from 'zod';
import { checklistProgress } from '../../shared/domain/checklist';
import {
  SYSTEMS,
  type Checklist,
  type ChecklistItem as ChecklistItemDto,
  type Photo as PhotoDto,
  type UpdateChecklistItemSchema,
} from '../../shared/schemas/assets';
import { ChecklistItem, Finding, Photo, Stage, StageVisit, User } from '../db/models';
import type { Deps } from '../deps';
import { AppError, conflict, notFound } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { visibleAsset } from './assets';
import { recordHistory } from './history';
import { photoDtos } from './photos';

type UpdateChecklistItem = z.output<typeof UpdateChecklistItemSchema>;

export const DEVIATION_DEFAULT_SEVERITY = 'major' as const;

async function userNames(ids: Array<string | null>): Promise<Map<string, string>> {
  const unique = [...new Set(ids.filter((v): v is string => !!v))];
  if (!unique.length) return new Map();
  const users = await User.findAll({ attributes: ['id', 'name'], where: { id: unique } });
  return new Map(users.map((u) => [u.id, u.name]));
}

function toItemDto(item: ChecklistItem, updatedBy: string | null, photos: PhotoDto[]): ChecklistItemDto {
  return {
    id: item.id,
    assetId: item.assetId,
    stageId: item.stageId,
    system: item.system,
    title: item.title,
    instructions: item.instructions,
    expectedPartNumber: item.expectedPartNumber,
    expectedRevision: item.expectedRevision,
    requiredForGate: item.requiredForGate,
    hvQualified: item.hvQualified,
    position: item.position,
    state: item.state,
    fittedPartNumber: item.fittedPartNumber,
    fittedRevision: item.fittedRevision,
    notes: item.notes,
    naReason: item.naReason,
    findingId: item.findingId,
    updatedBy,
    updatedAt: item.updatedAt.toISOString(),
    version: item.version,
    photos,
  };
}

async function itemDtos(deps: Deps, items: ChecklistItem[]): Promise<ChecklistItemDto[]> {
  const names = await userNames(items.map((i) => i.updatedBy));
  const photos = items.length
    ? await Photo.findAll({ where: { checklistItemId: { [Op.in]: items.map((i) => i.id) } }, order: [['createdAt', 'ASC'], ['id', 'ASC']] })
    : [];
  const dtos = await photoDtos(deps, photos);
  return items.map((item) =>
    toItemDto(
      item,
      item.updatedBy ? (names.get(item.updatedBy) ?? null) : null,
      dtos.filter((p) => p.checklistItemId === item.id),
    ),
  );
}

/** The checklist of the asset's current stage visit, or of an earlier visit (read-only) when `visitId` names one. */
export async function getChecklist(deps: Deps, user: SessionUser, assetId: string, visitId?: string): Promise<Checklist> {
  const asset = await visibleAsset(user, assetId);
  const visit = visitId
    ? await StageVisit.findOne({ where: { id: visitId, assetId: asset.id } })
    : await StageVisit.findOne({ where: { assetId: asset.id, leftAt: null } });
  if (!visit) throw notFound('This stage visit');
  const stage = (await Stage.findByPk(visit.stageId))!;
  const items = await ChecklistItem.findAll({ where: { visitId: visit.id }, order: [['position', 'ASC'], ['createdAt', 'ASC'], ['id', 'ASC']] });
  const dtos = await itemDtos(deps, items);
  const groups = SYSTEMS.map((system) => {
    const inGroup = dtos.filter((i) => i.system === system);
    return { system, progress: checklistProgress(inGroup), items: inGroup };
  }).filter((g) => g.items.length > 0);
  return {
    assetId: asset.id,
    stageId: stage.id,
    stage: stage.name,
    visitId: visit.id,
    current: visit.leftAt === null,
    progress: checklistProgress(dtos),
    groups,
  };
}

const itemSnapshot = (i: ChecklistItem) => ({
  state: i.state,
  fittedPartNumber: i.fittedPartNumber,
  fittedRevision: i.fittedRevision,
  notes: i.notes,
  naReason: i.naReason,
  findingId: i.findingId,
});

/**
 * Marks an item passed, deviation, not applicable or open, with the part fitted and notes. A new
 * deviation opens a finding linked to the item (severity `major` unless given).
 */
export async function updateChecklistItem(deps: Deps, user: SessionUser, id: string, input: UpdateChecklistItem) {
  const updated = await deps.sequelize.transaction(async (transaction) => {
    const item = await ChecklistItem.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!item || !user.programIds.includes(item.programId)) throw notFound('This checklist item');
    if (item.version !== input.version) {
      throw conflict('Someone else changed this checklist item first.', (await itemDtos(deps, [item]))[0]);
    }
    // A share lock: a stage move closing this visit waits for this change, or this one sees it closed.
    const visit = (await StageVisit.findByPk(item.visitId, { transaction, lock: transaction.LOCK.SHARE }))!;
    if (visit.leftAt !== null) {
      throw new AppError(409, 'checklist/closed', 'This checklist belongs to a stage the asset has left. It can be read, not changed.');
    }
    const entersDeviation = input.state === 'deviation' && (item.state !== 'deviation' || !item.findingId);
    if (entersDeviation && !input.deviation) {
      throw new AppError(400, 'request/invalid', 'deviation.description: Describe the deviation in a few words.', {
        fields: { 'deviation.description': 'Describe the deviation in a few words.' },
      });
    }
    if (input.deviation && input.state !== 'deviation') {
      throw new AppError(400, 'request/invalid', 'deviation: Only an item marked as a deviation takes a deviation description.', {
        fields: { deviation: 'Only with the state "deviation".' },
      });
    }
    const before = itemSnapshot(item);
    item.state = input.state;
    if (input.fittedPartNumber !== undefined) item.fittedPartNumber = input.fittedPartNumber;
    if (input.fittedRevision !== undefined) item.fittedRevision = input.fittedRevision;
    if (input.notes !== undefined) item.notes = input.notes;
    item.naReason = input.state === 'not-applicable' ? (input.naReason ?? '') : '';
    item.updatedBy = user.id;

    let finding: Finding | null = null;
    if (entersDeviation && input.deviation) {
      finding = await Finding.create(
        {
          programId: item.programId,
          assetId: item.assetId,
          checklistItemId: item.id,
          title: (input.deviation.title ?? `Deviation: ${item.title}`).slice(0, 160),
          description: input.deviation.description,
          system: item.system,
          severity: input.deviation.severity ?? DEVIATION_DEFAULT_SEVERITY,
          createdBy: user.id,
        },
        { transaction },
      );
      item.findingId = finding.id;
    }
    item.changed('updatedAt', true);
    await item.save({ transaction });
    if (finding) {
      await recordHistory(
        {
          programId: item.programId,
          entityType: 'finding',
          entityId: finding.id,
          action: 'created',
          actorId: user.id,
          after: {
            title: finding.title,
            description: finding.description,
            severity: finding.severity,
            status: finding.status,
            system: finding.system,
            assetId: finding.assetId,
            checklistItemId: finding.checklistItemId,
          },
          note: 'Opened from a checklist deviation.',
        },
        transaction,
      );
    }
    await recordHistory(
      {
        programId: item.programId,
        entityType: 'checklist-item',
        entityId: item.id,
        action: 'updated',
        actorId: user.id,
        before,
        after: itemSnapshot(item),
        note: item.title,
      },
      transaction,
    );
    return item;
  });
  return (await itemDtos(deps, [updated]))[0];
}
