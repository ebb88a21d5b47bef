import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Badge } from '@/components/ui/chip';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { formatDateTime } from '@/components/assets/asset-words';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { randomId } from '@/hooks/api/ids';
import { useAddCommentMutation, useFindingCommentsQuery, usePendingComments } from '@/hooks/queries/findings';
import { FINDING_ERROR_SENTENCES } from '@/shared/api/finding-paths';
import { CreateCommentSchema, type Comment } from '@/shared/schemas/findings';

/**
 * Comments, oldest first, then those written on this device and not yet sent. A comment made
 * without a connection waits on the device with its Idempotency-Key and is sent once.
 */
export function FindingComments({ findingId, canComment, online }: { findingId: string; canComment: boolean; online: boolean }) {
  const comments = useFindingCommentsQuery(findingId);
  const pending = usePendingComments(findingId);
  const add = useAddCommentMutation();
  const [body, setBody] = useState('');
  const [error, setError] = useState<string | undefined>();
  const [failed, setFailed] = useState<string | null>(null);

  const submit = () => {
    const parsed = CreateCommentSchema.safeParse({ body });
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message);
      return;
    }
    setFailed(null);
    const draft = { key: randomId(), findingId, body: parsed.data.body, writtenAt: new Date().toISOString() };
    setBody('');
    add.mutate(draft, {
      onError: (reason) => {
        setBody((text) => text || draft.body);
        setFailed(errorMessage(reason, FINDING_ERROR_SENTENCES));
      },
    });
  };

  const sent = comments.data ?? [];
  const sentIds = new Set(sent.map((comment) => comment.id));
  return (
    <View style={styles.wrap} testID="finding-comments">
      {comments.isPending && !comments.isPaused ? <LoadingState label="Loading comments…" /> : null}
      {comments.isError ? <ErrorState message={errorMessage(comments.error)} onRetry={() => void comments.refetch()} /> : null}
      {comments.isSuccess && sent.length === 0 && pending.length === 0 ? <EmptyState title="No comments yet." /> : null}
      {sent.map((comment) => (
        <CommentRow key={comment.id} comment={comment} />
      ))}
      {pending
        .filter((draft) => !sentIds.has(draft.key))
        .map((draft) => (
          <View key={draft.key} style={styles.comment} testID={`comment-pending-${draft.key}`}>
            <View style={styles.meta}>
              <Text variant="caption" tone="muted">
                You · {formatDateTime(draft.writtenAt)}
              </Text>
              <Badge label={online ? 'Sending…' : 'Waiting to send'} tone="warning" />
            </View>
            <Text>{draft.body}</Text>
          </View>
        ))}
      {canComment ? (
        <View style={styles.form}>
          <TextField
            label="Add a comment"
            value={body}
            onChangeText={(text) => {
              setBody(text);
              setError(undefined);
            }}
            multiline
            maxLength={4000}
            error={error}
            hint={online ? undefined : 'No connection: the comment waits on this device and is sent when the connection is back.'}
            testID="comment-input"
          />
          <Button label={online ? 'Send comment' : 'Save comment'} compact onPress={submit} testID="comment-submit" />
          {failed ? <Notice message={failed} testID="comment-error" /> : null}
        </View>
      ) : null}
    </View>
  );
}

function CommentRow({ comment }: { comment: Comment }) {
  return (
    <View style={styles.comment} testID={`comment-${comment.id}`}>
      <Text variant="caption" tone="muted">
        {comment.author?.name ?? 'Someone'} · {formatDateTime(comment.createdAt)}
      </Text>
      <Text selectable>{comment.body}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: {
    gap: spacing.md,
  },
  comment: {
    gap: spacing.xxs,
    paddingBottom: spacing.sm,
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
  },
  meta: {
    flexDirection: 'row',
    alignItems: 'center',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  form: {
    gap: spacing.sm,
  },
});
