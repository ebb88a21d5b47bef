import { StyleSheet } from 'react-native';
import { GateActionItem } from '@/components/gates/gate-action-item';
import { actionSummary } from '@/components/gates/my-actions-screen';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useMyGateActionsQuery } from '@/hooks/queries/readiness';

const SHOWN = 3;

/** The signed-in user's open gate actions on the home page; nothing at all for someone who has none. */
export function MyGateActionsCard({ programId }: { programId: string }) {
  const list = useMyGateActionsQuery(programId);
  if (list.isPending) return null;
  if (list.isError) return <Notice tone="warning" message={`Your gate actions could not be loaded: ${errorMessage(list.error)}`} testID="home-gate-actions-error" />;
  const items = list.data;
  if (items.length === 0) return null;
  const open = items.filter((a) => a.status !== 'done');
  return (
    <Card style={styles.card} testID="home-gate-actions">
      <Heading level={2} variant="heading">
        Your gate actions
      </Heading>
      <Text tone={open.some((a) => a.overdue) ? 'danger' : 'muted'} testID="home-gate-actions-summary">
        {actionSummary(items)}
      </Text>
      {open.slice(0, SHOWN).map((action, i) => (
        <GateActionItem key={action.id} action={action} canMove show="review" testID={`home-action-${i}`} />
      ))}
      {open.length > SHOWN ? <Text tone="muted" variant="caption">{`and ${open.length - SHOWN} more`}</Text> : null}
      <TextLink href="/gates/actions" label="All your gate actions" testID="home-gate-actions-link" />
    </Card>
  );
}

const styles = StyleSheet.create({
  card: { gap: spacing.md },
});
