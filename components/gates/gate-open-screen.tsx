import { useRouter } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { BlockerList } from '@/components/readiness/blocker-list';
import { forecastSentence, formatScore, isLead } from '@/components/readiness/readiness-words';
import { ResultCountsRow } from '@/components/readiness/result-badge';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { Select } from '@/components/ui/select';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useOpenGateReviewMutation, useProgramReadinessQuery } from '@/hooks/queries/readiness';
import { useSession } from '@/hooks/use-session';
import { AttendeePicker, attendeesFromDraft, type AttendeeDraft } from './attendee-picker';

export type GateOpenParams = { stageId?: string; corrects?: string };

/** A lead opens a gate review for a stage: today's roll-up and blockers are frozen into it. */
export function GateOpenScreen({ params }: { params: GateOpenParams }) {
  const router = useRouter();
  const { user, currentProgramId } = useSession();
  const rollup = useProgramReadinessQuery(currentProgramId);
  const open = useOpenGateReviewMutation();
  const [stageId, setStageId] = useState<string | null>(params.stageId ?? null);
  const [attendees, setAttendees] = useState<AttendeeDraft>({ memberIds: user ? [user.id] : [], guests: [], guestText: '' });
  const [notes, setNotes] = useState('');
  const [error, setError] = useState<string | null>(null);

  if (!isLead(user?.role)) {
    return (
      <Screen testID="gate-open">
        <PageTitle title="Open a gate review" />
        <EmptyState title="Only a lead opens gate reviews." message="You can read the reviews under Gate reviews." />
        <TextLink href="/gates" label="Gate reviews" />
      </Screen>
    );
  }

  const stages = rollup.data?.stages ?? [];
  const stage = stages.find((s) => s.stageId === stageId) ?? null;

  const submit = async () => {
    if (!stageId) {
      setError('Choose the stage to review.');
      return;
    }
    setError(null);
    try {
      const review = await open.mutateAsync({
        stageId,
        attendees: attendeesFromDraft(attendees),
        notes: notes.trim(),
        ...(params.corrects ? { correctsReviewId: params.corrects } : {}),
      });
      router.replace(`/gates/${review.id}`);
    } catch (cause) {
      setError(errorMessage(cause));
    }
  };

  return (
    <Screen testID="gate-open">
      <PageTitle title="Open a gate review" />
      <TextLink href="/readiness" label="Back to readiness" />
      <View style={styles.header}>
        <Heading level={1} variant="title">
          Open a gate review
        </Heading>
        <Text tone="muted">
          Opening the review freezes the stage’s roll-up and what stops its gate as they are now. You record the decision on the next page.
        </Text>
        {params.corrects ? <Notice tone="warning" message="This review corrects an earlier, decided one. The earlier record stays as it was." /> : null}
      </View>
      {rollup.isPending ? (
        <LoadingState label="Loading the stages…" />
      ) : rollup.isError ? (
        <ErrorState message={errorMessage(rollup.error)} onRetry={() => void rollup.refetch()} />
      ) : (
        <Card style={styles.card}>
          <Select
            label="Stage"
            options={stages.map((s) => ({ value: s.stageId, label: s.name }))}
            value={stageId}
            onChange={setStageId}
            testID="gate-stage"
          />
          {stage ? (
            <View style={styles.preview} testID="gate-open-preview">
              <Text variant="bodyStrong">{stage.meanScore === null ? 'No assets on this stage.' : `Mean score now ${formatScore(stage.meanScore)}`}</Text>
              <ResultCountsRow counts={stage.counts} />
              <Text>{forecastSentence(stage.forecast)}</Text>
              <Heading level={2} variant="bodyStrong">
                What stops the gate now
              </Heading>
              <BlockerList blockers={stage.blockers} testID="gate-blockers" />
            </View>
          ) : null}
        </Card>
      )}
      <Card style={styles.card}>
        <Heading level={2} variant="heading">
          Attendees
        </Heading>
        {currentProgramId ? (
          <AttendeePicker programId={currentProgramId} meId={user?.id ?? null} value={attendees} onChange={setAttendees} testID="gate-attendees" />
        ) : null}
        <TextField label="Notes" value={notes} onChangeText={setNotes} multiline numberOfLines={4} testID="gate-notes" />
        {error ? <Notice message={error} testID="gate-open-error" /> : null}
        <Button label="Open the review" onPress={() => void submit()} loading={open.isPending} testID="gate-open-submit" />
      </Card>
    </Screen>
  );
}

const styles = StyleSheet.create({
  header: { gap: spacing.sm },
  card: { gap: spacing.md },
  preview: { gap: spacing.sm },
});
