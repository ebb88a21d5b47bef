import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { formatDateTime } from '@/components/assets/asset-words';
import { formatScore, isLead, resultLabel } from '@/components/readiness/readiness-words';
import { ResultBadge } from '@/components/readiness/result-badge';
import { StageReadinessCard } from '@/components/readiness/stage-readiness-card';
import { Card } from '@/components/ui/card';
import { Button } from '@/components/ui/button';
import { Badge } from '@/components/ui/chip';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage, isApiError } from '@/hooks/api/api-client';
import { useProgramMembersQuery } from '@/hooks/queries/members';
import { useGateReviewQuery, useUpdateGateReviewMutation } from '@/hooks/queries/readiness';
import { useSession } from '@/hooks/use-session';
import type { GateReview } from '@/shared/schemas/readiness';
import { AttendeePicker, attendeesFromDraft, draftFromAttendees, type AttendeeDraft } from './attendee-picker';
import { GateActionItem, canMoveAction } from './gate-action-item';
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

      <AttendeesCard review={review} canEdit={lead && !review.decision} />

      {review.decision ? null : lead ? (
        <GateDecisionForm review={review} />
      ) : (
        <Notice tone="warning" message="No decision yet: a lead records it." />
      )}
    </Screen>
  );
}

/** Attendees and notes; a lead changes them until the decision is recorded (then the record is closed). */
function AttendeesCard({ review, canEdit }: { review: GateReview; canEdit: boolean }) {
  const { user } = useSession();
  const members = useProgramMembersQuery(canEdit ? review.programId : null);
  const update = useUpdateGateReviewMutation(review.id);
  const [draft, setDraft] = useState<AttendeeDraft | null>(null);
  const [notes, setNotes] = useState('');
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);

  const startEditing = () => {
    setDraft(draftFromAttendees(review.attendees, members.data ?? []));
    setNotes(review.notes);
    setError(null);
    setSaved(false);
  };
  const save = async () => {
    if (!draft) return;
    setError(null);
    try {
      await update.mutateAsync({ attendees: attendeesFromDraft(draft), notes: notes.trim(), version: review.version });
      setDraft(null);
      setSaved(true);
    } catch (cause) {
      setError(
        errorMessage(cause, {
          'request/conflict': 'Someone changed this review first. It now shows their version: check it and make your change again.',
        }),
      );
      if (isApiError(cause) && cause.status === 409) setDraft(null);
    }
  };

  if (canEdit && draft) {
    return (
      <Card style={styles.card} testID="gate-attendees-edit">
        <Heading level={2} variant="heading">
          Attendees and notes
        </Heading>
        <Text tone="muted">You can change these until the decision is recorded.</Text>
        <AttendeePicker programId={review.programId} meId={user?.id ?? null} value={draft} onChange={setDraft} testID="gate-edit-attendees" />
        <TextField label="Notes" value={notes} onChangeText={setNotes} multiline numberOfLines={4} testID="gate-edit-notes" />
        {error ? <Notice message={error} testID="gate-attendees-error" /> : null}
        <View style={styles.line}>
          <Button label="Save attendees and notes" onPress={() => void save()} loading={update.isPending} testID="gate-attendees-save" />
          <Button label="Cancel" variant="ghost" onPress={() => setDraft(null)} disabled={update.isPending} testID="gate-attendees-cancel" />
        </View>
      </Card>
    );
  }
  return (
    <Card style={styles.card} testID="gate-attendees-card">
      <View style={styles.titleLine}>
        <Heading level={2} variant="heading">
          Attendees and notes
        </Heading>
        {canEdit ? (
          <Button
            label="Change"
            icon="users"
            variant="secondary"
            compact
            onPress={startEditing}
            disabled={members.isPending}
            accessibilityLabel="Change the attendees and notes"
            testID="gate-attendees-change"
          />
        ) : null}
      </View>
      <Text testID="gate-review-attendees">{attendeeNames(review.attendees)}</Text>
      <Text testID="gate-review-notes">{review.notes || 'No notes.'}</Text>
      {saved ? <Notice tone="success" message="Attendees and notes saved." testID="gate-attendees-saved" /> : null}
      {error ? <Notice message={error} testID="gate-attendees-error" /> : null}
    </Card>
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
            <GateActionItem key={action.id} action={action} canMove={canMoveAction(action, user?.id, user?.role)} show="owner" testID={`gate-action-${i}`} />
          ))}
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  header: { gap: spacing.xs },
  card: { gap: spacing.md },
  line: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  assetRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, flexWrap: 'wrap' },
  actions: { gap: spacing.md },
  titleLine: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.sm, flexWrap: 'wrap' },
});
