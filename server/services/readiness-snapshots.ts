import { QueryTypes, type Transaction } from 'sequelize';
import { rollUpStage } from '../../shared/domain/readiness';
import { isoDay } from '../../shared/domain/trend';
import type { Deps } from '../deps';
import { computeFigures, rollupStages, type Figures } from './readiness';

// The daily readiness snapshot (PRODUCT.md section 4: "a daily snapshot keeps the history"): one
// row per live asset and one per stage shown in the roll-up, dated with `asOf`'s UTC day. Taking
// it again the same day replaces that day's rows. Per program: the fixed statements of the
// readiness figures and two inserts, whatever the number of assets.

export type SnapshotCounts = { programs: number; assets: number; stages: number };

/** Writes the day's rows of one program's figures (as computed, or as the demo back-fill shapes them). */
export async function writeSnapshotRows(
  deps: Deps,
  date: string,
  figures: Pick<Figures, 'programId' | 'stages' | 'assets'>,
  transaction?: Transaction,
): Promise<{ assets: number; stages: number }> {
  const { programId } = figures;
  const assets = figures.assets;
  if (assets.length) {
    await deps.sequelize.query(
      `INSERT INTO readiness_snapshots (snapshot_date, program_id, stage_id, asset_id, score, result, cleared, parts, open_findings_load, asset_count)
       SELECT $1::date, $2::uuid, t.stage_id, t.asset_id, t.score, t.result, t.cleared, t.parts::jsonb, t.load, 1
         FROM unnest($3::uuid[], $4::uuid[], $5::float8[], $6::text[], $7::boolean[], $8::text[], $9::float8[])
              AS t(stage_id, asset_id, score, result, cleared, parts, load)
       ON CONFLICT (snapshot_date, asset_id) WHERE asset_id IS NOT NULL DO UPDATE
          SET stage_id = EXCLUDED.stage_id, score = EXCLUDED.score, result = EXCLUDED.result, cleared = EXCLUDED.cleared,
              parts = EXCLUDED.parts, open_findings_load = EXCLUDED.open_findings_load, created_at = now()`,
      {
        bind: [
          date,
          programId,
          assets.map((a) => a.stageId),
          assets.map((a) => a.id),
          assets.map((a) => a.readiness.score),
          assets.map((a) => a.readiness.result),
          assets.map((a) => a.readiness.cleared),
          assets.map((a) => JSON.stringify(a.readiness.parts)),
          assets.map((a) => a.readiness.findingsLoad),
        ],
        transaction,
      },
    );
  }
  const stages = rollupStages(figures).map((stage) => ({
    stage,
    figures: rollUpStage(assets.filter((a) => a.stageId === stage.id)),
  }));
  if (stages.length) {
    await deps.sequelize.query(
      `INSERT INTO readiness_snapshots (snapshot_date, program_id, stage_id, asset_id, score, result, cleared, parts, open_findings_load, asset_count, counts)
       SELECT $1::date, $2::uuid, t.stage_id, NULL, t.score, NULL, NULL, t.parts::jsonb, t.load, t.asset_count, t.counts::jsonb
         FROM unnest($3::uuid[], $4::float8[], $5::text[], $6::float8[], $7::int[], $8::text[])
              AS t(stage_id, score, parts, load, asset_count, counts)
       ON CONFLICT (snapshot_date, stage_id) WHERE asset_id IS NULL DO UPDATE
          SET score = EXCLUDED.score, parts = EXCLUDED.parts, open_findings_load = EXCLUDED.open_findings_load,
              asset_count = EXCLUDED.asset_count, counts = EXCLUDED.counts, created_at = now()`,
      {
        bind: [
          date,
          programId,
          stages.map((s) => s.stage.id),
          stages.map((s) => s.figures.meanScore),
          stages.map((s) => (s.figures.meanParts ? JSON.stringify(s.figures.meanParts) : null)),
          stages.map((s) => s.figures.openFindingsLoad),
          stages.map((s) => s.figures.assetCount),
          stages.map((s) => JSON.stringify(s.figures.counts)),
        ],
        transaction,
      },
    );
  }
  return { assets: assets.length, stages: stages.length };
}

/** The snapshot of every program (or the listed ones) for `asOf`'s UTC day. */
export async function takeSnapshot(deps: Deps, asOf: Date, transaction?: Transaction, programIds?: string[]): Promise<SnapshotCounts> {
  const programs = programIds
    ? programIds.map((id) => ({ id }))
    : await deps.sequelize.query<{ id: string }>(`SELECT id FROM programs ORDER BY code`, { type: QueryTypes.SELECT, transaction });
  const date = isoDay(asOf);
  const total: SnapshotCounts = { programs: 0, assets: 0, stages: 0 };
  for (const program of programs) {
    const figures = await computeFigures(deps, { programId: program.id }, asOf, transaction);
    const written = await writeSnapshotRows(deps, date, figures, transaction);
    total.programs += 1;
    total.assets += written.assets;
    total.stages += written.stages;
  }
  return total;
}
