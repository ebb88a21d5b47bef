import { readiness as readinessColors } from '@/components/theme/tokens';
import type { Role } from '@/shared/schemas/auth';
import {
  READINESS_RESULT_LABELS,
  type BlockerItem,
  type BreakdownItem,
  type Forecast,
  type ReadinessPart,
  type ReadinessResult,
  type ResultCounts,
} from '@/shared/schemas/readiness';

export const PART_LABELS: Record<ReadinessPart, string> = {
  checklist: 'Checklist',
  findings: 'Findings',
  software: 'Software',
  validation: 'Validation tests',
};

export function resultLabel(result: ReadinessResult): string {
  return READINESS_RESULT_LABELS[result];
}

/** Colour and tint for a result; the label always goes with it (never colour alone). */
export function resultColors(result: ReadinessResult): { fg: string; bg: string } {
  if (result === 'go') return { fg: readinessColors.go, bg: readinessColors.goTint };
  if (result === 'conditional') return { fg: readinessColors.conditional, bg: readinessColors.conditionalTint };
  return { fg: readinessColors.noGo, bg: readinessColors.noGoTint };
}

export function formatScore(score: number | null | undefined): string {
  if (score === null || score === undefined) return '—';
  return (Math.round(score * 10) / 10).toFixed(1).replace(/\.0$/, '');
}

export function formatPercent(value: number): string {
  return `${Math.round(value * 100)} %`;
}

/** "3 go, 1 conditional go, 2 no-go". */
export function countsSentence(counts: ResultCounts): string {
  return `${counts.go} go, ${counts.conditional} conditional go, ${counts.noGo} no-go`;
}

/** The forecast in one sentence, as the roll-up and the trend page show it. */
export function forecastSentence(forecast: Forecast): string {
  if (forecast.status === 'not-converging') return 'Not converging: the open-findings load is not falling.';
  if (forecast.status === 'converging' && forecast.date) return `At this rate the stage reaches its threshold on ${forecast.date}.`;
  return forecast.text;
}

export function targetSentence(targetDate: string | null, meetsTarget: boolean | null): string {
  if (!targetDate) return 'No target date set for this gate.';
  if (meetsTarget === true) return `Target date ${targetDate}: the forecast meets it.`;
  if (meetsTarget === false) return `Target date ${targetDate}: the forecast misses it.`;
  return `Target date ${targetDate}.`;
}

/** Where an item of a breakdown or a blocker opens. */
export function itemHref(item: Pick<BreakdownItem, 'kind' | 'id'>, assetId: string): string {
  if (item.kind === 'finding') return `/findings/${item.id}`;
  if (item.kind === 'checklist-item') return `/assets/${assetId}/checklist`;
  if (item.kind === 'ecu') return `/assets/${assetId}/software`;
  return `/validation/tests/${item.id}`;
}

export function blockerItemLabel(item: BlockerItem): string {
  return `${item.assetTag}: ${item.label}`;
}

export const isLead = (role: Role | null | undefined) => role === 'lead';
