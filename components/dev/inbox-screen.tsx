import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Icon } from '@/components/ui/icon';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { errorMessage, isApiError } from '@/hooks/api/api-client';
import { useDevMailQuery } from '@/hooks/queries/dev-mail';
import type { MailMessage } from '@/shared/schemas/admin';
import { LinkifiedText } from './linkified-text';

const MAIL_SENTENCES = {
  'mail/inbox-unavailable': 'The local mail fake is not answering. Start it again, then refresh.',
};

export const INBOX_UNAVAILABLE = 'The dev inbox is only available with the local mail fake.';

function formatDate(value: string): string {
  const date = new Date(value);
  return Number.isNaN(date.getTime()) ? value : date.toLocaleString();
}

export function InboxScreen() {
  const mail = useDevMailQuery();
  const [openId, setOpenId] = useState<string | null>(null);
  const unavailable =
    isApiError(mail.error) && (mail.error.status === 404 || mail.error.code === 'response/not-json');

  return (
    <Screen safeTop main testID="dev-inbox">
      <PageTitle title="Dev inbox" />
      <View style={styles.header}>
        <View style={styles.headerText}>
          <Heading level={1} variant="title">
            Dev inbox
          </Heading>
          <Text tone="muted">Mail caught by the local mail fake, newest first. Nothing here left this machine.</Text>
        </View>
        <Button
          label="Refresh"
          icon="refresh"
          variant="secondary"
          compact
          loading={mail.isFetching && !mail.isPending}
          onPress={() => void mail.refetch()}
          testID="dev-inbox-refresh"
        />
      </View>

      {mail.isPending ? (
        <LoadingState label="Loading mail…" />
      ) : unavailable ? (
        <Notice tone="warning" message={INBOX_UNAVAILABLE} testID="dev-inbox-unavailable" />
      ) : mail.isError ? (
        <ErrorState message={errorMessage(mail.error, MAIL_SENTENCES)} onRetry={() => void mail.refetch()} />
      ) : mail.data.length === 0 ? (
        <EmptyState title="No mail yet." message="Invitations and password links appear here a moment after they are sent." />
      ) : (
        <View style={styles.list} testID="dev-inbox-list">
          {mail.data.map((message) => (
            <MailItem
              key={message.id}
              message={message}
              open={openId === message.id}
              onToggle={() => setOpenId((current) => (current === message.id ? null : message.id))}
            />
          ))}
        </View>
      )}
      <TextLink href="/sign-in" label="Go to sign in" />
    </Screen>
  );
}

function MailItem({ message, open, onToggle }: { message: MailMessage; open: boolean; onToggle: () => void }) {
  const ring = useFocusRing();
  return (
    <Card padded={false} style={styles.item}>
      <Pressable
        accessibilityRole="button"
        accessibilityLabel={`${message.subject}, to ${message.to}, ${formatDate(message.date)}`}
        aria-expanded={open}
        onPress={onToggle}
        onFocus={ring.onFocus}
        onBlur={ring.onBlur}
        testID={`mail-${message.id}`}
        style={({ pressed }) => [styles.summary, pressed && styles.pressed, ring.focused && styles.focused]}
      >
        <View style={styles.summaryText}>
          <Text variant="bodyStrong" numberOfLines={open ? undefined : 1}>
            {message.subject}
          </Text>
          <Text variant="caption" tone="muted" numberOfLines={1}>
            To {message.to} · {formatDate(message.date)}
          </Text>
        </View>
        <View style={open ? styles.chevronOpen : undefined}>
          <Icon name="chevron-right" color={colors.textMuted} />
        </View>
      </Pressable>
      {open ? (
        <View style={styles.body}>
          <LinkifiedText text={message.text} testID={`mail-${message.id}-text`} />
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  header: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'flex-start',
    justifyContent: 'space-between',
    gap: spacing.md,
  },
  headerText: {
    flex: 1,
    minWidth: sizes.sideNav,
    gap: spacing.xs,
  },
  list: {
    gap: spacing.sm,
  },
  item: {
    overflow: 'hidden',
  },
  summary: {
    minHeight: sizes.control,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    padding: spacing.lg,
    borderRadius: radii.lg,
  },
  summaryText: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xxs,
  },
  pressed: {
    backgroundColor: colors.surfaceMuted,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: -sizes.focusRing,
  },
  chevronOpen: {
    transform: [{ rotate: '90deg' }],
  },
  body: {
    borderTopWidth: 1,
    borderTopColor: colors.border,
    padding: spacing.lg,
    backgroundColor: colors.bg,
  },
});
