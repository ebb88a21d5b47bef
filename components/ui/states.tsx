import { ActivityIndicator, StyleSheet, View } from 'react-native';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { Button } from './button';
import { Card } from './card';
import { Text } from './text';

export function LoadingState({ label = 'Loading…', testID }: { label?: string; testID?: string }) {
  return (
    <View style={styles.center} accessibilityRole="progressbar" accessibilityLabel={label} aria-busy testID={testID}>
      <ActivityIndicator color={colors.primary} />
      <Text tone="muted">{label}</Text>
    </View>
  );
}

export function ErrorState({
  message,
  onRetry,
  retrying = false,
  testID,
}: {
  message: string;
  onRetry?: () => void;
  retrying?: boolean;
  testID?: string;
}) {
  return (
    <Card style={styles.error} testID={testID}>
      <Text accessibilityRole="alert" tone="danger">
        {message}
      </Text>
      {onRetry ? <Button label="Try again" variant="secondary" compact loading={retrying} onPress={onRetry} /> : null}
    </Card>
  );
}

export function EmptyState({
  title,
  message,
  testID,
}: {
  title: string;
  message?: string;
  testID?: string;
}) {
  return (
    <Card tone="muted" style={styles.empty} testID={testID}>
      <Text variant="bodyStrong">{title}</Text>
      {message ? <Text tone="muted">{message}</Text> : null}
    </Card>
  );
}

/** A sentence in a tinted box; `role=alert` for failures so screen readers announce it. */
export function Notice({
  message,
  tone = 'danger',
  testID,
}: {
  message: string;
  tone?: 'danger' | 'success' | 'warning';
  testID?: string;
}) {
  return (
    <View
      style={[styles.notice, noticeTones[tone]]}
      accessibilityRole={tone === 'danger' ? 'alert' : undefined}
      aria-live="polite"
      testID={testID}
    >
      <Text tone={tone}>{message}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  center: {
    paddingVertical: spacing.xxl,
    alignItems: 'center',
    justifyContent: 'center',
    gap: spacing.md,
  },
  error: {
    borderColor: colors.danger,
    alignItems: 'flex-start',
  },
  empty: {
    alignItems: 'flex-start',
    gap: spacing.xs,
  },
  notice: {
    borderRadius: radii.md,
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.md,
    borderWidth: 1,
  },
});

const noticeTones = StyleSheet.create({
  danger: { backgroundColor: colors.dangerTint, borderColor: colors.danger },
  success: { backgroundColor: colors.successTint, borderColor: colors.success },
  warning: { backgroundColor: colors.warningTint, borderColor: colors.warning },
});
