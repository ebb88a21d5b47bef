import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Card } from '@/components/ui/card';
import { Checkbox } from '@/components/ui/checkbox';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useEmailPrefsQuery, useUpdateEmailPrefsMutation } from '@/hooks/queries/findings';
import { EMAIL_KINDS, EMAIL_KIND_LABELS, type EmailKind, type EmailPrefs } from '@/shared/schemas/findings';

const HINTS: Record<EmailKind, string> = {
  assigned: 'With a link to the finding',
  status: 'Open, in work, fixed, verified, rejected or reopened',
  digest: 'Once a day, only when a finding you own (or, for a lead, one in your programs) is overdue',
  fleet: 'A vehicle booked for you to drive, a change to that booking, and returns that are overdue',
};

/** Which e-mails about findings and vehicle bookings this person gets; each switch saves at once. */
export function EmailPrefsCard() {
  const prefs = useEmailPrefsQuery();
  const save = useUpdateEmailPrefsMutation();
  const [error, setError] = useState<string | null>(null);

  const toggle = (current: EmailPrefs, kind: EmailKind, on: boolean) => {
    setError(null);
    save.mutate({ ...current, [kind]: on }, { onError: (reason) => setError(errorMessage(reason)) });
  };

  return (
    <Card testID="email-prefs">
      <Heading level={2} variant="heading">
        E-mails I get
      </Heading>
      {prefs.isPending ? (
        prefs.isPaused ? (
          <Text tone="muted">These settings show when the connection is back.</Text>
        ) : (
          <LoadingState label="Loading your e-mail settings…" />
        )
      ) : prefs.isError ? (
        <ErrorState message={errorMessage(prefs.error)} onRetry={() => void prefs.refetch()} />
      ) : (
        <View style={styles.list}>
          {EMAIL_KINDS.map((kind) => (
            <Checkbox
              key={kind}
              label={EMAIL_KIND_LABELS[kind]}
              description={HINTS[kind]}
              checked={prefs.data[kind]}
              onChange={(on) => toggle(prefs.data, kind, on)}
              testID={`email-pref-${kind}`}
            />
          ))}
        </View>
      )}
      {error ? <Notice message={error} testID="email-prefs-error" /> : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  list: {
    gap: spacing.xs,
  },
});
