import { StyleSheet, View } from 'react-native';
import { Badge } from '@/components/ui/chip';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Text } from '@/components/ui/text';
import { spacing } from '@/components/theme/tokens';
import type { Campaign, CampaignStep } from '@/shared/schemas/validation';
import { formatAmount, formatDate, formatDateTime, formatTemperature } from './validation-words';

export const CAMPAIGN_KIND_LABELS: Record<Campaign['kind'], string> = {
  climate: 'Climate chamber',
  durability: 'Durability route',
};

/** "48 of 120 h done (40 %)" */
export function progressCaption(campaign: Campaign): string {
  const { done, planned, unit, fraction } = campaign.progress;
  return `${formatAmount(done, unit)} of ${formatAmount(planned, unit)} done (${Math.round(fraction * 100)} %)`;
}

export function currentStepSentence(campaign: Campaign): string {
  if (campaign.progress.complete) return 'All steps done.';
  if (!campaign.currentStep) return 'No step planned.';
  const which = `${campaign.currentStep.name} (step ${campaign.currentStep.index + 1} of ${campaign.steps.length})`;
  return hasStarted(campaign) ? `Now: ${which}` : `First: ${which}`;
}

/** Started once a start time is set or anything is recorded. */
export function hasStarted(campaign: Campaign): boolean {
  return Boolean(campaign.startedAt) || campaign.progress.done > 0;
}

export function finishSentence(campaign: Campaign): string {
  if (campaign.progress.complete) return 'Complete.';
  if (campaign.projectedFinish) return `Projected finish ${formatDateTime(campaign.projectedFinish)}, at the rate so far.`;
  if (!campaign.startedAt || campaign.progress.done === 0) return 'Projected finish shows once hours or km are recorded.';
  return 'Projected finish: not in any useful time at the rate so far.';
}

/** "25 °C · 93 % RH · dew point 23.7 °C", or "Alpine loop · 1,200 km". */
export function stepConditions(step: CampaignStep): string {
  const parts: string[] = [];
  if (step.temperatureC !== null) parts.push(formatTemperature(step.temperatureC));
  if (step.humidityPct !== null) parts.push(`${step.humidityPct} % RH`);
  if (step.dewPointC !== null) parts.push(`dew point ${formatTemperature(step.dewPointC)}`);
  if (step.route) parts.push(step.route);
  return parts.join(' · ');
}

export function stepPlan(step: CampaignStep): string {
  const parts: string[] = [];
  if (step.durationHours !== null) parts.push(formatAmount(step.durationHours, 'hours'));
  if (step.distanceKm !== null) parts.push(formatAmount(step.distanceKm, 'km'));
  return parts.join(' · ') || 'No plan';
}

/** Progress bar, the step now running and the projected finish of one campaign. */
export function CampaignProgressSummary({ campaign }: { campaign: Campaign }) {
  return (
    <View style={styles.wrap}>
      <View style={styles.badges}>
        <Badge label={CAMPAIGN_KIND_LABELS[campaign.kind]} tone="primary" />
        {campaign.progress.complete ? <Badge label="Complete" tone="success" /> : null}
        {campaign.steps.some((s) => s.condensationRisk) ? <Badge label="Condensation risk" tone="warning" /> : null}
      </View>
      <ProgressBar
        value={campaign.progress.fraction}
        label={`Progress of ${campaign.name}`}
        caption={progressCaption(campaign)}
        tone={campaign.progress.complete ? 'success' : 'primary'}
        testID="campaign-progress"
      />
      <Text variant="bodyStrong" testID="campaign-current-step">
        {currentStepSentence(campaign)}
      </Text>
      <Text variant="caption" tone="muted" testID="campaign-finish">
        {campaign.startedAt ? `Started ${formatDate(campaign.startedAt)}. ` : 'Not started. '}
        {finishSentence(campaign)}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: {
    gap: spacing.xs,
  },
  badges: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
});
