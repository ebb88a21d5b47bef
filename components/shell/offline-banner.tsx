import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Icon } from '@/components/ui/icon';
import { Text } from '@/components/ui/text';
import { colors, sizes, spacing } from '@/components/theme/tokens';
import { useOfflineQueue, type QueuedChange } from '@/hooks/offline/use-offline-queue';

export function waitingWords(count: number): string {
  return `${count} ${count === 1 ? 'change' : 'changes'} waiting to send`;
}

/**
 * The shell's strip for the offline queue: shown while offline, while changes kept on this
 * device wait to be sent, and when one of them was refused (with Try again and Discard).
 */
export function OfflineBanner() {
  const { online, waiting, failed, dismiss, retry, sendNow } = useOfflineQueue();
  if (online && waiting.length === 0 && failed.length === 0) return null;
  const anyPaused = waiting.some((change) => change.paused);
  return (
    <View style={[styles.banner, online ? styles.onlineTone : styles.offlineTone]} role="status" aria-live="polite" testID="offline-queue">
      {!online || waiting.length > 0 ? (
        <View style={styles.line}>
          <Icon name={online ? 'refresh' : 'warning'} size={sizes.iconSm} color={online ? colors.primary : colors.warning} />
          <Text variant="bodyStrong" tone={online ? 'primary' : 'warning'} style={styles.text}>
            {online ? '' : 'Offline. '}
            <Text variant="bodyStrong" tone={online ? 'primary' : 'warning'} testID="offline-queue-count">
              {waiting.length > 0 ? waitingWords(waiting.length) : 'New findings, comments and checklist ticks are kept on this device.'}
            </Text>
            {online && waiting.length > 0 && !anyPaused ? ' · sending now' : ''}
          </Text>
          {online && anyPaused ? <Button label="Send now" variant="secondary" compact onPress={sendNow} testID="offline-queue-send" /> : null}
        </View>
      ) : null}
      {failed.map((change) => (
        <FailedChange key={change.id} change={change} onRetry={() => retry(change.id)} onDismiss={() => dismiss(change.id)} />
      ))}
    </View>
  );
}

function FailedChange({ change, onRetry, onDismiss }: { change: QueuedChange; onRetry: () => void; onDismiss: () => void }) {
  return (
    <View style={styles.failed} testID={`offline-queue-failed-${change.id}`}>
      <Text tone="danger">
        <Text tone="danger" weight="semibold">
          Not sent: {change.label}.
        </Text>{' '}
        {change.error}
      </Text>
      <View style={styles.actions}>
        <Button label="Try again" variant="secondary" compact onPress={onRetry} />
        <Button label="Discard" variant="ghost" compact accessibilityLabel={`Discard ${change.label}`} onPress={onDismiss} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  banner: {
    gap: spacing.sm,
    paddingHorizontal: spacing.lg,
    paddingVertical: spacing.sm,
    borderBottomWidth: 1,
  },
  offlineTone: {
    backgroundColor: colors.warningTint,
    borderBottomColor: colors.warning,
  },
  onlineTone: {
    backgroundColor: colors.primaryTint,
    borderBottomColor: colors.primary,
  },
  line: {
    flexDirection: 'row',
    alignItems: 'center',
    flexWrap: 'wrap',
    gap: spacing.sm,
    minHeight: sizes.touch,
  },
  text: {
    flex: 1,
    minWidth: 0,
  },
  failed: {
    gap: spacing.xs,
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
