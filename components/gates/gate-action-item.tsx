import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { formatDate, formatDateTime } from '@/components/assets/asset-words';
import { Button } from '@/components/ui/button';
import { Badge } from '@/components/ui/chip';
import { Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useUpdateGateActionMutation } from '@/hooks/queries/readiness';
import type { Role } from '@/shared/schemas/auth';
import { GATE_ACTION_STATUS_LABELS, type GateAction, type GateActionStatus } from '@/shared/schemas/readiness';

/** Who may move an action: its owner or a lead (the server's rule; this only hides the controls). */
export function canMoveAction(action: Pick<GateAction, 'owner'>, userId: string | null | undefined, role: Role | null | undefined): boolean {
  return role === 'lead' || (Boolean(userId) && action.owner?.id === userId);
}

/** "Due 12 Dec 2026", "Was due 1 Dec 2026, overdue", "Done 4 Dec 2026". */
export function dueWords(action: GateAction): string {
  if (action.status === 'done') return `Done ${formatDate(action.updatedAt)} · was due ${formatDate(action.dueDate)}`;
  return action.overdue ? `Was due ${formatDate(action.dueDate)}` : `Due ${formatDate(action.dueDate)}`;
}

const statusTone = (action: GateAction) => (action.status === 'done' ? 'success' : action.status === 'in-work' ? 'primary' : 'neutral');

/**
 * One action of a conditional go: what, when due, its status and the note left with it; for its
 * owner or a lead, the controls to start it, mark it done with a note, or reopen it.
 */
export function GateActionItem({
  action,
  canMove,
  show,
  testID,
}: {
  action: GateAction;
  canMove: boolean;
  /** `owner` on the review page; `review`: the stage and review it came from, with a link (the owner's own list). */
  show: 'owner' | 'review';
  testID: string;
}) {
  const move = useUpdateGateActionMutation();
  const [closing, setClosing] = useState<GateActionStatus | null>(null);
  const [note, setNote] = useState('');
  const [error, setError] = useState<string | null>(null);

  const send = async (status: GateActionStatus, withNote?: string) => {
    setError(null);
    try {
      await move.mutateAsync({ id: action.id, reviewId: action.reviewId, status, version: action.version, note: withNote?.trim() || undefined });
      setClosing(null);
      setNote('');
    } catch (cause) {
      setError(errorMessage(cause, { 'request/conflict': 'Someone changed this action first. It is shown as it is now: try again.' }));
    }
  };

  const done = action.status === 'done';
  return (
    <View style={[styles.item, action.overdue ? styles.overdue : done ? styles.done : null]} testID={testID}>
      <Text variant="bodyStrong">{action.title}</Text>
      <View style={styles.meta}>
        {action.overdue ? <Badge label="Overdue" tone="danger" testID={`${testID}-overdue`} /> : null}
        <Badge label={GATE_ACTION_STATUS_LABELS[action.status]} tone={statusTone(action)} testID={`${testID}-status`} />
        <Text tone={action.overdue ? 'danger' : 'muted'} variant="caption" style={styles.due}>
          {show === 'owner' ? `${dueWords(action)} · owner ${action.owner?.name ?? 'nobody'}` : dueWords(action)}
        </Text>
      </View>
      {show === 'review' ? (
        <TextLink
          href={`/gates/${action.reviewId}`}
          label={`${action.stageName} gate review${action.reviewDecidedAt ? `, decided ${formatDate(action.reviewDecidedAt)}` : ''}`}
          testID={`${testID}-review`}
        />
      ) : null}
      {action.note ? (
        <Text variant="caption" testID={`${testID}-note`}>
          {`Note${action.updatedBy ? ` from ${action.updatedBy.name}` : ''}, ${formatDateTime(action.updatedAt)}: ${action.note}`}
        </Text>
      ) : null}
      {canMove && closing ? (
        <View style={styles.form}>
          <TextField
            label={closing === 'done' ? 'What was done (optional)' : 'Why it is open again (optional)'}
            value={note}
            onChangeText={setNote}
            multiline
            maxLength={2000}
            testID={`${testID}-note-field`}
          />
          <View style={styles.buttons}>
            <Button
              label={closing === 'done' ? 'Mark done' : 'Reopen'}
              icon={closing === 'done' ? 'check' : 'refresh'}
              compact
              loading={move.isPending}
              onPress={() => void send(closing, note)}
              testID={`${testID}-confirm`}
            />
            <Button label="Cancel" variant="ghost" compact onPress={() => setClosing(null)} disabled={move.isPending} testID={`${testID}-cancel`} />
          </View>
        </View>
      ) : canMove ? (
        <View style={styles.buttons}>
          {done ? (
            <Button label="Reopen" icon="refresh" variant="secondary" compact onPress={() => setClosing('open')} accessibilityLabel={`Reopen: ${action.title}`} testID={`${testID}-reopen`} />
          ) : (
            <>
              <Button label="Mark done" icon="check" compact onPress={() => setClosing('done')} accessibilityLabel={`Mark done: ${action.title}`} testID={`${testID}-done`} />
              {action.status === 'open' ? (
                <Button
                  label="Start work"
                  variant="secondary"
                  compact
                  loading={move.isPending}
                  onPress={() => void send('in-work')}
                  accessibilityLabel={`Start work: ${action.title}`}
                  testID={`${testID}-start`}
                />
              ) : null}
            </>
          )}
        </View>
      ) : null}
      {error ? <Notice message={error} testID={`${testID}-error`} /> : null}
    </View>
  );
}

const styles = StyleSheet.create({
  item: {
    gap: spacing.xs,
    paddingVertical: spacing.sm,
    paddingHorizontal: spacing.md,
    borderLeftWidth: 4,
    borderColor: colors.border,
    borderRadius: radii.sm,
    backgroundColor: colors.surface,
  },
  overdue: { borderColor: colors.danger, backgroundColor: colors.dangerTint },
  done: { borderColor: colors.success },
  meta: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  due: { flexShrink: 1 },
  form: { gap: spacing.sm, paddingTop: spacing.xs },
  buttons: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm, paddingTop: spacing.xs },
});
