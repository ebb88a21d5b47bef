import { StyleSheet, View } from 'react-native';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useProgramReadinessQuery } from '@/hooks/queries/readiness';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { formatDateTime } from '@/components/assets/asset-words';
import { isLead } from './readiness-words';
import { StageReadinessCard } from './stage-readiness-card';

/** Every stage of the program: is it ready for its gate, what stops it, and when it will be. */
export function ReadinessScreen() {
  const { user, currentProgramId, currentProgram } = useSession();
  const { isWide } = useBreakpoints();
  const rollup = useProgramReadinessQuery(currentProgramId);
  const lead = isLead(user?.role);

  return (
    <Screen testID="readiness-screen">
      <PageTitle title="Readiness" />
      <View style={styles.header}>
        <Heading level={1} variant="title">
          Readiness
        </Heading>
        <Text tone="muted">
          {currentProgram ? `${currentProgram.code}: ` : ''}each stage’s mean score, how many assets are go, conditional go or no-go, and what stops the gate.
        </Text>
        <TextLink href="/gates" label="Gate reviews" testID="readiness-gates-link" />
      </View>
      {!currentProgramId ? (
        <EmptyState title="No program chosen" message="Join a program to see its readiness." />
      ) : rollup.isPending ? (
        <LoadingState label="Loading readiness…" />
      ) : rollup.isError ? (
        <ErrorState message={errorMessage(rollup.error)} onRetry={() => void rollup.refetch()} retrying={rollup.isFetching} />
      ) : rollup.data.stages.length === 0 ? (
        <EmptyState title="No stages yet." message="A lead adds the program’s stages first." />
      ) : (
        <View testID="readiness-rollup" style={styles.body}>
          <Text tone="muted" variant="caption">{`As of ${formatDateTime(rollup.data.asOf)}`}</Text>
          <View style={isWide ? styles.grid : styles.stack}>
            {rollup.data.stages.map((stage) => (
              <View key={stage.stageId} style={isWide ? styles.cell : undefined}>
                <StageReadinessCard stage={stage} canOpenReview={lead} />
              </View>
            ))}
          </View>
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  header: { gap: spacing.xs },
  body: { gap: spacing.md },
  stack: { gap: spacing.lg },
  grid: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.lg, alignItems: 'flex-start' },
  cell: { flexBasis: '48%', flexGrow: 1, minWidth: 0 },
});
