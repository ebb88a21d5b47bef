import { useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { Card } from '@/components/ui/card';
import { Badge } from '@/components/ui/chip';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useValidationTestQuery } from '@/hooks/queries/validation';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import type { ValidationTest } from '@/shared/schemas/validation';
import { AllocationsCard } from './allocations-card';
import { TestStatusBadge } from './plan-items';
import { SampleSizePanel } from './sample-size-panel';
import { TestForm } from './test-form';
import { canValidation, formatNumber, formatPercent, previewSampleSize, validationErrorMessage } from './validation-words';

const BACK = '/validation';

/** A new test: the form alone; once saved, the page of the test. */
export function NewTestScreen({ stageId }: { stageId?: string }) {
  const router = useRouter();
  const { user, currentProgramId } = useSession();
  const stages = useStagesQuery(currentProgramId);
  return (
    <Screen testID="vtest-new-screen">
      <PageTitle title="New validation test" />
      <TextLink href={BACK} label="Back to the plan" />
      <Heading level={1}>New validation test</Heading>
      {!canValidation.planTests(user?.role) ? (
        <Notice message="Only an engineer or a lead adds tests to the plan." testID="forbidden" />
      ) : stages.isError ? (
        <ErrorState message={validationErrorMessage(stages.error)} onRetry={() => void stages.refetch()} />
      ) : stages.data ? (
        <TestForm stages={stages.data} defaultStageId={stageId} onSaved={(test) => router.replace(`/validation/tests/${test.id}`)} />
      ) : (
        <LoadingState label="Loading stages…" />
      )}
    </Screen>
  );
}

export function TestDetailScreen({ testId }: { testId: string }) {
  const test = useValidationTestQuery(testId);
  if (test.isPending) {
    return (
      <Screen>
        <LoadingState label="Loading the test…" />
      </Screen>
    );
  }
  if (test.isError) {
    return (
      <Screen>
        <TextLink href={BACK} label="Back to the plan" />
        <ErrorState message={validationErrorMessage(test.error)} onRetry={() => void test.refetch()} retrying={test.isFetching} />
      </Screen>
    );
  }
  return <TestDetail test={test.data} />;
}

function TestDetail({ test }: { test: ValidationTest }) {
  const { user } = useSession();
  const { isWide } = useBreakpoints();
  const stages = useStagesQuery(test.programId);
  const canPlan = canValidation.planTests(user?.role);

  const targets = canPlan ? (
    stages.data ? (
      <TestForm key={test.id} stages={stages.data} test={test} onSaved={() => undefined} />
    ) : stages.isError ? (
      <ErrorState message={validationErrorMessage(stages.error)} onRetry={() => void stages.refetch()} />
    ) : (
      <LoadingState label="Loading stages…" />
    )
  ) : (
    <TargetsCard test={test} />
  );

  return (
    <Screen testID="vtest-detail">
      <PageTitle title={test.name} />
      <TextLink href={`${BACK}?stageId=${test.stageId}`} label="Back to the plan" testID="vtest-back" />
      <View style={styles.header}>
        <Text variant="caption" tone="muted">
          {test.stage}
          {test.procedureRef ? ` · ${test.procedureRef}` : ''}
        </Text>
        <Heading level={1} testID="vtest-title">
          {test.name}
        </Heading>
        <View style={styles.badges}>
          <TestStatusBadge status={test.status} testID="vtest-status" />
          <Badge label={`${test.passedSamples} of ${test.requiredSamples} passed`} tone="primary" />
        </View>
      </View>
      <ProgressCard test={test} />
      {isWide ? (
        <View style={styles.columns}>
          <View style={styles.column}>{targets}</View>
          <View style={styles.column}>
            <AllocationsCard test={test} />
          </View>
        </View>
      ) : (
        <>
          <AllocationsCard test={test} />
          {targets}
        </>
      )}
    </Screen>
  );
}

/** What the passes so far demonstrate (the server's figure), in words. */
function ProgressCard({ test }: { test: ValidationTest }) {
  const failed = test.allocations.some((a) => a.status === 'failed');
  let sentence: string;
  if (failed) sentence = 'A sample failed: a zero-failure run cannot demonstrate the target. Resolve the finding and plan a new run.';
  else if (test.demonstratedReliability !== null && test.passedSamples > 0) {
    sentence = `${test.passedSamples} ${test.passedSamples === 1 ? 'sample' : 'samples'} passed with no failure: demonstrated reliability ${formatPercent(test.demonstratedReliability)} at ${formatPercent(test.confidence)} confidence (target ${formatPercent(test.reliability)}).`;
  } else sentence = `No sample has passed yet. ${test.requiredSamples} must pass with no failure to show R ${formatPercent(test.reliability)} at C ${formatPercent(test.confidence)}.`;
  return (
    <Notice tone={failed ? 'danger' : test.status === 'passed' ? 'success' : 'warning'} message={sentence} testID="vtest-demonstrated" />
  );
}

/** The targets read-only, for a technician (who records results but does not plan). */
function TargetsCard({ test }: { test: ValidationTest }) {
  const preview = previewSampleSize({
    reliability: String(test.reliability),
    confidence: String(test.confidence),
    testToLife: test.testToLife === null ? '' : String(test.testToLife),
    shape: test.shape === null ? '' : String(test.shape),
  });
  return (
    <Card testID="vtest-targets">
      <Heading level={2} variant="heading">
        Test and targets
      </Heading>
      {test.verifies ? <Text>{test.verifies}</Text> : null}
      <Text variant="label">
        R {formatPercent(test.reliability)} · C {formatPercent(test.confidence)}
        {test.testToLife !== null && test.shape !== null ? ` · L ${formatNumber(test.testToLife)} · b ${formatNumber(test.shape)}` : ''}
      </Text>
      <SampleSizePanel preview={preview} testID="vtest-n" />
    </Card>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.xs,
  },
  badges: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  columns: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.xl,
  },
  column: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xl,
  },
});
