import { QueryTypes, type Transaction } from 'sequelize';
import { z } from 'zod';
import type { AssetSoftware, Flash, InstalledSoftware, RecordFlashSchema } from '../../shared/schemas/software';
import { Asset, HistoryEntry, Stage } from '../db/models';
import type { Deps } from '../deps';
import { conflict, notFound } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { visibleAsset } from './assets';
import {
  addCount,
  emptyCounts,
  evaluateAsset,
  fieldError,
  loadEcus,
  loadReleasedBaselines,
  ruleBreakDto,
  ruleDto,
  type EcuRow,
} from './software-common';

type RecordFlash = z.output<typeof RecordFlashSchema>;

/** Earlier flashes shown per ECU on the asset's software tab (all are kept). */
export const FLASH_HISTORY_PER_ECU = 20;
/** A flash time this far ahead of the server's clock is taken for a typo, not clock skew. */
const FUTURE_SLACK_MS = 5 * 60 * 1000;

type InstalledRow = {
  asset_id: string;
  ecu_id: string;
  software_version: string;
  software_number: string;
  hardware_number: string;
  ecu_serial: string;
  flashed_at: Date;
  flashed_by: string | null;
  flashed_by_name: string | null;
  source: 'manual' | 'import';
  version: number;
  updated_at: Date;
};

const INSTALLED_SELECT = `
  SELECT i.asset_id, i.ecu_id, i.software_version, i.software_number, i.hardware_number, i.ecu_serial, i.flashed_at,
         i.flashed_by, u.name AS flashed_by_name, i.source, i.version, i.updated_at
    FROM installed_software i LEFT JOIN users u ON u.id = i.flashed_by`;

function toInstalledDto(r: InstalledRow): InstalledSoftware {
  return {
    assetId: r.asset_id,
    ecuId: r.ecu_id,
    softwareVersion: r.software_version,
    softwareNumber: r.software_number,
    hardwareNumber: r.hardware_number,
    ecuSerial: r.ecu_serial,
    flashedAt: r.flashed_at.toISOString(),
    flashedBy: r.flashed_by ? { id: r.flashed_by, name: r.flashed_by_name ?? '' } : null,
    source: r.source,
    version: r.version,
    updatedAt: r.updated_at.toISOString(),
  };
}

/** The installed rows of some assets, in one statement (optionally locked for update). */
export async function loadInstalled(deps: Deps, assetIds: string[], transaction?: Transaction, lock = false): Promise<InstalledRow[]> {
  if (!assetIds.length) return [];
  return deps.sequelize.query<InstalledRow>(
    `${INSTALLED_SELECT} WHERE i.asset_id = ANY($1::uuid[]) ORDER BY i.asset_id, i.ecu_id ${lock && transaction ? 'FOR UPDATE OF i' : ''}`,
    { bind: [assetIds], type: QueryTypes.SELECT, transaction },
  );
}

/** The software tab of one asset: per ECU what is installed, the target, the status, the rules broken and the flashes. */
export async function assetSoftwareOf(deps: Deps, asset: Asset, transaction?: Transaction): Promise<AssetSoftware> {
  const stage = (await Stage.findByPk(asset.stageId, { transaction }))!;
  const ecus = await loadEcus(deps, asset.programId, transaction);
  const baseline = (await loadReleasedBaselines(deps, asset.programId, asset.stageId, transaction)).get(asset.stageId);
  const installed = await loadInstalled(deps, [asset.id], transaction);
  const flashes = await deps.sequelize.query<{
    id: string;
    ecu_id: string;
    software_version: string;
    software_number: string;
    hardware_number: string;
    ecu_serial: string;
    flashed_at: Date;
    flashed_by: string | null;
    flashed_by_name: string | null;
    source: 'manual' | 'import';
    recorded_at: Date;
    recorded_by: string | null;
    recorded_by_name: string | null;
    note: string;
  }>(
    `SELECT f.*, fb.name AS flashed_by_name, rb.name AS recorded_by_name
       FROM (SELECT sf.*, row_number() OVER (PARTITION BY sf.ecu_id ORDER BY sf.recorded_at DESC, sf.flashed_at DESC, sf.id) AS n
               FROM software_flashes sf WHERE sf.asset_id = $1) f
       LEFT JOIN users fb ON fb.id = f.flashed_by
       LEFT JOIN users rb ON rb.id = f.recorded_by
      WHERE f.n <= ${FLASH_HISTORY_PER_ECU}
      ORDER BY f.ecu_id, f.n`,
    { bind: [asset.id], type: QueryTypes.SELECT, transaction },
  );
  const byEcu = new Map(installed.map((r) => [r.ecu_id, r]));
  const codes = new Map(ecus.map((e) => [e.id, e]));
  const evaluation = evaluateAsset(
    asset,
    Object.fromEntries(installed.map((r) => [r.ecu_id, r.software_version])),
    ecus,
    baseline,
  );
  const counts = emptyCounts();
  for (const c of evaluation.cells) addCount(counts, c.conformance.status);
  return {
    assetId: asset.id,
    tag: asset.tag,
    stageId: stage.id,
    stage: stage.name,
    baseline: baseline ? { id: baseline.id, name: baseline.name, releaseLabel: baseline.releaseLabel, date: baseline.date } : null,
    ecus: evaluation.cells.map(({ ecu, conformance: c }) => {
      const row = byEcu.get(ecu.id);
      return {
        ecu: { id: ecu.id, code: ecu.code, name: ecu.name, supplier: ecu.supplier },
        installed: row ? toInstalledDto(row) : null,
        target: c.target,
        status: c.status,
        order: c.order,
        note: c.note,
        rulesBroken: c.rulesBroken.map((r) => ruleBreakDto(r, codes)),
        history: flashes
          .filter((f) => f.ecu_id === ecu.id)
          .map(
            (f): Flash => ({
              id: f.id,
              softwareVersion: f.software_version,
              softwareNumber: f.software_number,
              hardwareNumber: f.hardware_number,
              ecuSerial: f.ecu_serial,
              flashedAt: f.flashed_at.toISOString(),
              flashedBy: f.flashed_by ? { id: f.flashed_by, name: f.flashed_by_name ?? '' } : null,
              source: f.source,
              recordedAt: f.recorded_at.toISOString(),
              recordedBy: f.recorded_by ? { id: f.recorded_by, name: f.recorded_by_name ?? '' } : null,
              note: f.note,
            }),
          ),
      };
    }),
    rules: evaluation.result.rules.map((r) => ({ rule: ruleDto(r.rule, codes), state: r.state, whenInstalled: r.whenInstalled, thenInstalled: r.thenInstalled })),
    counts,
    score: { onBaseline: evaluation.result.onBaseline, expected: evaluation.result.expected },
  };
}

export async function getAssetSoftware(deps: Deps, user: SessionUser, assetId: string) {
  return assetSoftwareOf(deps, await visibleAsset(user, assetId));
}

// ---- Writing flashes ----------------------------------------------------------------------

export type ReadValues = { softwareVersion: string; softwareNumber: string; hardwareNumber: string; ecuSerial: string };

export type FlashWrite = ReadValues & {
  programId: string;
  assetId: string;
  ecuId: string;
  ecuCode: string;
  flashedAt: Date;
  flashedBy: string | null;
  source: 'manual' | 'import';
  note: string;
  before: ReadValues | null;
};

export const readValues = (r: Pick<InstalledRow, 'software_version' | 'software_number' | 'hardware_number' | 'ecu_serial'>): ReadValues => ({
  softwareVersion: r.software_version,
  softwareNumber: r.software_number,
  hardwareNumber: r.hardware_number,
  ecuSerial: r.ecu_serial,
});

/**
 * Records flashes in three statements whatever their number: the installed rows (inserted or
 * overwritten, version + 1), one row each in software_flashes, and one history entry each on the
 * asset (before and after), all in the caller's transaction.
 */
export async function writeFlashes(deps: Deps, writes: FlashWrite[], recordedBy: string, transaction: Transaction) {
  if (!writes.length) return;
  const col = <K extends keyof FlashWrite>(key: K) => writes.map((w) => w[key]);
  const bind = [
    col('assetId'),
    col('ecuId'),
    col('programId'),
    col('softwareVersion'),
    col('softwareNumber'),
    col('hardwareNumber'),
    col('ecuSerial'),
    col('flashedAt'),
    col('flashedBy'),
    col('source'),
  ];
  const columns = `$1::uuid[], $2::uuid[], $3::uuid[], $4::text[], $5::text[], $6::text[], $7::text[], $8::timestamptz[], $9::uuid[], $10::text[]`;
  const names = 'asset_id, ecu_id, program_id, sv, sn, hn, es, fa, fb, src';
  await deps.sequelize.query(
    `INSERT INTO installed_software (asset_id, ecu_id, program_id, software_version, software_number, hardware_number, ecu_serial,
                                     flashed_at, flashed_by, source)
     SELECT w.asset_id, w.ecu_id, w.program_id, w.sv, w.sn, w.hn, w.es, w.fa, w.fb, w.src::enum_software_source
       FROM unnest(${columns}) AS w(${names})
     ON CONFLICT (asset_id, ecu_id) DO UPDATE
        SET software_version = EXCLUDED.software_version, software_number = EXCLUDED.software_number,
            hardware_number = EXCLUDED.hardware_number, ecu_serial = EXCLUDED.ecu_serial, flashed_at = EXCLUDED.flashed_at,
            flashed_by = EXCLUDED.flashed_by, source = EXCLUDED.source,
            version = installed_software.version + 1, updated_at = now()`,
    { bind, transaction },
  );
  await deps.sequelize.query(
    `INSERT INTO software_flashes (program_id, asset_id, ecu_id, software_version, software_number, hardware_number, ecu_serial,
                                   flashed_at, flashed_by, source, note, recorded_by)
     SELECT w.program_id, w.asset_id, w.ecu_id, w.sv, w.sn, w.hn, w.es, w.fa, w.fb, w.src::enum_software_source, w.note, $12::uuid
       FROM unnest(${columns}, $11::text[]) AS w(${names}, note)`,
    { bind: [...bind, col('note'), recordedBy], transaction },
  );
  await HistoryEntry.bulkCreate(
    writes.map((w) => ({
      programId: w.programId,
      entityType: 'asset',
      entityId: w.assetId,
      action: 'software-flashed',
      actorId: recordedBy,
      before: w.before ? { ecuId: w.ecuId, ecu: w.ecuCode, ...w.before } : null,
      after: {
        ecuId: w.ecuId,
        ecu: w.ecuCode,
        softwareVersion: w.softwareVersion,
        softwareNumber: w.softwareNumber,
        hardwareNumber: w.hardwareNumber,
        ecuSerial: w.ecuSerial,
        flashedAt: w.flashedAt.toISOString(),
        source: w.source,
      },
      note: w.note || null,
    })),
    { transaction },
  );
}

export function acceptFlashedAt(raw: string | undefined, field: string, now = new Date()): Date {
  if (raw === undefined) return now;
  const at = new Date(raw);
  if (Number.isNaN(at.getTime())) throw fieldError(field, 'Use a date and time like 2026-12-02T14:30:00Z.');
  if (at.getTime() > now.getTime() + FUTURE_SLACK_MS) throw fieldError(field, 'A flash cannot be in the future.');
  return at;
}

/** The ECU when it belongs to the asset's program; otherwise 404 (an id of another program names nothing here). */
export async function ecuOfProgram(deps: Deps, programId: string, ecuId: string, transaction?: Transaction): Promise<EcuRow> {
  const ecu = (await loadEcus(deps, programId, transaction)).find((e) => e.id === ecuId);
  if (!ecu) throw notFound('This ECU');
  return ecu;
}

/**
 * Records one flash by hand. With `recordVersion`, a record changed by someone else since it
 * was read answers 409 with the current software of the asset.
 */
export async function recordFlash(
  deps: Deps,
  user: SessionUser,
  assetId: string,
  ecuId: string,
  input: Omit<RecordFlash, 'version'> & { recordVersion?: number },
  field = { flashedAt: 'flashedAt' },
): Promise<AssetSoftware> {
  return deps.sequelize.transaction(async (transaction) => {
    const asset = await visibleAsset(user, assetId, transaction);
    const ecu = await ecuOfProgram(deps, asset.programId, ecuId, transaction);
    const flashedAt = acceptFlashedAt(input.flashedAt, field.flashedAt);
    const [current] = await deps.sequelize.query<InstalledRow>(`${INSTALLED_SELECT} WHERE i.asset_id = $1 AND i.ecu_id = $2 FOR UPDATE OF i`, {
      bind: [asset.id, ecu.id],
      type: QueryTypes.SELECT,
      transaction,
    });
    if (input.recordVersion !== undefined && (current?.version ?? null) !== input.recordVersion) {
      throw conflict(`Someone else recorded a flash of ${ecu.code} on ${asset.tag} first.`, await assetSoftwareOf(deps, asset, transaction));
    }
    await writeFlashes(
      deps,
      [
        {
          programId: asset.programId,
          assetId: asset.id,
          ecuId: ecu.id,
          ecuCode: ecu.code,
          softwareVersion: input.softwareVersion,
          // A value left out keeps what the ECU was last read with (hardware and serial do not change on a flash);
          // the software number belongs to its version.
          softwareNumber: input.softwareNumber ?? (current?.software_version === input.softwareVersion ? current.software_number : ''),
          hardwareNumber: input.hardwareNumber ?? current?.hardware_number ?? '',
          ecuSerial: input.ecuSerial ?? current?.ecu_serial ?? '',
          flashedAt,
          flashedBy: user.id,
          source: 'manual',
          note: input.note,
          before: current ? readValues(current) : null,
        },
      ],
      user.id,
      transaction,
    );
    return assetSoftwareOf(deps, asset, transaction);
  });
}
