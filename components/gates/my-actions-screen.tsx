import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useMyGateActionsQuery } from '@/hooks/queries/readiness';
import { useSession } from '@/hooks/use-session';
import type { GateAction } from '@/shared/schemas/readiness';
import { GateActionItem } from './gate-action-item';

const DONE_SHOWN = 5;

/** "Two open, one overdue." */
export function actionSummary(actions: readonly GateAction[]): string {
  const open = actions.filter((a) => a.status !== 'done');
  const overdue = open.filter((a) => a.overdue).length;
  if (open.length === 0) return actions.length ? `Nothing open. ${actions.length === 1 ? 'One action' : `${actions.length} actions`} done.` : 'No actions.';
  return `${open.length} open${overdue ? `, ${overdue} overdue` : ''}.`;
}

/**
 * The gate actions the signed-in user owns in the current program: open ones first (overdue at
 * the top, marked), each with the review and stage it came from, to start or mark done with a
 * note; the done ones below.
 */
export function MyGateActionsScreen() {
  const { user, currentProgramId, currentProgram } = useSession();
  const isAdmin = user?.role === 'admin';
  const list = useMyGateActionsQuery(currentProgramId, { enabled: !isAdmin });
  const [allDone, setAllDone] = useState(false);

  const items = list.data ?? [];
  const open = items.filter((a) => a.status !== 'done');
  const done = items.filter((a) => a.status === 'done');

  return (
    <Screen testID="my-gate-actions">
      <PageTitle title="Your gate actions" />
      <TextLink href="/gates" label="Gate reviews" testID="my-gate-actions-reviews" />
      <View style={styles.header}>
        <Heading level={1} variant="title">
          Your gate actions
        </Heading>
        <Text tone="muted">
          {`${currentProgram ? `${currentProgram.code}: ` : ''}what a conditional go asked of you, with a due date. Mark an action done when it is; the lead sees it on the review.`}
        </Text>
      </View>
      {isAdmin ? (
        <EmptyState title="Administrators own no gate actions." message="A lead gives actions to the people who work in the program." />
      ) : !currentProgramId ? (
        <EmptyState title="No program chosen" message="Join a program to see your gate actions." />
      ) : list.isPending ? (
        <LoadingState label="Loading your gate actions…" />
      ) : list.isError ? (
        <ErrorState message={errorMessage(list.error)} onRetry={() => void list.refetch()} retrying={list.isFetching} />
      ) : items.length === 0 ? (
        <EmptyState title="No gate actions for you." message="When a lead records a conditional go with an action for you, it shows here and on your home page." testID="my-gate-actions-empty" />
      ) : (
        <>
          <Card style={styles.card} testID="my-gate-actions-open">
            <Heading level={2} variant="heading">
              Open
            </Heading>
            <Text tone="muted" testID="my-gate-actions-summary">
              {actionSummary(items)}
            </Text>
            {open.map((action, i) => (
              <GateActionItem key={action.id} action={action} canMove show="review" testID={`my-action-${i}`} />
            ))}
          </Card>
          {done.length ? (
            <Card style={styles.card} testID="my-gate-actions-done">
              <Heading level={2} variant="heading">
                Done
              </Heading>
              {(allDone ? done : done.slice(0, DONE_SHOWN)).map((action, i) => (
                <GateActionItem key={action.id} action={action} canMove show="review" testID={`my-done-action-${i}`} />
              ))}
              {done.length > DONE_SHOWN && !allDone ? (
                <Button label={`Show all ${done.length} done`} variant="ghost" compact onPress={() => setAllDone(true)} testID="my-gate-actions-all-done" />
              ) : null}
            </Card>
          ) : null}
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  header: { gap: spacing.xs },
  card: { gap: spacing.md },
});
