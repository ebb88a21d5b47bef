import { QueryTypes, type Transaction } from 'sequelize';
import { isPastDueDate, utcDate } from '../../shared/domain/finding-workflow';
import {
  byLoadThenTitle,
  byText,
  computeReadiness,
  findingLoad,
  findingsLoadOf,
  rollUpStage,
  summarizeReadiness,
  type AssetFigure,
  type OffBaselineEcu,
  type ReadinessInput,
  ListedStops,
  type StopList,
} from '../../shared/domain/readiness';
import { conformance, type BaselineForConformance } from '../../shared/domain/software';
import { TREND_SERIES_DAYS, TREND_WINDOW_DAYS, addDays, fitLoadTrend, forecastStage, isoDay, meetsTarget, type LoadPoint } from '../../shared/domain/trend';
import type { AssetKind, AssetStatus, GateSettings } from '../../shared/schemas/assets';
import { CLOSED_FINDING_STATUSES, FINDING_SEVERITIES, type FindingSeverity, type FindingStatus } from '../../shared/schemas/findings';
import type {
  AssetReadiness,
  ProgramReadiness,
  ResultCounts,
  SetTargetDate,
  StageRollup,
  StageTrend,
  TargetDateResult,
} from '../../shared/schemas/readiness';
import { Stage } from '../db/models';
import type { Deps } from '../deps';
import { AppError, notFound } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { visibleAsset } from './assets';
import { recordHistory } from './history';
import { carries, loadEcus, loadReleasedBaselines } from './software-common';
import { assertMember } from './stages';
import { validationPartsForAssets, type ValidationParts } from './validation';

// Readiness is computed here, in one place, for one asset, one stage or a whole program, in a
// fixed number of statements whatever the number of assets (issue 7): the stages with their gate
// settings and target dates; the assets with their open checklist's required items counted and
// their installed software folded in; the open findings; the ECU catalogue; the released
// baselines; the validation parts (validationPartsForAssets). The pure functions in
// shared/domain/readiness do the arithmetic. The roll-up and the trend read one more: the stage
// snapshots.
//
// A roll-up (a stage or a program) needs each asset's score and what stops its gate, not the
// breakdown of each score, so its statements count in SQL what the score is made of: the
// findings per severity and due state (no finding rows), the required items passed and open
// (their titles come as unparsed text, read only for the few worst assets the blocker list
// shows). One asset's readiness reads its findings and items in full for the breakdown.

const CLOSED_SQL = CLOSED_FINDING_STATUSES.map((s) => `'${s}'`).join(', ');

export type ReadinessScope = {
  programId: string;
  assetId?: string;
  stageId?: string;
  /** Retired assets never go through a gate: the roll-up, snapshots and forecast leave them out. */
  includeRetired?: boolean;
};

export type StageInfo = { id: string; name: string; position: number; retired: boolean; gate: GateSettings; targetDate: string | null };

export type AssetResult = AssetFigure & { stageId: string; kind: AssetKind; status: AssetStatus };

export type Figures = { programId: string; asOf: Date; stages: StageInfo[]; assets: AssetResult[] };

type AssetRow = {
  id: string;
  tag: string;
  kind: AssetKind;
  stage_id: string;
  status: AssetStatus;
  required_total: number;
  required_done: number;
  /** JSON text of the open required items, unordered ([{ id, title, position }]); null when none. */
  open_required: string | null;
  cfg: string | null;
};

type OpenRequired = { id: string; title: string; position: number };

/** The open required items of an asset in checklist order (the statement leaves them unordered). */
const openRequiredOf = (text: string | null): Array<{ id: string; title: string }> =>
  text
    ? (JSON.parse(text) as OpenRequired[]).sort((x, y) => x.position - y.position || byText(x.id, y.id)).map((item) => ({ id: item.id, title: item.title }))
    : [];

/** An asset's open required items: counted in SQL, their JSON text parsed only if the blocker list reaches the asset. */
class OpenRequiredStops implements StopList<{ id: string; title: string }> {
  private parsed: Array<{ id: string; title: string }> | null = null;
  constructor(
    readonly count: number,
    private readonly text: string | null,
  ) {}
  items() {
    return (this.parsed ??= openRequiredOf(this.text));
  }
}

type Where = { bind: unknown[]; asset: string; visit: string; installed: string };

/**
 * The conditions of the scope as SQL, with their bind values. Only the conditions that apply go
 * into the statements, so the planner sees exact filters (a generic "$2 IS NULL OR ..." misleads
 * its row estimates on large programs).
 */
function scopeWhere(scope: ReadinessScope): Where {
  const bind: unknown[] = [scope.programId];
  const p = (value: unknown) => `$${bind.push(value)}`;
  const asset = ['a.program_id = $1'];
  const visit = ['v.program_id = $1', 'v.left_at IS NULL'];
  const installed = ['i.program_id = $1'];
  if (scope.assetId) {
    const id = p(scope.assetId);
    asset.push(`a.id = ${id}`);
    visit.push(`v.asset_id = ${id}`);
    installed.push(`i.asset_id = ${id}`);
  }
  if (scope.stageId) {
    const id = p(scope.stageId);
    asset.push(`a.stage_id = ${id}`);
    visit.push(`v.stage_id = ${id}`);
    installed.push(`i.asset_id IN (SELECT s.id FROM assets s WHERE s.program_id = $1 AND s.stage_id = ${id})`);
  }
  if (!scope.includeRetired) asset.push(`a.status <> 'retired'`);
  return { bind, asset: asset.join(' AND '), visit: visit.join(' AND '), installed: installed.join(' AND ') };
}

/** The statements every scope reads before its findings, and the conformance of each asset's software. */
async function readCommon(deps: Deps, scope: ReadinessScope, where: Where, transaction?: Transaction) {
  const { sequelize } = deps;
  const stageRows = await sequelize.query<{ id: string; name: string; position: number; retired: boolean; gate: GateSettings; target_date: string | null }>(
    `SELECT s.id, s.name, s.position, s.retired, s.gate, g.target_date::text AS target_date
       FROM stages s LEFT JOIN gate_target_dates g ON g.stage_id = s.id
      WHERE s.program_id = $1 ORDER BY s.position, s.id`,
    { bind: [scope.programId], type: QueryTypes.SELECT, transaction },
  );
  const stages: StageInfo[] = stageRows.map((s) => ({ id: s.id, name: s.name, position: s.position, retired: s.retired, gate: s.gate, targetDate: s.target_date }));
  // The required items' counts per asset, the open ones as JSON text (parsed only where they are read), and the installed versions.
  // RAW: the rows as pg hands them over (a SELECT query would copy each of thousands of rows once more).
  const [assetRows] = (await sequelize.query(
    `SELECT a.id, a.tag, a.kind::text AS kind, a.stage_id, a.status::text AS status,
            coalesce(ck.required_total, 0) AS required_total, coalesce(ck.required_done, 0) AS required_done,
            ck.open_required::text AS open_required, sw.cfg
       FROM assets a
       LEFT JOIN (
         SELECT v.asset_id,
                count(*) FILTER (WHERE ci.required_for_gate)::int AS required_total,
                count(*) FILTER (WHERE ci.required_for_gate AND ci.state IN ('passed', 'not-applicable'))::int AS required_done,
                json_agg(json_build_object('id', ci.id, 'title', ci.title, 'position', ci.position))
                  FILTER (WHERE ci.required_for_gate AND ci.state NOT IN ('passed', 'not-applicable')) AS open_required
           FROM stage_visits v JOIN checklist_items ci ON ci.visit_id = v.id
          WHERE ${where.visit}
          GROUP BY v.asset_id
       ) ck ON ck.asset_id = a.id
       LEFT JOIN (
         SELECT i.asset_id, json_object_agg(i.ecu_id, i.software_version ORDER BY i.ecu_id)::text AS cfg
           FROM installed_software i
          WHERE ${where.installed}
          GROUP BY i.asset_id
       ) sw ON sw.asset_id = a.id
      WHERE ${where.asset}
      ORDER BY a.tag, a.id`,
    { bind: where.bind, type: QueryTypes.RAW, transaction },
  )) as [AssetRow[], unknown];
  return { stages, assetRows };
}

/**
 * Software conformance per asset (the S part and the ECUs off the baseline), shared by the assets
 * of one stage and kind with the same installed versions. Only `conformance` itself runs per
 * asset: what the stage and kind expect (evaluateAsset's narrowing) is worked out once for each.
 */
async function softwareOf(deps: Deps, programId: string, transaction?: Transaction) {
  const ecus = await loadEcus(deps, programId, transaction);
  const baselines = await loadReleasedBaselines(deps, programId, undefined, transaction);
  const ecuCode = new Map(ecus.map((e) => [e.id, e.code]));
  // Per stage and kind: what the baseline expects of such an asset, and the answers so far by installed versions.
  const groups = new Map<string, { baseline: BaselineForConformance | null; byConfig: Map<string, SoftwarePart> }>();
  return (a: Pick<AssetRow, 'stage_id' | 'kind' | 'cfg'>): SoftwarePart => {
    const groupKey = `${a.stage_id}|${a.kind}`;
    let group = groups.get(groupKey);
    if (!group) {
      const released = baselines.get(a.stage_id);
      const carried = new Set(ecus.filter((e) => carries(e, { kind: a.kind, stageId: a.stage_id })).map((e) => e.id));
      group = { baseline: released ? { targets: released.targets.filter((t) => carried.has(t.ecuId)), rules: released.rules } : null, byConfig: new Map() };
      groups.set(groupKey, group);
    }
    const config = a.cfg ?? '';
    let found = group.byConfig.get(config);
    if (found) return found;
    const result = conformance(a.cfg ? (JSON.parse(a.cfg) as Record<string, string>) : {}, group.baseline);
    const offBaseline: OffBaselineEcu[] = [];
    for (const e of result.ecus) {
      if (e.target !== null && !e.countsAsOnBaseline) offBaseline.push({ ecuId: e.ecuId, code: ecuCode.get(e.ecuId) ?? '?', status: e.status });
    }
    found = { inBaseline: result.expected, onBaseline: result.onBaseline, offBaseline: offBaseline.sort((x, y) => byText(x.code, y.code)) };
    group.byConfig.set(config, found);
    return found;
  };
}

type SoftwarePart = { inBaseline: number; onBaseline: number; offBaseline: OffBaselineEcu[] };

const NO_VALIDATION: ValidationParts = { allocated: 0, passed: 0, notPassed: [] };

type FindingCountRow = { asset_id: string } & Record<`${FindingSeverity}_${'due' | 'late'}`, number> & {
  /** The open safety and blocking findings (few); null when none. */
  stops: Array<{ id: string; title: string; severity: 'safety' | 'blocking'; status: FindingStatus; dueDate: string | null }> | null;
};

/**
 * Every figure readiness needs for the scope, and each asset's readiness without its breakdown
 * (a stage, a program, or one asset for the daily snapshot). See `assetFigures` for one asset's
 * breakdown.
 */
export async function computeFigures(deps: Deps, scope: ReadinessScope, asOf: Date, transaction?: Transaction): Promise<Figures> {
  const { sequelize } = deps;
  const where = scopeWhere(scope);
  const { stages, assetRows } = await readCommon(deps, scope, where, transaction);
  // Open findings counted per severity, due (or without a due date) and past due; the load is
  // worked out from the counts by the domain (findingsLoadOf). The safety and blocking ones (few)
  // come as rows too: they clear or block the asset by name.
  const today = utcDate(asOf);
  const late = `$${where.bind.length + 1}::date`;
  const countCols = FINDING_SEVERITIES.flatMap((severity) => [
    `count(*) FILTER (WHERE f.severity = '${severity}' AND (f.due_date IS NULL OR f.due_date >= ${late}))::int AS "${severity}_due"`,
    `count(*) FILTER (WHERE f.severity = '${severity}' AND f.due_date < ${late})::int AS "${severity}_late"`,
  ]);
  const [findingRows] = (await sequelize.query(
    `SELECT f.asset_id, ${countCols.join(', ')},
            json_agg(json_build_object('id', f.id, 'title', f.title, 'severity', f.severity, 'status', f.status, 'dueDate', f.due_date))
              FILTER (WHERE f.severity IN ('safety', 'blocking')) AS stops
       FROM findings f JOIN assets a ON a.id = f.asset_id
      WHERE f.program_id = $1 AND f.status NOT IN (${CLOSED_SQL}) AND ${where.asset}
      GROUP BY f.asset_id`,
    { bind: [...where.bind, today], type: QueryTypes.RAW, transaction },
  )) as [FindingCountRow[], unknown];
  const software = await softwareOf(deps, scope.programId, transaction);
  const validation = await validationPartsForAssets(sequelize, scope.assetId || scope.stageId ? assetRows.map((a) => a.id) : scope.programId, transaction);
  const findingsByAsset = new Map(findingRows.map((r) => [r.asset_id, r]));
  const gateOf = new Map(stages.map((s) => [s.id, s.gate]));
  const assets = assetRows.map((a): AssetResult => {
    const f = findingsByAsset.get(a.id);
    let load = 0;
    // In the order of the asset's breakdown: heaviest first (past due), then by title.
    const notClearedBy: Array<{ id: string; title: string; load: number }> = [];
    const blocking: Array<{ id: string; title: string; load: number }> = [];
    if (f) {
      load = findingsLoadOf({
        safety: { due: f.safety_due, pastDue: f.safety_late },
        blocking: { due: f.blocking_due, pastDue: f.blocking_late },
        major: { due: f.major_due, pastDue: f.major_late },
        minor: { due: f.minor_due, pastDue: f.minor_late },
      });
      for (const stop of f.stops ?? []) {
        (stop.severity === 'safety' ? notClearedBy : blocking).push({ id: stop.id, title: stop.title, load: findingLoad(stop, asOf, today) });
      }
      notClearedBy.sort(byLoadThenTitle);
      blocking.sort(byLoadThenTitle);
    }
    const sw = software(a);
    const v = validation.get(a.id) ?? NO_VALIDATION;
    const readiness = summarizeReadiness({
      checklist: { requiredTotal: a.required_total, requiredPassedOrNa: a.required_done },
      findingsLoad: load,
      notClearedBy,
      software: sw,
      validation: v,
      gate: gateOf.get(a.stage_id)!,
    });
    return {
      id: a.id,
      tag: a.tag,
      stageId: a.stage_id,
      kind: a.kind,
      status: a.status,
      readiness,
      stops: {
        blockingFindings: new ListedStops(blocking),
        openRequired: new OpenRequiredStops(a.required_total - a.required_done, a.open_required),
        offBaseline: new ListedStops(sw.offBaseline),
        notPassed: new ListedStops(v.notPassed),
      },
    };
  });
  return { programId: scope.programId, asOf, stages, assets };
}

/** One asset's figures with the breakdown of its score: its findings and open items read in full. */
async function assetFigures(deps: Deps, scope: ReadinessScope & { assetId: string }, asOf: Date, transaction?: Transaction) {
  const { sequelize } = deps;
  const where = scopeWhere(scope);
  const { stages, assetRows } = await readCommon(deps, scope, where, transaction);
  const findingRows = await sequelize.query<{ id: string; title: string; severity: FindingSeverity; status: FindingStatus; due_date: string | null }>(
    `SELECT f.id, f.title, f.severity, f.status, f.due_date::text AS due_date
       FROM findings f JOIN assets a ON a.id = f.asset_id
      WHERE f.program_id = $1 AND f.status NOT IN (${CLOSED_SQL}) AND ${where.asset}`,
    { bind: where.bind, type: QueryTypes.SELECT, transaction },
  );
  const software = await softwareOf(deps, scope.programId, transaction);
  const validation = await validationPartsForAssets(sequelize, assetRows.map((a) => a.id), transaction);
  const gateOf = new Map(stages.map((s) => [s.id, s.gate]));
  const assets = assetRows.map((a) => {
    const sw = software(a);
    const v = validation.get(a.id) ?? NO_VALIDATION;
    const input: Omit<ReadinessInput, 'gate' | 'asOf'> = {
      checklist: { requiredTotal: a.required_total, requiredPassedOrNa: a.required_done, openRequired: openRequiredOf(a.open_required) },
      findings: findingRows.map((f) => ({ id: f.id, title: f.title, severity: f.severity, status: f.status, dueDate: f.due_date })),
      software: sw,
      validation: { allocated: v.allocated, passed: v.passed, notPassed: v.notPassed },
    };
    return { id: a.id, tag: a.tag, stageId: a.stage_id, readiness: computeReadiness({ ...input, gate: gateOf.get(a.stage_id)!, asOf }) };
  });
  return { stages, assets };
}

// ---- One asset ----------------------------------------------------------------------------

export async function assetReadiness(deps: Deps, user: SessionUser, assetId: string, asOf = new Date()): Promise<AssetReadiness> {
  const asset = await visibleAsset(user, assetId);
  const figures = await assetFigures(deps, { programId: asset.programId, assetId: asset.id, includeRetired: true }, asOf);
  const figure = figures.assets[0];
  if (!figure) throw notFound('This asset');
  const stage = figures.stages.find((s) => s.id === figure.stageId);
  return { ...figure.readiness, assetId: figure.id, tag: figure.tag, stageId: figure.stageId, stage: stage?.name ?? '', asOf: asOf.toISOString() };
}

// ---- Stage roll-ups -------------------------------------------------------------------------

/** Daily stage loads of the program (or one stage) for the `days` days up to `asOf`'s day: one statement. */
export async function stageSeries(
  deps: Deps,
  where: { programId: string; stageId?: string },
  asOf: Date,
  days: number,
  transaction?: Transaction,
): Promise<Map<string, Array<LoadPoint & { meanScore: number | null; assetCount: number; counts: ResultCounts }>>> {
  const toDate = isoDay(asOf);
  const rows = await deps.sequelize.query<{ stage_id: string; date: string; score: number | null; load: number; asset_count: number; counts: Partial<ResultCounts> }>(
    `SELECT stage_id, snapshot_date::text AS date, score, open_findings_load AS load, asset_count, counts
       FROM readiness_snapshots
      WHERE program_id = $1 AND asset_id IS NULL AND ($2::uuid IS NULL OR stage_id = $2::uuid)
        AND snapshot_date BETWEEN $3::date AND $4::date
      ORDER BY stage_id, snapshot_date`,
    { bind: [where.programId, where.stageId ?? null, addDays(toDate, -(days - 1)), toDate], type: QueryTypes.SELECT, transaction },
  );
  const out = new Map<string, Array<LoadPoint & { meanScore: number | null; assetCount: number; counts: ResultCounts }>>();
  for (const r of rows) {
    const list = out.get(r.stage_id) ?? [];
    list.push({
      date: r.date,
      load: r.load,
      meanScore: r.score,
      assetCount: r.asset_count,
      counts: { go: r.counts.go ?? 0, conditional: r.counts.conditional ?? 0, noGo: r.counts.noGo ?? 0 },
    });
    out.set(r.stage_id, list);
  }
  return out;
}

/** The stages a roll-up shows: every stage in use, and a retired one only while assets are on it. */
export function rollupStages(figures: Pick<Figures, 'stages' | 'assets'>): StageInfo[] {
  const inUse = new Set(figures.assets.map((a) => a.stageId));
  return figures.stages.filter((s) => !s.retired || inUse.has(s.id));
}

export function stageRollup(stage: StageInfo, assets: readonly AssetResult[], series: readonly LoadPoint[], asOf: Date): StageRollup {
  const figures = rollUpStage(assets);
  const forecast = forecastStage(series, { gate: stage.gate, assetCount: figures.assetCount, meanParts: figures.meanParts }, asOf);
  return {
    stageId: stage.id,
    name: stage.name,
    position: stage.position,
    gate: stage.gate,
    ...figures,
    targetDate: stage.targetDate,
    forecast,
    meetsTarget: meetsTarget(forecast, stage.targetDate),
  };
}

/** Every stage's roll-up from computed figures and the stage series. */
export function rollups(figures: Figures, series: Map<string, LoadPoint[]>): StageRollup[] {
  return rollupStages(figures).map((stage) =>
    stageRollup(
      stage,
      figures.assets.filter((a) => a.stageId === stage.id),
      series.get(stage.id) ?? [],
      figures.asOf,
    ),
  );
}

export async function programReadiness(deps: Deps, user: SessionUser, programId: string, asOf = new Date()): Promise<ProgramReadiness> {
  assertMember(user, programId, 'This program');
  const figures = await computeFigures(deps, { programId }, asOf);
  const series = await stageSeries(deps, { programId }, asOf, TREND_WINDOW_DAYS);
  return { programId, asOf: asOf.toISOString(), stages: rollups(figures, series) };
}

/** One stage's roll-up, each asset's figure with it (a gate review freezes both). */
export async function stageFigures(deps: Deps, stage: { id: string; programId: string }, asOf: Date, transaction?: Transaction) {
  const figures = await computeFigures(deps, { programId: stage.programId, stageId: stage.id }, asOf, transaction);
  const info = figures.stages.find((s) => s.id === stage.id)!;
  const series = await stageSeries(deps, { programId: stage.programId, stageId: stage.id }, asOf, TREND_SERIES_DAYS, transaction);
  return { info, assets: figures.assets, series: series.get(stage.id) ?? [], rollup: stageRollup(info, figures.assets, series.get(stage.id) ?? [], asOf) };
}

// ---- Trend and target date ------------------------------------------------------------------

/** The stage when the user belongs to its program; otherwise 404. */
export async function visibleStage(user: SessionUser, id: string, transaction?: Transaction) {
  const stage = await Stage.findByPk(id, { attributes: ['id', 'programId', 'name'], transaction });
  if (!stage || !user.programIds.includes(stage.programId)) throw notFound('This stage');
  return stage;
}

export async function stageTrend(deps: Deps, user: SessionUser, stageId: string, asOf = new Date()): Promise<StageTrend> {
  const stage = await visibleStage(user, stageId);
  const { info, series, rollup } = await stageFigures(deps, stage, asOf);
  const fit = fitLoadTrend(series, asOf);
  return {
    stageId: info.id,
    programId: stage.programId,
    name: info.name,
    gate: info.gate,
    targetDate: info.targetDate,
    series: series.map((p) => ({ date: p.date, meanScore: p.meanScore, load: p.load, assetCount: p.assetCount, counts: p.counts })),
    fit: fit && {
      slopePerDay: fit.slope,
      intercept: fit.intercept,
      fromDate: fit.fromDate,
      toDate: fit.toDate,
      line: [
        { date: fit.fromDate, load: fit.intercept },
        { date: fit.toDate, load: fit.intercept + fit.slope * (TREND_WINDOW_DAYS - 1) },
      ],
    },
    forecast: rollup.forecast,
    meetsTarget: rollup.meetsTarget,
  };
}

/** Sets (or with null clears) the day a lead wants the stage through its gate; answers with the forecast against it. */
export async function setTargetDate(deps: Deps, user: SessionUser, stageId: string, input: SetTargetDate, asOf = new Date()): Promise<TargetDateResult> {
  const stage = await visibleStage(user, stageId);
  if (input.date && isPastDueDate(input.date, asOf)) {
    throw new AppError(400, 'request/invalid', 'date: Choose today or a later day.', { fields: { date: 'Choose today or a later day.' } });
  }
  await deps.sequelize.transaction(async (transaction) => {
    const [before] = await deps.sequelize.query<{ target_date: string }>(
      `SELECT target_date::text AS target_date FROM gate_target_dates WHERE stage_id = $1 FOR UPDATE`,
      { bind: [stage.id], type: QueryTypes.SELECT, transaction },
    );
    const from = before?.target_date ?? null;
    const to = input.date ?? null;
    if (from === to) return;
    if (to === null) {
      await deps.sequelize.query(`DELETE FROM gate_target_dates WHERE stage_id = $1`, { bind: [stage.id], transaction });
    } else {
      await deps.sequelize.query(
        `INSERT INTO gate_target_dates (stage_id, program_id, target_date, set_by) VALUES ($1, $2, $3, $4)
         ON CONFLICT (stage_id) DO UPDATE SET target_date = $3, set_by = $4, version = gate_target_dates.version + 1, updated_at = now()`,
        { bind: [stage.id, stage.programId, to, user.id], transaction },
      );
    }
    await recordHistory(
      {
        programId: stage.programId,
        entityType: 'stage',
        entityId: stage.id,
        action: 'gate-target-date-set',
        actorId: user.id,
        before: { gateTargetDate: from },
        after: { gateTargetDate: to },
      },
      transaction,
    );
  });
  const { rollup } = await stageFigures(deps, stage, asOf);
  return { stageId: stage.id, targetDate: rollup.targetDate, forecast: rollup.forecast, meetsTarget: rollup.meetsTarget };
}
