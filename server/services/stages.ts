import { Op, QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { z } from 'zod';
import {
  DEFAULT_GATE,
  DEFAULT_STAGE_DRIVER_LEVELS,
  DEFAULT_STAGES,
  NEW_STAGE_DRIVER_LEVEL,
  type CreateStageSchema,
  type GateSettings,
  type ReorderStagesSchema,
  type Stage as StageDto,
  type TemplateItem as TemplateItemDto,
  type TemplateItemInputSchema,
  type UpdateStageSchema,
  type UpdateTemplateItemSchema,
} from '../../shared/schemas/assets';
import { Stage, TemplateItem } from '../db/models';
import type { Deps } from '../deps';
import { AppError, conflict, fieldError, notFound } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { recordHistory } from './history';

type CreateStage = z.output<typeof CreateStageSchema>;
type UpdateStage = z.output<typeof UpdateStageSchema>;
type ReorderStages = z.output<typeof ReorderStagesSchema>;
type TemplateItemInput = z.output<typeof TemplateItemInputSchema>;
type UpdateTemplateItem = z.output<typeof UpdateTemplateItemSchema>;

export function assertMember(user: SessionUser, programId: string, what: string) {
  if (!user.programIds.includes(programId)) throw notFound(what);
}

export function toStageDto(stage: Stage, assetCount: number): StageDto {
  return {
    id: stage.id,
    programId: stage.programId,
    name: stage.name,
    position: stage.position,
    retired: stage.retired,
    gate: stage.gate,
    minDriverLevel: stage.minDriverLevel,
    assetCount,
    version: stage.version,
  };
}

export function toTemplateItemDto(item: TemplateItem): TemplateItemDto {
  return {
    id: item.id,
    stageId: item.stageId,
    system: item.system,
    title: item.title,
    instructions: item.instructions,
    expectedPartNumber: item.expectedPartNumber,
    expectedRevision: item.expectedRevision,
    requiredForGate: item.requiredForGate,
    hvQualified: item.hvQualified,
    position: item.position,
    retired: item.retired,
    version: item.version,
  };
}

/** The four default stages of a new program (DEFAULT_STAGES), in the caller's transaction. */
export async function createDefaultStages(programId: string, transaction: Transaction): Promise<Stage[]> {
  return Stage.bulkCreate(
    DEFAULT_STAGES.map((name, position) => ({
      programId,
      name,
      position,
      gate: DEFAULT_GATE,
      minDriverLevel: DEFAULT_STAGE_DRIVER_LEVELS[position],
    })),
    { transaction, returning: true },
  );
}

async function assetCounts(stageIds: string[], transaction?: Transaction): Promise<Map<string, number>> {
  if (!stageIds.length) return new Map();
  const rows = await Stage.sequelize!.query<{ stage_id: string; n: number }>(
    'SELECT stage_id, count(*)::int AS n FROM assets WHERE stage_id = ANY($1::uuid[]) GROUP BY stage_id',
    { bind: [stageIds], type: QueryTypes.SELECT, transaction },
  );
  return new Map(rows.map((r) => [r.stage_id, r.n]));
}

async function stageDtos(stages: Stage[], transaction?: Transaction) {
  const counts = await assetCounts(stages.map((s) => s.id), transaction);
  return stages.map((s) => toStageDto(s, counts.get(s.id) ?? 0));
}

/** A stage the user may see, or 404 (also for a stage of another program). */
export async function visibleStage(user: SessionUser, id: string, transaction?: Transaction, lock = false): Promise<Stage> {
  const stage = await Stage.findByPk(id, { transaction, ...(lock && transaction ? { lock: transaction.LOCK.UPDATE } : {}) });
  if (!stage || !user.programIds.includes(stage.programId)) throw notFound('This stage');
  return stage;
}

export async function listStages(user: SessionUser, programId: string) {
  assertMember(user, programId, 'This program');
  const stages = await Stage.findAll({ where: { programId }, order: [['position', 'ASC'], ['createdAt', 'ASC']] });
  return { stages: await stageDtos(stages) };
}

const nameTaken = () => fieldError('name', 'Another stage of this program has this name.', 'stage/name-taken', 409);

/** Two saves racing for one name: the unique index refuses the second, answered like the check. */
async function guardName<T>(work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw nameTaken();
    throw err;
  }
}

async function assertNameFree(programId: string, name: string, exceptId: string | null, transaction: Transaction) {
  const rows = await Stage.sequelize!.query<{ id: string }>(
    'SELECT id FROM stages WHERE program_id = $1 AND lower(name) = lower($2) AND ($3::uuid IS NULL OR id <> $3::uuid)',
    { bind: [programId, name, exceptId], type: QueryTypes.SELECT, transaction },
  );
  if (rows.length) throw nameTaken();
}

function checkGate(gate: GateSettings) {
  if (gate.conditionalThreshold > gate.goThreshold) {
    throw fieldError('gate.conditionalThreshold', 'The conditional threshold cannot be above the go threshold.');
  }
  const sum = gate.weights.checklist + gate.weights.findings + gate.weights.software + gate.weights.validation;
  if (Math.abs(sum - 1) > 0.001) throw fieldError('gate.weights', `The four weights must add up to 1 (they add up to ${+sum.toFixed(3)}).`);
}

export async function createStage(deps: Deps, user: SessionUser, input: CreateStage) {
  assertMember(user, input.programId, 'This program');
  return guardName(() => deps.sequelize.transaction(async (transaction) => {
    // Serialises stage changes of one program (positions are computed from the others).
    await deps.sequelize.query('SELECT id FROM programs WHERE id = $1 FOR UPDATE', { bind: [input.programId], transaction });
    await assertNameFree(input.programId, input.name, null, transaction);
    const last = (await Stage.max('position', { where: { programId: input.programId }, transaction })) as number | null;
    const stage = await Stage.create(
      { programId: input.programId, name: input.name, position: (last ?? -1) + 1, gate: DEFAULT_GATE, minDriverLevel: NEW_STAGE_DRIVER_LEVEL },
      { transaction },
    );
    const dto = toStageDto(stage, 0);
    await recordHistory(
      { programId: stage.programId, entityType: 'stage', entityId: stage.id, action: 'created', actorId: user.id, after: dto },
      transaction,
    );
    return dto;
  }));
}

export async function updateStage(deps: Deps, user: SessionUser, id: string, input: UpdateStage) {
  return guardName(() => deps.sequelize.transaction(async (transaction) => {
    const stage = await visibleStage(user, id, transaction, true);
    const [before] = await stageDtos([stage], transaction);
    if (stage.version !== input.version) throw conflict('Someone else changed this stage first.', before);
    if (input.name !== undefined && input.name !== stage.name) {
      await assertNameFree(stage.programId, input.name, stage.id, transaction);
      stage.name = input.name;
    }
    if (input.gate) {
      checkGate(input.gate);
      stage.gate = input.gate;
    }
    if (input.retired !== undefined) stage.retired = input.retired;
    if (input.minDriverLevel !== undefined) stage.minDriverLevel = input.minDriverLevel;
    stage.changed('updatedAt', true);
    await stage.save({ transaction });
    const [after] = await stageDtos([stage], transaction);
    const action = input.retired === true && !before.retired ? 'retired' : input.retired === false && before.retired ? 'restored' : 'updated';
    await recordHistory({ programId: stage.programId, entityType: 'stage', entityId: stage.id, action, actorId: user.id, before, after }, transaction);
    return after;
  }));
}

export async function reorderStages(deps: Deps, user: SessionUser, input: ReorderStages) {
  assertMember(user, input.programId, 'This program');
  return deps.sequelize.transaction(async (transaction) => {
    await deps.sequelize.query('SELECT id FROM programs WHERE id = $1 FOR UPDATE', { bind: [input.programId], transaction });
    const stages = await Stage.findAll({ where: { programId: input.programId }, order: [['position', 'ASC']], transaction });
    const ids = new Set(stages.map((s) => s.id));
    const given = input.stageIds.map((s) => s.toLowerCase());
    if (given.length !== ids.size || new Set(given).size !== given.length || given.some((s) => !ids.has(s))) {
      throw fieldError('stageIds', 'List every stage of the program exactly once.');
    }
    const before = stages.map((s) => s.id);
    // Only the stages whose position changes get a new version.
    await deps.sequelize.query(
      `UPDATE stages s SET position = o.n - 1, version = s.version + 1, updated_at = now()
         FROM unnest($1::uuid[]) WITH ORDINALITY AS o(id, n)
        WHERE s.id = o.id AND s.position <> o.n - 1`,
      { bind: [given], transaction },
    );
    await recordHistory(
      { programId: input.programId, entityType: 'program', entityId: input.programId, action: 'stages-reordered', actorId: user.id, before: { stageIds: before }, after: { stageIds: given } },
      transaction,
    );
    const after = await Stage.findAll({ where: { programId: input.programId }, order: [['position', 'ASC']], transaction });
    return { stages: await stageDtos(after, transaction) };
  });
}

export async function deleteStage(deps: Deps, user: SessionUser, id: string) {
  await deps.sequelize.transaction(async (transaction) => {
    const stage = await visibleStage(user, id, transaction, true);
    const [use] = await deps.sequelize.query<{ assets: number; visits: number }>(
      `SELECT (SELECT count(*)::int FROM assets WHERE stage_id = $1) AS assets,
              (SELECT count(*)::int FROM stage_visits WHERE stage_id = $1) AS visits`,
      { bind: [stage.id], type: QueryTypes.SELECT, transaction },
    );
    if (use.assets > 0 || use.visits > 0) {
      const why = use.assets > 0 ? `${use.assets} asset${use.assets === 1 ? ' is' : 's are'} on it` : 'assets have passed through it';
      throw new AppError(409, 'stage/in-use', `The stage "${stage.name}" cannot be deleted because ${why}. Retire it instead.`, {
        assets: use.assets,
        visits: use.visits,
      });
    }
    const [before] = await stageDtos([stage], transaction);
    await stage.destroy({ transaction });
    // Close the gap in positions.
    await deps.sequelize.query('UPDATE stages SET position = position - 1 WHERE program_id = $1 AND position > $2', {
      bind: [stage.programId, stage.position],
      transaction,
    });
    await recordHistory({ programId: stage.programId, entityType: 'stage', entityId: stage.id, action: 'deleted', actorId: user.id, before }, transaction);
  });
}

// ---- Checklist templates ------------------------------------------------------------------

export async function getTemplate(user: SessionUser, stageId: string) {
  const stage = await visibleStage(user, stageId);
  const items = await TemplateItem.findAll({ where: { stageId: stage.id }, order: [['position', 'ASC'], ['createdAt', 'ASC']] });
  return { stageId: stage.id, items: items.map(toTemplateItemDto) };
}

export async function addTemplateItem(deps: Deps, user: SessionUser, stageId: string, input: TemplateItemInput) {
  return deps.sequelize.transaction(async (transaction) => {
    const stage = await visibleStage(user, stageId, transaction, true);
    const last = (await TemplateItem.max('position', { where: { stageId: stage.id }, transaction })) as number | null;
    const item = await TemplateItem.create({ ...input, programId: stage.programId, stageId: stage.id, position: (last ?? -1) + 1 }, { transaction });
    const dto = toTemplateItemDto(item);
    await recordHistory({ programId: stage.programId, entityType: 'template-item', entityId: item.id, action: 'created', actorId: user.id, after: dto }, transaction);
    return dto;
  });
}

export async function updateTemplateItem(deps: Deps, user: SessionUser, id: string, input: UpdateTemplateItem) {
  return deps.sequelize.transaction(async (transaction) => {
    const found = await TemplateItem.findByPk(id, { transaction });
    if (!found || !user.programIds.includes(found.programId)) throw notFound('This checklist item');
    // Lock the stage first, then the item: the same order as adding an item.
    await visibleStage(user, found.stageId, transaction, true);
    const item = (await TemplateItem.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE }))!;
    const before = toTemplateItemDto(item);
    if (item.version !== input.version) throw conflict('Someone else changed this checklist item first.', before);
    const { version: _version, position, ...fields } = input;
    for (const [key, value] of Object.entries(fields)) {
      if (value !== undefined) item.set(key as keyof typeof fields, value as never);
    }
    if (position !== undefined && position !== item.position) {
      // Move the item to `position` among the stage's items and renumber them 0..n-1.
      const siblings = await TemplateItem.findAll({
        where: { stageId: item.stageId, id: { [Op.ne]: item.id } },
        order: [['position', 'ASC'], ['createdAt', 'ASC']],
        transaction,
      });
      const order = siblings.map((s) => s.id);
      order.splice(Math.min(position, order.length), 0, item.id);
      await deps.sequelize.query(
        `UPDATE template_items t SET position = o.n - 1, version = t.version + 1, updated_at = now()
           FROM unnest($1::uuid[]) WITH ORDINALITY AS o(id, n)
          WHERE t.id = o.id AND t.id <> $2 AND t.position <> o.n - 1`,
        { bind: [order, item.id], transaction },
      );
      item.position = order.indexOf(item.id);
    }
    item.changed('updatedAt', true);
    await item.save({ transaction });
    const after = toTemplateItemDto(item);
    await recordHistory({ programId: item.programId, entityType: 'template-item', entityId: item.id, action: 'updated', actorId: user.id, before, after }, transaction);
    return after;
  });
}
