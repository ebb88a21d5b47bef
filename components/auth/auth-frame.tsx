import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { Wordmark } from '@/components/shell/wordmark';
import { Card } from '@/components/ui/card';
import { Screen } from '@/components/ui/screen';
import { Heading, Text } from '@/components/ui/text';
import { spacing } from '@/components/theme/tokens';

/** The calm single-card page used by sign-in, forgot password and set password. */
export function AuthFrame({
  title,
  intro,
  children,
  footer,
}: {
  title: string;
  intro?: string;
  children: ReactNode;
  footer?: ReactNode;
}) {
  return (
    <Screen narrow safeTop main>
      <View style={styles.brand}>
        <Wordmark size="title" />
        <Text tone="muted">The build and test record for your prototype fleet.</Text>
      </View>
      <Card style={styles.card}>
        <Heading level={1} variant="title">
          {title}
        </Heading>
        {intro ? <Text tone="muted">{intro}</Text> : null}
        <View style={styles.body}>{children}</View>
      </Card>
      {footer ? <View style={styles.footer}>{footer}</View> : null}
    </Screen>
  );
}

const styles = StyleSheet.create({
  brand: {
    gap: spacing.xs,
    marginTop: spacing.xl,
  },
  card: {
    padding: spacing.xl,
    gap: spacing.md,
  },
  body: {
    gap: spacing.lg,
    marginTop: spacing.xs,
  },
  footer: {
    alignItems: 'center',
    gap: spacing.sm,
  },
});
