import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { formatDate, formatDateTime } from '@/components/assets/asset-words';
import { formatScore, isLead, resultLabel } from '@/components/readiness/readiness-words';
import { ResultBadge } from '@/components/readiness/result-badge';
import { StageReadinessCard } from '@/components/readiness/stage-readiness-card';
import { Card } from '@/components/ui/card';
import { Badge, Chip } from '@/components/ui/chip';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useGateReviewQuery, useUpdateGateActionMutation } from '@/hooks/queries/readiness';
import { useSession } from '@/hooks/use-session';
import { GATE_ACTION_STATUSES, GATE_ACTION_STATUS_LABELS, type GateAction, type GateReview } from '@/shared/schemas/readiness';
import { GateDecisionForm } from './gate-decision-form';
import { attendeeNames } from './gate-words';

const FROZEN_ASSETS_SHOWN = 12;

/** One gate review: the frozen roll-up and blockers, attendees, notes, and the decision with its actions. */
export function GateReviewScreen({ reviewId }: { reviewId: string }) {
  const { user } = useSession();
  const query = useGateReviewQuery(reviewId);

  if (query.isPending) {
    return (
      <Screen testID="gate-review">
        <LoadingState label="Loading the gate review…" />
      </Screen>
    );
  }
  if (query.isError) {
    return (
      <Screen testID="gate-review">
        <TextLink href="/gates" label="Back to gate reviews" />
        <ErrorState message={errorMessage(query.error)} onRetry={() => void query.refetch()} retrying={query.isFetching} />
      </Screen>
    );
  }
  const review = query.data;
  const lead = isLead(user?.role);

  return (
    <Screen testID="gate-review">
      <PageTitle title={`${review.stageName} gate review`} />
      <TextLink href="/gates" label="Back to gate reviews" testID="gate-back" />
      <View style={styles.header}>
        <Heading level={1} variant="title">
          {`${review.stageName} gate review`}
        </Heading>
        <Text tone="muted">
          {`Opened ${formatDateTime(review.openedAt)}${review.openedBy ? ` by ${review.openedBy.name}` : ''}. The figures below were frozen at ${formatDateTime(review.frozen.asOf)}.`}
        </Text>
        {review.correctsReviewId ? <TextLink href={`/gates/${review.correctsReviewId}`} label="The earlier review this one corrects" /> : null}
        {review.correctedByReviewId ? <TextLink href={`/gates/${review.correctedByReviewId}`} label="The later review that corrects this one" /> : null}
      </View>

      {review.decision ? <DecidedRecord review={review} canCorrect={lead} /> : null}

      <StageReadinessCard stage={review.frozen.stage} showLinks={false} testID="gate-frozen" blockersTestID="gate-blockers" />

      <Card style={styles.card} testID="gate-frozen-assets">
        <Heading level={2} variant="heading">
          Assets at the review
        </Heading>
        {review.frozen.assets.length === 0 ? <Text tone="muted">No assets on this stage.</Text> : null}
        {review.frozen.assets.slice(0, FROZEN_ASSETS_SHOWN).map((asset) => (
          <View key={asset.id} style={styles.assetRow}>
            <TextLink href={`/assets/${asset.id}`} label={`${asset.tag} (${formatScore(asset.score)})`} />
            <ResultBadge result={asset.result} />
            {asset.cleared ? null : <Badge label="Not cleared" tone="danger" />}
          </View>
        ))}
        {review.frozen.assets.length > FROZEN_ASSETS_SHOWN ? (
          <Text tone="muted" variant="caption">{`and ${review.frozen.assets.length - FROZEN_ASSETS_SHOWN} more`}</Text>
        ) : null}
      </Card>

      <Card style={styles.card}>
        <Heading level={2} variant="heading">
          Attendees and notes
        </Heading>
        <Text testID="gate-review-attendees">{attendeeNames(review.attendees)}</Text>
        <Text testID="gate-review-notes">{review.notes || 'No notes.'}</Text>
      </Card>

      {review.decision ? null : lead ? (
        <GateDecisionForm review={review} />
      ) : (
        <Notice tone="warning" message="No decision yet: a lead records it." />
      )}
    </Screen>
  );
}

function DecidedRecord({ review, canCorrect }: { review: GateReview; canCorrect: boolean }) {
  const { user } = useSession();
  if (!review.decision) return null;
  return (
    <Card style={styles.card} testID="gate-decided">
      <View style={styles.line}>
        <Heading level={2} variant="heading">
          {`Decision: ${resultLabel(review.decision)}`}
        </Heading>
        <ResultBadge result={review.decision} testID="gate-decided-result" />
      </View>
      <Text tone="muted">
        {`Recorded ${formatDateTime(review.decidedAt)}${review.decidedBy ? ` by ${review.decidedBy.name}` : ''}. This record is read-only. A correction is a new review.`}
      </Text>
      {review.decisionNotes ? <Text>{review.decisionNotes}</Text> : null}
      {canCorrect && !review.correctedByReviewId ? (
        <TextLink href={`/gates/new?stageId=${review.stageId}&corrects=${review.id}`} label="Open a correcting review" testID="gate-correct" />
      ) : null}
      {review.actions.length > 0 ? (
        <View style={styles.actions} testID="gate-actions">
          <Heading level={3} variant="bodyStrong">
            Actions
          </Heading>
          {review.actions.map((action, i) => (
            <ActionRow key={action.id} action={action} index={i} reviewId={review.id} canMove={canMoveAction(action, user?.id, user?.role)} />
          ))}
        </View>
      ) : null}
    </Card>
  );
}

function canMoveAction(action: GateAction, userId: string | undefined, role: string | undefined): boolean {
  return role === 'lead' || role === 'engineer' || (Boolean(userId) && action.owner?.id === userId);
}

function ActionRow({ action, index, reviewId, canMove }: { action: GateAction; index: number; reviewId: string; canMove: boolean }) {
  const move = useUpdateGateActionMutation(reviewId);
  const [error, setError] = useState<string | null>(null);
  const setStatus = async (status: GateAction['status']) => {
    if (status === action.status) return;
    setError(null);
    try {
      await move.mutateAsync({ id: action.id, status, version: action.version });
    } catch (cause) {
      setError(errorMessage(cause, { 'request/conflict': 'Someone changed this action first. It is refreshed: try again.' }));
    }
  };
  return (
    <View style={styles.action} testID={`gate-action-${index}`}>
      <Text variant="bodyStrong">{action.title}</Text>
      <Text tone="muted" variant="caption">
        {`Owner ${action.owner?.name ?? 'nobody'} · due ${formatDate(action.dueDate)}${action.overdue ? ' · overdue' : ''}`}
      </Text>
      <View style={styles.line}>
        <Badge label={GATE_ACTION_STATUS_LABELS[action.status]} tone={action.status === 'done' ? 'success' : action.overdue ? 'danger' : 'neutral'} testID={`gate-action-status-${index}`} />
      </View>
      {canMove ? (
        <View style={styles.line} role="radiogroup" aria-label={`Status of ${action.title}`}>
          {GATE_ACTION_STATUSES.map((status) => (
            <Chip
              key={status}
              kind="radio"
              label={GATE_ACTION_STATUS_LABELS[status]}
              selected={action.status === status}
              disabled={move.isPending}
              onPress={() => void setStatus(status)}
              testID={`gate-action-${index}-${status}`}
            />
          ))}
        </View>
      ) : null}
      {error ? <Notice message={error} /> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  header: { gap: spacing.xs },
  card: { gap: spacing.md },
  line: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  assetRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, flexWrap: 'wrap' },
  actions: { gap: spacing.md },
  action: { gap: spacing.xs },
});
