import { QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize';
import { z } from 'zod';
import { campaignProgress, currentStep, projectedFinish, type ProgressStep } from '../../shared/domain/campaign';
import { condensationRisks, dewPoint, roundTo } from '../../shared/domain/dew-point';
import {
  CampaignStepsForKindSchema,
  type Campaign as CampaignDto,
  type CampaignKindValue,
  type CampaignListQuerySchema,
  type CampaignLogSchema,
  type CampaignProgressSchema,
  type CreateCampaignSchema,
  type UpdateCampaignSchema,
} from '../../shared/schemas/validation';
import { Campaign, CampaignStep, Stage } from '../db/models';
import type { Deps } from '../deps';
import { AppError, conflict, fieldError, notFound } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { visibleAsset } from './assets';
import { parseCampaignLog } from './campaign-log';
import { recordHistory } from './history';
import { assertMember } from './stages';

type ListQuery = z.output<typeof CampaignListQuerySchema>;
type CreateCampaign = z.output<typeof CreateCampaignSchema>;
type UpdateCampaign = z.output<typeof UpdateCampaignSchema>;
type ProgressInput = z.output<typeof CampaignProgressSchema>;
type LogInput = z.output<typeof CampaignLogSchema>;
type StepInput = NonNullable<UpdateCampaign['steps']>[number];

// ---- Reading ------------------------------------------------------------------------------

type CampaignRow = {
  id: string;
  program_id: string;
  asset_id: string;
  asset_tag: string;
  name: string;
  kind: CampaignKindValue;
  started_at: Date | null;
  updated_at: Date;
  version: number;
};

type StepRow = {
  id: string;
  campaign_id: string;
  name: string;
  duration_hours: number | null;
  distance_km: number | null;
  temperature_c: number | null;
  humidity_pct: number | null;
  route: string | null;
  done_hours: number;
  done_km: number;
};

/** Campaigns with their asset tag and steps, in two statements however many there are. */
async function selectCampaigns(deps: Deps, where: string, bind: unknown[], asOf: Date, transaction?: Transaction): Promise<CampaignDto[]> {
  const campaigns = await deps.sequelize.query<CampaignRow>(
    `SELECT c.id, c.program_id, c.asset_id, a.tag AS asset_tag, c.name, c.kind, c.started_at, c.updated_at, c.version
       FROM campaigns c JOIN assets a ON a.id = c.asset_id
      WHERE ${where}
      ORDER BY a.tag, c.created_at, c.id`,
    { bind, type: QueryTypes.SELECT, transaction },
  );
  if (!campaigns.length) return [];
  const steps = await deps.sequelize.query<StepRow>(
    `SELECT id, campaign_id, name, duration_hours, distance_km, temperature_c, humidity_pct, route, done_hours, done_km
       FROM campaign_steps WHERE campaign_id = ANY($1::uuid[]) ORDER BY campaign_id, position, id`,
    { bind: [campaigns.map((c) => c.id)], type: QueryTypes.SELECT, transaction },
  );
  const byCampaign = new Map<string, StepRow[]>();
  for (const s of steps) byCampaign.set(s.campaign_id, [...(byCampaign.get(s.campaign_id) ?? []), s]);
  return campaigns.map((c) => toDto(c, byCampaign.get(c.id) ?? [], asOf));
}

function toDto(c: CampaignRow, rows: StepRow[], asOf: Date): CampaignDto {
  const steps: ProgressStep[] = rows.map((s) => ({
    id: s.id,
    name: s.name,
    durationHours: s.duration_hours,
    distanceKm: s.distance_km,
    doneHours: s.done_hours,
    doneKm: s.done_km,
  }));
  const risks = condensationRisks(rows.map((s) => ({ name: s.name, temperatureC: s.temperature_c, humidityPct: s.humidity_pct })));
  const progress = campaignProgress(c.kind, steps);
  return {
    id: c.id,
    programId: c.program_id,
    assetId: c.asset_id,
    assetTag: c.asset_tag,
    name: c.name,
    kind: c.kind,
    startedAt: c.started_at ? c.started_at.toISOString() : null,
    steps: rows.map((s, i) => ({
      id: s.id,
      name: s.name,
      durationHours: s.duration_hours,
      distanceKm: s.distance_km,
      temperatureC: s.temperature_c,
      humidityPct: s.humidity_pct,
      route: s.route,
      doneHours: s.done_hours,
      doneKm: s.done_km,
      dewPointC: s.temperature_c !== null && s.humidity_pct !== null ? roundTo(dewPoint(s.temperature_c, s.humidity_pct), 2) : null,
      condensationRisk: risks[i],
    })),
    progress,
    currentStep: currentStep(c.kind, steps),
    projectedFinish: projectedFinish(progress, c.started_at, asOf),
    updatedAt: c.updated_at.toISOString(),
    version: c.version,
  };
}

const campaignDto = async (deps: Deps, id: string, asOf: Date, transaction?: Transaction) =>
  (await selectCampaigns(deps, 'c.id = $1', [id], asOf, transaction))[0];

/** The campaign when the user belongs to its program; otherwise 404, never 403. */
async function visibleCampaign(user: SessionUser, id: string, transaction?: Transaction, lock = false): Promise<Campaign> {
  const campaign = await Campaign.findByPk(id, { transaction, ...(lock && transaction ? { lock: transaction.LOCK.UPDATE } : {}) });
  if (!campaign || !user.programIds.includes(campaign.programId)) throw notFound('This campaign');
  return campaign;
}

export async function getCampaign(deps: Deps, user: SessionUser, id: string, asOf = new Date()): Promise<CampaignDto> {
  const campaign = await visibleCampaign(user, id);
  return campaignDto(deps, campaign.id, asOf);
}

export async function listAssetCampaigns(deps: Deps, user: SessionUser, assetId: string, asOf = new Date()) {
  const asset = await visibleAsset(user, assetId);
  return { campaigns: await selectCampaigns(deps, 'c.asset_id = $1', [asset.id], asOf) };
}

/** Every campaign of a program (optionally of the assets now on one stage), for the plan view. */
export async function listProgramCampaigns(deps: Deps, user: SessionUser, q: ListQuery, asOf = new Date()) {
  assertMember(user, q.programId, 'This program');
  if (q.stageId) {
    const stage = await Stage.findByPk(q.stageId);
    if (!stage || stage.programId !== q.programId) throw notFound('This stage');
    return { campaigns: await selectCampaigns(deps, 'c.program_id = $1 AND a.stage_id = $2', [q.programId, q.stageId], asOf) };
  }
  return { campaigns: await selectCampaigns(deps, 'c.program_id = $1', [q.programId], asOf) };
}

// ---- Writing ------------------------------------------------------------------------------

const stepFields = (s: StepInput) => ({
  name: s.name,
  durationHours: s.durationHours ?? null,
  distanceKm: s.distanceKm ?? null,
  temperatureC: s.temperatureC ?? null,
  humidityPct: s.humidityPct ?? null,
  route: s.route ?? null,
});

/** What the history keeps of a campaign. */
function snapshot(c: Campaign, steps: CampaignStep[]) {
  return {
    name: c.name,
    kind: c.kind,
    startedAt: c.startedAt ? c.startedAt.toISOString() : null,
    steps: steps.map((s) => ({ id: s.id, ...stepFields(s), doneHours: s.doneHours, doneKm: s.doneKm })),
  };
}

const stepsOf = (campaignId: string, transaction: Transaction) =>
  CampaignStep.findAll({ where: { campaignId }, order: [['position', 'ASC'], ['id', 'ASC']], transaction, lock: transaction.LOCK.UPDATE });

/** Resolves the asset first, so that another program's asset answers 404 whatever the body holds. */
export async function assertCampaignAsset(user: SessionUser, assetId: string) {
  await visibleAsset(user, assetId);
}

export async function createCampaign(deps: Deps, user: SessionUser, assetId: string, input: CreateCampaign, asOf = new Date()): Promise<CampaignDto> {
  return deps.sequelize.transaction(async (transaction) => {
    const asset = await visibleAsset(user, assetId, transaction);
    const campaign = await Campaign.create(
      {
        programId: asset.programId,
        assetId: asset.id,
        name: input.name,
        kind: input.kind,
        startedAt: input.startedAt ? new Date(input.startedAt) : null,
        createdBy: user.id,
      },
      { transaction },
    );
    const steps = await CampaignStep.bulkCreate(
      input.steps.map((s, position) => ({ campaignId: campaign.id, position, ...stepFields(s) })),
      { transaction, returning: true },
    );
    await recordHistory(
      {
        programId: campaign.programId,
        entityType: 'campaign',
        entityId: campaign.id,
        action: 'created',
        actorId: user.id,
        after: { ...snapshot(campaign, steps), assetId: asset.id, assetTag: asset.tag },
      },
      transaction,
    );
    return campaignDto(deps, campaign.id, asOf, transaction);
  });
}

async function lockForChange(deps: Deps, user: SessionUser, id: string, version: number | undefined, asOf: Date, transaction: Transaction) {
  const campaign = await visibleCampaign(user, id, transaction, true);
  if (version !== undefined && campaign.version !== version) {
    throw conflict('Someone else changed this campaign first.', await campaignDto(deps, campaign.id, asOf, transaction));
  }
  return campaign;
}

/** Name, start time and the step list (the whole list in order: steps left out are removed, steps with an id keep what was done). */
export async function updateCampaign(deps: Deps, user: SessionUser, id: string, input: UpdateCampaign, asOf = new Date()): Promise<CampaignDto> {
  try {
    return await deps.sequelize.transaction(async (transaction) => {
      const campaign = await lockForChange(deps, user, id, input.version, asOf, transaction);
      const existing = await stepsOf(campaign.id, transaction);
      const before = snapshot(campaign, existing);
      if (input.name !== undefined) campaign.name = input.name;
      if (input.startedAt !== undefined) campaign.startedAt = input.startedAt ? new Date(input.startedAt) : null;
      let steps = existing;
      if (input.steps) {
        CampaignStepsForKindSchema.parse({ kind: campaign.kind, steps: input.steps });
        const byId = new Map(existing.map((s) => [s.id, s]));
        input.steps.forEach((s, i) => {
          if (s.id && !byId.has(s.id)) throw fieldError(`steps.${i}.id`, 'This step is not in this campaign.');
        });
        const kept = new Set(input.steps.map((s) => s.id).filter((v): v is string => !!v));
        const removed = existing.filter((s) => !kept.has(s.id)).map((s) => s.id);
        if (removed.length) await CampaignStep.destroy({ where: { id: removed }, transaction });
        // Names are unique per campaign: park the kept ones on their ids first, so two steps can swap names.
        if (kept.size) {
          await deps.sequelize.query(`UPDATE campaign_steps SET name = id::text WHERE id = ANY($1::uuid[])`, { bind: [[...kept]], transaction });
        }
        steps = [];
        for (const [position, s] of input.steps.entries()) {
          const row = s.id ? byId.get(s.id)! : null;
          if (row) {
            await row.reload({ transaction });
            row.set({ position, ...stepFields(s) });
            await row.save({ transaction });
            steps.push(row);
          } else {
            steps.push(await CampaignStep.create({ campaignId: campaign.id, position, ...stepFields(s) }, { transaction }));
          }
        }
      }
      campaign.changed('updatedAt', true);
      await campaign.save({ transaction });
      await recordHistory(
        { programId: campaign.programId, entityType: 'campaign', entityId: campaign.id, action: 'updated', actorId: user.id, before, after: snapshot(campaign, steps) },
        transaction,
      );
      return campaignDto(deps, campaign.id, asOf, transaction);
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError) throw fieldError('steps', 'Two steps have the same name.');
    throw err;
  }
}

/** Sets a step's totals (hours and/or km done so far); the first progress starts the campaign's clock. */
export async function recordProgress(deps: Deps, user: SessionUser, id: string, input: ProgressInput, asOf = new Date()): Promise<CampaignDto> {
  return deps.sequelize.transaction(async (transaction) => {
    const campaign = await lockForChange(deps, user, id, input.version, asOf, transaction);
    const step = await CampaignStep.findOne({ where: { id: input.stepId, campaignId: campaign.id }, transaction, lock: transaction.LOCK.UPDATE });
    if (!step) throw fieldError('stepId', 'This step is not in this campaign.');
    const before = { stepId: step.id, step: step.name, doneHours: step.doneHours, doneKm: step.doneKm };
    if (input.doneHours !== undefined) step.doneHours = input.doneHours;
    if (input.doneKm !== undefined) step.doneKm = input.doneKm;
    if (step.doneHours === before.doneHours && step.doneKm === before.doneKm) return campaignDto(deps, campaign.id, asOf, transaction);
    await step.save({ transaction });
    if (!campaign.startedAt && (step.doneHours > 0 || step.doneKm > 0)) campaign.startedAt = asOf;
    campaign.changed('updatedAt', true);
    await campaign.save({ transaction });
    await recordHistory(
      {
        programId: campaign.programId,
        entityType: 'campaign',
        entityId: campaign.id,
        action: 'progress',
        actorId: user.id,
        before,
        after: { stepId: step.id, step: step.name, doneHours: step.doneHours, doneKm: step.doneKm },
      },
      transaction,
    );
    return campaignDto(deps, campaign.id, asOf, transaction);
  });
}

/**
 * Imports a run log (see parseCampaignLog): every row adds its hours and km to its step. Any bad
 * row refuses the whole log with 400, listing each bad line; nothing is half-applied.
 */
export async function importLog(deps: Deps, user: SessionUser, id: string, input: LogInput, asOf = new Date()): Promise<CampaignDto> {
  return deps.sequelize.transaction(async (transaction) => {
    const campaign = await lockForChange(deps, user, id, input.version, asOf, transaction);
    const steps = await stepsOf(campaign.id, transaction);
    const { entries, errors } = parseCampaignLog(input.csv, steps);
    if (errors.length) {
      const shown = errors.slice(0, 5).map((e) => `line ${e.line}: ${e.message}`);
      const more = errors.length > 5 ? ` (and ${errors.length - 5} more)` : '';
      throw new AppError(400, 'campaign/log-invalid', `csv: ${shown.join(' ')}${more} Nothing was recorded.`, {
        fields: { csv: `${errors.length} bad ${errors.length === 1 ? 'row' : 'rows'}; nothing was recorded.` },
        lines: errors.slice(0, 200),
      });
    }
    const totals = new Map<string, { hours: number; km: number }>();
    for (const e of entries) {
      const t = totals.get(e.stepId) ?? { hours: 0, km: 0 };
      totals.set(e.stepId, { hours: t.hours + e.hours, km: t.km + e.km });
    }
    const before = steps.map((s) => ({ stepId: s.id, step: s.name, doneHours: s.doneHours, doneKm: s.doneKm }));
    for (const s of steps) {
      const t = totals.get(s.id);
      if (!t) continue;
      // Three decimals: a log of many 0.1 h rows adds up to what it says.
      s.doneHours = Math.round((s.doneHours + t.hours) * 1000) / 1000;
      s.doneKm = Math.round((s.doneKm + t.km) * 1000) / 1000;
      await s.save({ transaction });
    }
    if (!campaign.startedAt) campaign.startedAt = asOf;
    campaign.changed('updatedAt', true);
    await campaign.save({ transaction });
    await recordHistory(
      {
        programId: campaign.programId,
        entityType: 'campaign',
        entityId: campaign.id,
        action: 'log-imported',
        actorId: user.id,
        before: { steps: before.filter((b) => totals.has(b.stepId)) },
        after: { steps: steps.filter((s) => totals.has(s.id)).map((s) => ({ stepId: s.id, step: s.name, doneHours: s.doneHours, doneKm: s.doneKm })) },
        note: `${entries.length} log ${entries.length === 1 ? 'row' : 'rows'}`,
      },
      transaction,
    );
    return campaignDto(deps, campaign.id, asOf, transaction);
  });
}
