import { useRouter } from 'expo-router';
import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { Select } from '@/components/ui/select';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useValidationTestsQuery } from '@/hooks/queries/validation';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import type { Stage } from '@/shared/schemas/assets';
import type { ValidationTest } from '@/shared/schemas/validation';
import { CalculatorCard } from './calculator-card';
import { PlanTableHeader, PlanTableRow, TestCard } from './plan-items';
import { canValidation, validationErrorMessage } from './validation-words';

const ALL = 'all';

/**
 * The validation plan (DVP&R) of the current program: its tests per stage with their targets,
 * the sample size they need and how far the allocated assets got. A table on a wide screen,
 * cards on a phone; the stage chips choose one stage or all of them.
 */
export function ValidationPlanScreen({ stageId }: { stageId?: string }) {
  const router = useRouter();
  const { user, currentProgramId, currentProgram } = useSession();
  const { isWide } = useBreakpoints();
  const [chosen, setChosen] = useState<string>(stageId || ALL);
  const stages = useStagesQuery(currentProgramId);
  const tests = useValidationTestsQuery(currentProgramId);

  const groups = useMemo(() => groupByStage(stages.data ?? [], tests.data ?? []), [stages.data, tests.data]);
  const shown = chosen === ALL ? groups : groups.filter((g) => g.stageId === chosen);
  const total = tests.data?.length ?? 0;

  const choose = (value: string) => {
    setChosen(value);
    router.setParams({ stageId: value === ALL ? undefined : value });
  };

  const newHref = `/validation/tests/new${chosen !== ALL ? `?stageId=${chosen}` : ''}`;

  return (
    <Screen testID="validation-screen">
      <PageTitle title="Validation plan" />
      <View style={styles.header}>
        <View style={styles.headerText}>
          <Text variant="caption" tone="muted">
            {currentProgram ? `${currentProgram.code} · ` : ''}Design verification plan and report (DVP&R)
          </Text>
          <Heading level={1}>Validation plan</Heading>
        </View>
        <View style={styles.actions}>
          {canValidation.planTests(user?.role) ? (
            <Button label="New test" icon="plus" compact onPress={() => router.push(newHref)} testID="vtest-new" />
          ) : null}
          <TextLink href="/validation/campaigns" label="Test campaigns" testID="validation-campaigns-link" />
        </View>
      </View>

      {!currentProgramId ? (
        <EmptyState title="No program chosen" message="Choose a program in the menu to see its validation plan." />
      ) : stages.isError ? (
        <ErrorState message={validationErrorMessage(stages.error)} onRetry={() => void stages.refetch()} />
      ) : stages.data ? (
        <Select
          label="Stage"
          layout="chips"
          testID="validation-stage"
          value={chosen}
          onChange={choose}
          options={[
            { value: ALL, label: `All stages (${total})` },
            ...groups.map((g) => ({ value: g.stageId, label: `${g.stage} (${g.tests.length})` })),
          ]}
        />
      ) : null}

      {tests.isPending && currentProgramId ? (
        <LoadingState label="Loading the plan…" />
      ) : tests.isError ? (
        <ErrorState message={validationErrorMessage(tests.error)} onRetry={() => void tests.refetch()} retrying={tests.isFetching} />
      ) : tests.data ? (
        <View style={styles.plan} testID="validation-plan">
          {shown.every((g) => g.tests.length === 0) ? (
            <EmptyState
              title="No tests planned here yet"
              message={canValidation.planTests(user?.role) ? 'Press New test to add one.' : 'An engineer or lead adds the tests.'}
            />
          ) : (
            shown
              .filter((g) => g.tests.length > 0)
              .map((g) => (
                <View key={g.stageId} style={styles.group} testID={`validation-stage-group-${g.stageId}`}>
                  <Heading level={2} variant="heading">
                    {g.stage}
                  </Heading>
                  {isWide ? (
                    <View style={styles.table} role="table" aria-label={`Tests of ${g.stage}`}>
                      <PlanTableHeader />
                      {g.tests.map((test) => (
                        <PlanTableRow key={test.id} test={test} />
                      ))}
                    </View>
                  ) : (
                    <View style={styles.cards} role="list">
                      {g.tests.map((test) => (
                        <View key={test.id} role="listitem">
                          <TestCard test={test} />
                        </View>
                      ))}
                    </View>
                  )}
                </View>
              ))
          )}
        </View>
      ) : null}

      <CalculatorCard />
    </Screen>
  );
}

type Group = { stageId: string; stage: string; tests: ValidationTest[] };

/** Stages in their program order (retired ones only when they hold tests), each with its tests by name. */
function groupByStage(stages: readonly Stage[], tests: readonly ValidationTest[]): Group[] {
  const byStage = new Map<string, ValidationTest[]>();
  for (const test of tests) byStage.set(test.stageId, [...(byStage.get(test.stageId) ?? []), test]);
  const groups: Group[] = stages
    .filter((s) => !s.retired || byStage.has(s.id))
    .map((s) => ({ stageId: s.id, stage: s.name, tests: sortTests(byStage.get(s.id) ?? []) }));
  // A test on a stage the list does not know (it loads separately) still shows.
  for (const [id, list] of byStage) {
    if (!groups.some((g) => g.stageId === id)) groups.push({ stageId: id, stage: list[0].stage, tests: sortTests(list) });
  }
  return groups;
}

const sortTests = (list: ValidationTest[]) => [...list].sort((a, b) => a.name.localeCompare(b.name));

const styles = StyleSheet.create({
  header: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'flex-end',
    justifyContent: 'space-between',
    gap: spacing.md,
  },
  headerText: {
    flexGrow: 1,
    flexShrink: 1,
    minWidth: 200,
    gap: spacing.xs,
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.md,
  },
  plan: {
    gap: spacing.xl,
  },
  group: {
    gap: spacing.md,
  },
  table: {
    borderWidth: 1,
    borderColor: colors.border,
    borderRadius: radii.md,
    overflow: 'hidden',
  },
  cards: {
    gap: spacing.md,
  },
});
