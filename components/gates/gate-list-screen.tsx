import { StyleSheet, View } from 'react-native';
import { formatDateTime } from '@/components/assets/asset-words';
import { ResultBadge } from '@/components/readiness/result-badge';
import { Card } from '@/components/ui/card';
import { Badge } from '@/components/ui/chip';
import { LinkPressable } from '@/components/ui/link-pressable';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useGateReviewsQuery } from '@/hooks/queries/readiness';
import { useSession } from '@/hooks/use-session';
import type { GateReviewSummary } from '@/shared/schemas/readiness';
import { formatScore } from '@/components/readiness/readiness-words';

/** The program's gate reviews, newest first: stage, when opened, and the decision. */
export function GateListScreen() {
  const { currentProgramId, currentProgram } = useSession();
  const list = useGateReviewsQuery(currentProgramId);

  return (
    <Screen testID="gate-list">
      <PageTitle title="Gate reviews" />
      <View style={styles.links}>
        <TextLink href="/readiness" label="Back to readiness" />
        <TextLink href="/gates/actions" label="Your gate actions" testID="gate-list-my-actions" />
      </View>
      <View style={styles.header}>
        <Heading level={1} variant="title">
          Gate reviews
        </Heading>
        <Text tone="muted">
          {currentProgram ? `${currentProgram.code}: ` : ''}a lead opens a review from a stage on the readiness page. A decided review is never edited: a correction is a new review.
        </Text>
      </View>
      {!currentProgramId ? (
        <EmptyState title="No program chosen" message="Join a program to see its gate reviews." />
      ) : list.isPending ? (
        <LoadingState label="Loading gate reviews…" />
      ) : list.isError ? (
        <ErrorState message={errorMessage(list.error)} onRetry={() => void list.refetch()} retrying={list.isFetching} />
      ) : list.data.items.length === 0 ? (
        <EmptyState title="No gate reviews yet." />
      ) : (
        <View style={styles.list}>
          {list.data.items.map((review) => (
            <GateReviewRow key={review.id} review={review} />
          ))}
        </View>
      )}
    </Screen>
  );
}

function GateReviewRow({ review }: { review: GateReviewSummary }) {
  const { focused, onFocus, onBlur } = useFocusRing();
  return (
    <LinkPressable
      href={`/gates/${review.id}`}
      onFocus={onFocus}
      onBlur={onBlur}
      style={[styles.row, focused && styles.focused]}
      testID={`gate-row-${review.id}`}
    >
      <Card style={styles.card}>
        <View style={styles.line}>
          <Text variant="bodyStrong">{review.stageName}</Text>
          {review.decision ? <ResultBadge result={review.decision} /> : <Badge label="Not decided yet" tone="warning" />}
        </View>
        <Text tone="muted" variant="caption">
          {`Opened ${formatDateTime(review.openedAt)}${review.openedBy ? ` by ${review.openedBy.name}` : ''} · mean ${formatScore(review.meanScore)} · ${review.actions.length} ${review.actions.length === 1 ? 'action' : 'actions'}`}
        </Text>
        {review.correctsReviewId ? <Text variant="caption">Corrects an earlier review.</Text> : null}
        {review.correctedByReviewId ? <Text variant="caption">Corrected by a later review.</Text> : null}
      </Card>
    </LinkPressable>
  );
}

const styles = StyleSheet.create({
  header: { gap: spacing.xs },
  links: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.lg },
  list: { gap: spacing.md },
  row: { minHeight: sizes.touch, borderRadius: radii.md },
  card: { gap: spacing.xs },
  line: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.sm, flexWrap: 'wrap' },
  focused: { outlineColor: colors.focus, outlineStyle: 'solid', outlineWidth: sizes.focusRing },
});
