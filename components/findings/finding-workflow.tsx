import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button, type ButtonVariant } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { findingConflictCurrent, useUpdateFindingMutation } from '@/hooks/queries/findings';
import { FINDING_ERROR_SENTENCES } from '@/shared/api/finding-paths';
import {
  FINDING_MEMBER_ROLES,
  allowedTransitions,
  checkTransition,
  isClosedStatus,
  type FindingActor,
  type FindingState,
} from '@/shared/domain/finding-workflow';
import type { Role } from '@/shared/schemas/auth';
import { FINDING_STATUS_LABELS, type Finding, type FindingStatus } from '@/shared/schemas/findings';
import { FindingStatusBadge } from './finding-badges';
import { actionLabel } from './finding-words';

export const findingState = (finding: Finding): FindingState => ({
  status: finding.status,
  severity: finding.severity,
  ownerId: finding.owner?.id ?? null,
  createdBy: finding.createdBy?.id ?? null,
});

const isMember = (role: Role) => (FINDING_MEMBER_ROLES as readonly Role[]).includes(role);

/** The moves this person may make now, in the order of the workflow (shared/domain/finding-workflow). */
export function movesFor(finding: Finding, actor: FindingActor | null): FindingStatus[] {
  if (!actor || !isMember(actor.role)) return [];
  return allowedTransitions(findingState(finding), actor);
}

const VARIANTS: Record<FindingStatus, ButtonVariant> = {
  'in-work': 'primary',
  fixed: 'primary',
  verified: 'primary',
  rejected: 'danger',
  open: 'secondary',
};

type Message = { tone: 'success' | 'warning' | 'danger'; text: string };

/** The status, with a button for each move this person may make; reject and reopen ask for a reason first. */
export function FindingWorkflow({ finding, actor, online }: { finding: Finding; actor: FindingActor | null; online: boolean }) {
  const update = useUpdateFindingMutation(finding.id);
  const [asking, setAsking] = useState<FindingStatus | null>(null);
  const [reason, setReason] = useState('');
  const [reasonError, setReasonError] = useState<string | undefined>();
  const [message, setMessage] = useState<Message | null>(null);
  const moves = movesFor(finding, actor);

  const send = (to: FindingStatus, why?: string) => {
    setMessage(null);
    update.mutate(
      { version: finding.version, status: to, ...(why ? { reason: why } : {}) },
      {
        onSuccess: (saved) => {
          setAsking(null);
          setReason('');
          setMessage({ tone: 'success', text: `Now ${FINDING_STATUS_LABELS[saved.status].toLowerCase()}.` });
        },
        onError: (error) => {
          const current = findingConflictCurrent(error);
          if (current) {
            setAsking(null);
            setMessage({
              tone: 'warning',
              text: `Someone changed this finding first: it is now ${FINDING_STATUS_LABELS[current.status].toLowerCase()}. Nothing of yours was saved; check it and choose again.`,
            });
          } else {
            setMessage({ tone: 'danger', text: errorMessage(error, FINDING_ERROR_SENTENCES) });
          }
        },
      },
    );
  };

  const press = (to: FindingStatus) => {
    const rule = actor ? checkTransition(findingState(finding), to, actor) : null;
    if (rule?.ok && rule.reasonRequired) {
      setAsking(to);
      setReason('');
      setReasonError(undefined);
      setMessage(null);
    } else {
      send(to);
    }
  };

  const submitReason = () => {
    if (!asking) return;
    const text = reason.trim();
    if (!text) {
      setReasonError(asking === 'rejected' ? 'Say why the finding is rejected.' : 'Say why the finding is reopened.');
      return;
    }
    send(asking, text);
  };

  return (
    <Card testID="finding-workflow">
      <Heading level={2} variant="heading">
        Status
      </Heading>
      <View style={styles.statusRow}>
        <FindingStatusBadge status={finding.status} testID="finding-status" />
      </View>
      {finding.status === 'rejected' && finding.rejectReason ? (
        <Text testID="finding-reject-reason">Rejected because: {finding.rejectReason}</Text>
      ) : null}
      {moves.length > 0 && !asking ? (
        <View style={styles.actions}>
          {moves.map((to) => (
            <Button
              key={to}
              label={actionLabel(finding.status, to)}
              variant={VARIANTS[to]}
              compact
              disabled={!online || update.isPending}
              loading={update.isPending && update.variables?.status === to}
              accessibilityHint={`Moves the finding to ${FINDING_STATUS_LABELS[to].toLowerCase()}`}
              onPress={() => press(to)}
              testID={`finding-action-${to}`}
            />
          ))}
        </View>
      ) : null}
      {asking ? (
        <View style={styles.reason}>
          <TextField
            label={asking === 'rejected' ? 'Why is it rejected?' : 'Why is it reopened?'}
            value={reason}
            onChangeText={(text) => {
              setReason(text);
              setReasonError(undefined);
            }}
            multiline
            maxLength={500}
            error={reasonError}
            hint="Kept in the history and sent to the owner and watchers."
            testID="finding-reason"
          />
          <View style={styles.actions}>
            <Button
              label={asking === 'rejected' ? 'Reject the finding' : 'Reopen the finding'}
              variant={asking === 'rejected' ? 'danger' : 'primary'}
              compact
              disabled={!online}
              loading={update.isPending}
              onPress={submitReason}
              testID="finding-reason-submit"
            />
            <Button label="Cancel" variant="ghost" compact onPress={() => setAsking(null)} testID="finding-reason-cancel" />
          </View>
        </View>
      ) : null}
      {moves.length === 0 && !isClosedStatus(finding.status) ? (
        <Text variant="caption" tone="muted" testID="finding-no-moves">
          {finding.status === 'fixed'
            ? 'An engineer or a lead checks the fix and verifies it.'
            : 'The owner, an engineer or a lead moves this finding on.'}
        </Text>
      ) : null}
      {!online && moves.length > 0 ? (
        <Text variant="caption" tone="warning">
          Changing the status needs a connection. Comments can still be written; they wait on this device.
        </Text>
      ) : null}
      {message ? <Notice tone={message.tone} message={message.text} testID="finding-workflow-message" /> : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  statusRow: {
    flexDirection: 'row',
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  reason: {
    gap: spacing.md,
  },
});
