import { QueryTypes, type Transaction } from 'sequelize';
import { conformance, type AssetConformance, type CompatibilityRule, type EcuConformance, type RuleResult } from '../../shared/domain/software';
import type { AssetKind } from '../../shared/schemas/assets';
import {
  CONFORMANCE_STATUSES,
  type CompatibilityRuleDto,
  type ConformanceStatus,
  type RuleBreak,
  type StatusCounts,
} from '../../shared/schemas/software';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';

// What the software services share: the catalogue and released baselines of a program (each
// read in one statement), which ECUs an asset carries, and the conformance of one asset.

export const fieldError = (field: string, message: string, code = 'request/invalid', status = 400) =>
  new AppError(status, code, `${field}: ${message}`, { fields: { [field]: message } });

export type EcuRow = {
  id: string;
  programId: string;
  code: string;
  name: string;
  supplier: string;
  assetKinds: AssetKind[];
  stageIds: string[];
  notes: string;
  version: number;
  updatedAt: Date;
};

export type RuleRow = CompatibilityRule & { note: string };

export type ReleasedBaseline = {
  id: string;
  stageId: string;
  name: string;
  releaseLabel: string;
  date: string;
  targets: Array<{ ecuId: string; version: string }>;
  rules: RuleRow[];
};

/** The program's ECU catalogue, ordered by code. Stage ids of deleted stages are dropped. */
export async function loadEcus(deps: Deps, programId: string, transaction?: Transaction): Promise<EcuRow[]> {
  const rows = await deps.sequelize.query<{
    id: string;
    program_id: string;
    code: string;
    name: string;
    supplier: string;
    asset_kinds: AssetKind[];
    stage_ids: string[];
    notes: string;
    version: number;
    updated_at: Date;
  }>(
    `SELECT e.id, e.program_id, e.code, e.name, e.supplier, e.asset_kinds,
            ARRAY(SELECT s.id FROM stages s WHERE s.id = ANY(e.stage_ids) ORDER BY s.position)::text[] AS stage_ids,
            e.notes, e.version, e.updated_at
       FROM ecus e WHERE e.program_id = $1 ORDER BY e.code`,
    { bind: [programId], type: QueryTypes.SELECT, transaction },
  );
  return rows.map((r) => ({
    id: r.id,
    programId: r.program_id,
    code: r.code,
    name: r.name,
    supplier: r.supplier,
    assetKinds: r.asset_kinds,
    stageIds: r.stage_ids,
    notes: r.notes,
    version: r.version,
    updatedAt: r.updated_at,
  }));
}

/** The released baseline of each stage of the program (or of one stage), targets and rules included, in one statement. */
export async function loadReleasedBaselines(
  deps: Deps,
  programId: string,
  stageId?: string,
  transaction?: Transaction,
): Promise<Map<string, ReleasedBaseline>> {
  const rows = await deps.sequelize.query<{
    id: string;
    stage_id: string;
    name: string;
    release_label: string;
    date: string;
    targets: Array<{ ecuId: string; version: string }>;
    rules: RuleRow[];
  }>(
    `SELECT b.id, b.stage_id, b.name, b.release_label, b.date::text AS date,
            coalesce((SELECT json_agg(json_build_object('ecuId', t.ecu_id, 'version', t.version))
                        FROM baseline_targets t WHERE t.baseline_id = b.id), '[]') AS targets,
            coalesce((SELECT json_agg(json_build_object('id', r.id, 'whenEcuId', r.when_ecu_id, 'whenMinVersion', r.when_min_version,
                                                        'thenEcuId', r.then_ecu_id, 'range', r.range, 'note', r.note) ORDER BY r.position)
                        FROM baseline_rules r WHERE r.baseline_id = b.id), '[]') AS rules
       FROM baselines b
      WHERE b.program_id = $1 AND b.status = 'released' AND ($2::uuid IS NULL OR b.stage_id = $2::uuid)`,
    { bind: [programId, stageId ?? null], type: QueryTypes.SELECT, transaction },
  );
  return new Map(
    rows.map((r) => [
      r.stage_id,
      { id: r.id, stageId: r.stage_id, name: r.name, releaseLabel: r.release_label, date: r.date, targets: r.targets, rules: r.rules },
    ]),
  );
}

/** Whether the catalogue says an asset of this kind, on this stage, carries the ECU. */
export function carries(ecu: Pick<EcuRow, 'assetKinds' | 'stageIds'>, asset: { kind: AssetKind; stageId: string }): boolean {
  return ecu.assetKinds.includes(asset.kind) && (ecu.stageIds.length === 0 || ecu.stageIds.includes(asset.stageId));
}

export type AssetEvaluation = {
  result: AssetConformance;
  /** The ECUs to show for the asset, in catalogue order: those it carries and those recorded on it. */
  cells: Array<{ ecu: EcuRow; conformance: EcuConformance }>;
};

/**
 * Conformance of one asset: its installed versions against the released baseline of its stage,
 * narrowed to the ECUs its kind and stage carry (a bench rig is not missing a camera it never has).
 */
export function evaluateAsset(
  asset: { kind: AssetKind; stageId: string },
  installed: Readonly<Record<string, string>>,
  ecus: readonly EcuRow[],
  baseline: ReleasedBaseline | undefined,
): AssetEvaluation {
  const carried = new Set(ecus.filter((e) => carries(e, asset)).map((e) => e.id));
  const result = conformance(
    installed,
    baseline ? { targets: baseline.targets.filter((t) => carried.has(t.ecuId)), rules: baseline.rules } : null,
  );
  const byEcu = new Map(result.ecus.map((e) => [e.ecuId, e]));
  const cells = ecus
    .filter((e) => carried.has(e.id) || byEcu.has(e.id))
    .map((ecu) => ({
      ecu,
      conformance:
        byEcu.get(ecu.id) ??
        ({ ecuId: ecu.id, installed: null, target: null, status: null, order: null, note: null, rulesBroken: [], countsAsOnBaseline: false } satisfies EcuConformance),
    }));
  return { result, cells };
}

export const emptyCounts = (): StatusCounts =>
  Object.fromEntries(CONFORMANCE_STATUSES.map((s) => [s, 0])) as StatusCounts;

export function addCount(counts: StatusCounts, status: ConformanceStatus | null, n = 1) {
  if (status) counts[status] += n;
}

export function ruleDto(rule: RuleRow | (CompatibilityRule & { note?: string }), codes: ReadonlyMap<string, EcuRow>): CompatibilityRuleDto {
  return {
    id: rule.id,
    whenEcuId: rule.whenEcuId,
    whenEcuCode: codes.get(rule.whenEcuId)?.code ?? '?',
    whenMinVersion: rule.whenMinVersion,
    thenEcuId: rule.thenEcuId,
    thenEcuCode: codes.get(rule.thenEcuId)?.code ?? '?',
    range: rule.range,
    note: rule.note ?? '',
  };
}

export function ruleBreakDto(r: RuleResult, codes: ReadonlyMap<string, EcuRow>): RuleBreak {
  const rule = ruleDto(r.rule, codes);
  return {
    rule,
    whenInstalled: r.whenInstalled,
    thenInstalled: r.thenInstalled,
    message:
      `${rule.whenEcuCode} is at ${r.whenInstalled} (${rule.whenMinVersion} or later), so ${rule.thenEcuCode} must be within ` +
      `${rule.range}; it is at ${r.thenInstalled}.`,
  };
}

/** The one reason line a reflash list or import preview shows for a status. */
export function statusReason(c: EcuConformance, codes: ReadonlyMap<string, EcuRow>): string {
  switch (c.status) {
    case 'behind':
      return `${c.installed} is older than the baseline's ${c.target}.`;
    case 'ahead':
      return `${c.installed} is newer than the baseline's ${c.target}.`;
    case 'missing':
      return `Nothing recorded; the baseline asks for ${c.target}.`;
    case 'not-comparable':
      return `${c.note ?? 'Not a semantic version.'} The baseline asks for ${c.target}.`;
    case 'rule-broken':
      return c.rulesBroken.map((r) => ruleBreakDto(r, codes).message).join(' ');
    case 'on-baseline':
      return 'On the baseline.';
    default:
      return 'No target in a released baseline for this stage.';
  }
}

/** Keyset cursors: base64url JSON of the last row's sort keys. */
export function encodeCursor(value: object): string {
  return Buffer.from(JSON.stringify(value)).toString('base64url');
}

export function decodeCursor<T>(raw: string, check: (v: unknown) => v is T): T {
  try {
    const value = JSON.parse(Buffer.from(raw, 'base64url').toString('utf8')) as unknown;
    if (check(value)) return value;
  } catch {
    // fall through to the same answer as a cursor of the wrong shape
  }
  throw fieldError('cursor', 'This page link is not valid. Start again from the first page.');
}
