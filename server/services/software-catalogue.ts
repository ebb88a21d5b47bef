import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { z } from 'zod';
import { targetChange } from '../../shared/domain/software';
import type {
  Baseline as BaselineDto,
  BaselineDiff,
  BaselineListQuerySchema,
  BaselineStatus,
  BaselineSummary,
  CompatibilityRuleDto,
  CreateBaselineSchema,
  CreateEcuSchema,
  Ecu as EcuDto,
  ReleaseBaselineSchema,
  UpdateBaselineSchema,
  UpdateEcuSchema,
} from '../../shared/schemas/software';
import { Baseline, BaselineRule, BaselineTarget, Ecu, Stage } from '../db/models';
import type { Deps } from '../deps';
import { AppError, conflict, notFound } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { recordHistory } from './history';
import { fieldError, loadEcus, type EcuRow } from './software-common';
import { assertMember } from './stages';

type CreateEcu = z.output<typeof CreateEcuSchema>;
type UpdateEcu = z.output<typeof UpdateEcuSchema>;
type CreateBaseline = z.output<typeof CreateBaselineSchema>;
type UpdateBaseline = z.output<typeof UpdateBaselineSchema>;
type ReleaseBaseline = z.output<typeof ReleaseBaselineSchema>;
type BaselineListQuery = z.output<typeof BaselineListQuerySchema>;
type TargetInput = NonNullable<CreateBaseline['targets']>[number];
type RuleInput = NonNullable<CreateBaseline['rules']>[number];

// ---- ECU catalogue ------------------------------------------------------------------------

export function toEcuDto(e: EcuRow | Ecu): EcuDto {
  return {
    id: e.id,
    programId: e.programId,
    name: e.name,
    code: e.code,
    supplier: e.supplier,
    assetKinds: e.assetKinds,
    stageIds: e.stageIds,
    notes: e.notes,
    version: e.version,
    updatedAt: e.updatedAt.toISOString(),
  };
}

export async function listEcus(deps: Deps, user: SessionUser, programId: string) {
  assertMember(user, programId, 'This program');
  return { items: (await loadEcus(deps, programId)).map(toEcuDto) };
}

async function assertStagesOf(programId: string, stageIds: string[], transaction: Transaction) {
  if (!stageIds.length) return;
  const found = await Stage.count({ where: { id: stageIds, programId }, transaction });
  if (found !== stageIds.length) throw fieldError('stageIds', "Choose stages of this ECU's program.");
}

const codeTaken = (code: string) => fieldError('code', `Another ECU of this program has the code ${code}.`, 'ecu/code-taken', 409);

async function guardCode<T>(code: string | undefined, work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (err) {
    if (err instanceof UniqueConstraintError && code) throw codeTaken(code);
    throw err;
  }
}

async function assertCodeFree(programId: string, code: string, exceptId: string | null, transaction: Transaction) {
  const clash = await Ecu.findOne({ attributes: ['id'], where: { programId, code }, transaction });
  if (clash && clash.id !== exceptId) throw codeTaken(code);
}

export async function createEcu(deps: Deps, user: SessionUser, input: CreateEcu) {
  assertMember(user, input.programId, 'This program');
  return guardCode(input.code, () =>
    deps.sequelize.transaction(async (transaction) => {
      await assertStagesOf(input.programId, input.stageIds, transaction);
      await assertCodeFree(input.programId, input.code, null, transaction);
      const ecu = await Ecu.create({ ...input }, { transaction });
      const dto = toEcuDto(ecu);
      await recordHistory({ programId: ecu.programId, entityType: 'ecu', entityId: ecu.id, action: 'created', actorId: user.id, after: dto }, transaction);
      return dto;
    }),
  );
}

export async function updateEcu(deps: Deps, user: SessionUser, id: string, input: UpdateEcu) {
  return guardCode(input.code, () =>
    deps.sequelize.transaction(async (transaction) => {
      const ecu = await Ecu.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE });
      if (!ecu || !user.programIds.includes(ecu.programId)) throw notFound('This ECU');
      const before = toEcuDto(ecu);
      if (ecu.version !== input.version) throw conflict('Someone else changed this ECU first.', before);
      if (input.code !== undefined && input.code !== ecu.code) {
        await assertCodeFree(ecu.programId, input.code, ecu.id, transaction);
        ecu.code = input.code;
      }
      if (input.stageIds !== undefined) {
        await assertStagesOf(ecu.programId, input.stageIds, transaction);
        ecu.stageIds = input.stageIds;
      }
      if (input.name !== undefined) ecu.name = input.name;
      if (input.supplier !== undefined) ecu.supplier = input.supplier;
      if (input.assetKinds !== undefined) ecu.assetKinds = input.assetKinds;
      if (input.notes !== undefined) ecu.notes = input.notes;
      ecu.changed('updatedAt', true);
      await ecu.save({ transaction });
      const after = toEcuDto(ecu);
      await recordHistory({ programId: ecu.programId, entityType: 'ecu', entityId: ecu.id, action: 'updated', actorId: user.id, before, after }, transaction);
      return after;
    }),
  );
}

// ---- Baselines ----------------------------------------------------------------------------

type BaselineRow = {
  id: string;
  program_id: string;
  stage_id: string;
  stage: string;
  name: string;
  release_label: string;
  date: string;
  status: BaselineStatus;
  notes: string;
  released_at: Date | null;
  released_by: string | null;
  released_by_name: string | null;
  superseded_at: Date | null;
  superseded_by_id: string | null;
  version: number;
  updated_at: Date;
  targets: BaselineDto['targets'];
  rules: CompatibilityRuleDto[];
};

const BASELINE_SELECT = `
  SELECT b.id, b.program_id, b.stage_id, s.name AS stage, b.name, b.release_label, b.date::text AS date, b.status, b.notes,
         b.released_at, b.released_by, u.name AS released_by_name, b.superseded_at, b.superseded_by_id, b.version, b.updated_at,
         coalesce((SELECT json_agg(json_build_object('ecuId', e.id, 'ecuCode', e.code, 'ecuName', e.name, 'version', t.version) ORDER BY e.code)
                     FROM baseline_targets t JOIN ecus e ON e.id = t.ecu_id WHERE t.baseline_id = b.id), '[]') AS targets,
         coalesce((SELECT json_agg(json_build_object('id', r.id, 'whenEcuId', r.when_ecu_id, 'whenEcuCode', we.code,
                                                     'whenMinVersion', r.when_min_version, 'thenEcuId', r.then_ecu_id,
                                                     'thenEcuCode', te.code, 'range', r.range, 'note', r.note) ORDER BY r.position)
                     FROM baseline_rules r JOIN ecus we ON we.id = r.when_ecu_id JOIN ecus te ON te.id = r.then_ecu_id
                    WHERE r.baseline_id = b.id), '[]') AS rules
    FROM baselines b
    JOIN stages s ON s.id = b.stage_id
    LEFT JOIN users u ON u.id = b.released_by`;

function toBaselineDto(r: BaselineRow): BaselineDto {
  return {
    id: r.id,
    programId: r.program_id,
    stageId: r.stage_id,
    stage: r.stage,
    name: r.name,
    releaseLabel: r.release_label,
    date: r.date,
    status: r.status,
    notes: r.notes,
    targets: r.targets,
    rules: r.rules,
    releasedAt: r.released_at ? r.released_at.toISOString() : null,
    releasedBy: r.released_by ? { id: r.released_by, name: r.released_by_name ?? '' } : null,
    supersededAt: r.superseded_at ? r.superseded_at.toISOString() : null,
    supersededById: r.superseded_by_id,
    version: r.version,
    updatedAt: r.updated_at.toISOString(),
  };
}

export function toBaselineSummary(b: BaselineDto): BaselineSummary {
  const { targets, rules, ...rest } = b;
  return { ...rest, targetCount: targets.length, ruleCount: rules.length };
}

async function baselineDto(deps: Deps, id: string, transaction?: Transaction): Promise<BaselineDto> {
  const [row] = await deps.sequelize.query<BaselineRow>(`${BASELINE_SELECT} WHERE b.id = $1`, { bind: [id], type: QueryTypes.SELECT, transaction });
  return toBaselineDto(row);
}

/** The baseline when the user belongs to its program; otherwise 404. */
async function visibleBaseline(user: SessionUser, id: string, transaction?: Transaction, lock = false): Promise<Baseline> {
  const baseline = await Baseline.findByPk(id, { transaction, ...(lock && transaction ? { lock: transaction.LOCK.UPDATE } : {}) });
  if (!baseline || !user.programIds.includes(baseline.programId)) throw notFound('This baseline');
  return baseline;
}

export async function listBaselines(deps: Deps, user: SessionUser, q: BaselineListQuery): Promise<{ items: BaselineSummary[] }> {
  assertMember(user, q.programId, 'This program');
  const rows = await deps.sequelize.query<BaselineRow>(
    `${BASELINE_SELECT}
      WHERE b.program_id = $1 AND ($2::uuid IS NULL OR b.stage_id = $2::uuid) AND ($3::enum_baselines_status IS NULL OR b.status = $3::enum_baselines_status)
      ORDER BY s.position, b.date DESC, b.created_at DESC, b.id`,
    { bind: [q.programId, q.stageId ?? null, q.status ?? null], type: QueryTypes.SELECT },
  );
  return { items: rows.map((r) => toBaselineSummary(toBaselineDto(r))) };
}

export async function getBaseline(deps: Deps, user: SessionUser, id: string) {
  const baseline = await visibleBaseline(user, id);
  return baselineDto(deps, baseline.id);
}

const readOnly = (b: Baseline) =>
  new AppError(
    409,
    'baseline/read-only',
    `"${b.name}" is ${b.status}: a released baseline cannot be changed. Start a new draft from it instead.`,
    { status: b.status },
  );

/** Refuses targets and rules that name ECUs outside the program's catalogue. */
function checkEcus(ecuIds: ReadonlySet<string>, targets: TargetInput[] | undefined, rules: RuleInput[] | undefined) {
  targets?.forEach((t, i) => {
    if (!ecuIds.has(t.ecuId.toLowerCase())) throw fieldError(`targets.${i}.ecuId`, "Choose an ECU of this program's catalogue.");
  });
  rules?.forEach((r, i) => {
    for (const field of ['whenEcuId', 'thenEcuId'] as const) {
      if (!ecuIds.has(r[field].toLowerCase())) throw fieldError(`rules.${i}.${field}`, "Choose an ECU of this program's catalogue.");
    }
  });
}

async function writeTargetsAndRules(baselineId: string, targets: TargetInput[] | undefined, rules: RuleInput[] | undefined, transaction: Transaction) {
  if (targets) {
    await BaselineTarget.destroy({ where: { baselineId }, transaction });
    if (targets.length) {
      await BaselineTarget.bulkCreate(targets.map((t) => ({ baselineId, ecuId: t.ecuId.toLowerCase(), version: t.version })), { transaction });
    }
  }
  if (rules) {
    await BaselineRule.destroy({ where: { baselineId }, transaction });
    if (rules.length) {
      await BaselineRule.bulkCreate(
        rules.map((r, position) => ({
          baselineId,
          position,
          whenEcuId: r.whenEcuId.toLowerCase(),
          whenMinVersion: r.whenMinVersion,
          thenEcuId: r.thenEcuId.toLowerCase(),
          range: r.range,
          note: r.note,
        })),
        { transaction },
      );
    }
  }
}

export async function createBaseline(deps: Deps, user: SessionUser, input: CreateBaseline) {
  assertMember(user, input.programId, 'This program');
  return deps.sequelize.transaction(async (transaction) => {
    const stage = await Stage.findByPk(input.stageId, { transaction });
    if (!stage || stage.programId !== input.programId) throw fieldError('stageId', 'Choose a stage of this program.');
    let targets = input.targets;
    let rules = input.rules;
    if (input.copyFromId) {
      const source = await Baseline.findByPk(input.copyFromId, { transaction });
      if (!source || source.programId !== input.programId) throw fieldError('copyFromId', 'Choose a baseline of this program to start from.');
      const copy = await baselineDto(deps, source.id, transaction);
      targets ??= copy.targets.map((t) => ({ ecuId: t.ecuId, version: t.version }));
      rules ??= copy.rules.map((r) => ({ whenEcuId: r.whenEcuId, whenMinVersion: r.whenMinVersion, thenEcuId: r.thenEcuId, range: r.range, note: r.note }));
    }
    const ecuIds = new Set((await loadEcus(deps, input.programId, transaction)).map((e) => e.id));
    checkEcus(ecuIds, targets, rules);
    const baseline = await Baseline.create(
      {
        programId: input.programId,
        stageId: stage.id,
        name: input.name,
        releaseLabel: input.releaseLabel,
        date: input.date,
        notes: input.notes,
        createdBy: user.id,
      },
      { transaction },
    );
    await writeTargetsAndRules(baseline.id, targets ?? [], rules ?? [], transaction);
    const dto = await baselineDto(deps, baseline.id, transaction);
    await recordHistory(
      { programId: baseline.programId, entityType: 'baseline', entityId: baseline.id, action: 'created', actorId: user.id, after: dto, note: input.copyFromId ? `Copied from ${input.copyFromId}.` : null },
      transaction,
    );
    return dto;
  });
}

export async function updateBaseline(deps: Deps, user: SessionUser, id: string, input: UpdateBaseline) {
  return deps.sequelize.transaction(async (transaction) => {
    const baseline = await visibleBaseline(user, id, transaction, true);
    if (baseline.status !== 'draft') throw readOnly(baseline);
    const before = await baselineDto(deps, baseline.id, transaction);
    if (baseline.version !== input.version) throw conflict('Someone else changed this baseline first.', before);
    if (input.targets || input.rules) {
      const ecuIds = new Set((await loadEcus(deps, baseline.programId, transaction)).map((e) => e.id));
      checkEcus(ecuIds, input.targets, input.rules);
    }
    if (input.name !== undefined) baseline.name = input.name;
    if (input.releaseLabel !== undefined) baseline.releaseLabel = input.releaseLabel;
    if (input.date !== undefined) baseline.date = input.date;
    if (input.notes !== undefined) baseline.notes = input.notes;
    await writeTargetsAndRules(baseline.id, input.targets, input.rules, transaction);
    baseline.changed('updatedAt', true);
    await baseline.save({ transaction });
    const after = await baselineDto(deps, baseline.id, transaction);
    await recordHistory({ programId: baseline.programId, entityType: 'baseline', entityId: baseline.id, action: 'updated', actorId: user.id, before, after }, transaction);
    return after;
  });
}

/**
 * Releases a draft: it becomes the stage's baseline, read-only from now on, and the baseline
 * released before it on the same stage becomes superseded, in one transaction.
 */
export async function releaseBaseline(deps: Deps, user: SessionUser, id: string, input: ReleaseBaseline) {
  return deps.sequelize.transaction(async (transaction) => {
    const found = await visibleBaseline(user, id, transaction);
    // Serialises releases of one stage (the unique index would refuse a second one anyway).
    await deps.sequelize.query('SELECT id FROM stages WHERE id = $1 FOR UPDATE', { bind: [found.stageId], transaction });
    const baseline = (await Baseline.findByPk(id, { transaction, lock: transaction.LOCK.UPDATE }))!;
    if (baseline.status !== 'draft') throw readOnly(baseline);
    if (baseline.version !== input.version) throw conflict('Someone else changed this baseline first.', await baselineDto(deps, baseline.id, transaction));
    const targets = await BaselineTarget.count({ where: { baselineId: baseline.id }, transaction });
    if (!targets) throw fieldError('targets', 'Give at least one ECU a target version before releasing.', 'baseline/empty');
    const now = new Date();
    const previous = await Baseline.findAll({ where: { stageId: baseline.stageId, status: 'released' }, transaction, lock: transaction.LOCK.UPDATE });
    for (const old of previous) {
      const before = { status: old.status };
      old.status = 'superseded';
      old.supersededAt = now;
      old.supersededById = baseline.id;
      await old.save({ transaction });
      await recordHistory(
        { programId: old.programId, entityType: 'baseline', entityId: old.id, action: 'superseded', actorId: user.id, before, after: { status: old.status, supersededById: baseline.id } },
        transaction,
      );
    }
    baseline.status = 'released';
    baseline.releasedAt = now;
    baseline.releasedBy = user.id;
    await baseline.save({ transaction });
    await recordHistory(
      {
        programId: baseline.programId,
        entityType: 'baseline',
        entityId: baseline.id,
        action: 'released',
        actorId: user.id,
        before: { status: 'draft' },
        after: { status: 'released', superseded: previous.map((p) => p.id) },
      },
      transaction,
    );
    return baselineDto(deps, baseline.id, transaction);
  });
}

export async function deleteBaseline(deps: Deps, user: SessionUser, id: string) {
  await deps.sequelize.transaction(async (transaction) => {
    const baseline = await visibleBaseline(user, id, transaction, true);
    if (baseline.status !== 'draft') throw readOnly(baseline);
    const before = await baselineDto(deps, baseline.id, transaction);
    await baseline.destroy({ transaction });
    await recordHistory({ programId: baseline.programId, entityType: 'baseline', entityId: baseline.id, action: 'deleted', actorId: user.id, before }, transaction);
  });
}

const ruleKey = (r: CompatibilityRuleDto) => `${r.whenEcuId}>${r.thenEcuId}`;

/** What changes from baseline `fromId` to baseline `toId`: targets per ECU and rules per pair of ECUs. */
export async function diffBaselines(deps: Deps, user: SessionUser, fromId: string, toId: string): Promise<BaselineDiff> {
  const [fromRow, toRow] = await Promise.all([visibleBaseline(user, fromId), visibleBaseline(user, toId)]);
  if (fromRow.programId !== toRow.programId) throw fieldError('b', 'Compare two baselines of the same program.');
  const [from, to] = await Promise.all([baselineDto(deps, fromRow.id), baselineDto(deps, toRow.id)]);
  const ecus = new Map<string, { ecuId: string; ecuCode: string; ecuName: string }>();
  for (const t of [...from.targets, ...to.targets]) ecus.set(t.ecuId, { ecuId: t.ecuId, ecuCode: t.ecuCode, ecuName: t.ecuName });
  const version = (list: BaselineDto['targets'], ecuId: string) => list.find((t) => t.ecuId === ecuId)?.version ?? null;
  const targets = [...ecus.values()]
    .sort((a, b) => a.ecuCode.localeCompare(b.ecuCode))
    .map((e) => {
      const a = version(from.targets, e.ecuId);
      const b = version(to.targets, e.ecuId);
      return { ...e, from: a, to: b, change: targetChange(a, b) };
    });
  const fromRules = new Map(from.rules.map((r) => [ruleKey(r), r]));
  const toRules = new Map(to.rules.map((r) => [ruleKey(r), r]));
  const rules: BaselineDiff['rules'] = [];
  for (const [key, r] of fromRules) {
    const next = toRules.get(key) ?? null;
    const same = next && next.whenMinVersion === r.whenMinVersion && next.range === r.range;
    rules.push({ change: !next ? 'removed' : same ? 'same' : 'changed', from: r, to: next });
  }
  for (const [key, r] of toRules) if (!fromRules.has(key)) rules.push({ change: 'added', from: null, to: r });
  return { from: toBaselineSummary(from), to: toBaselineSummary(to), targets, rules };
}
