import { StyleSheet, View } from 'react-native';
import { EmailPrefsCard } from '@/components/findings/email-prefs-card';
import { ProgramSwitcher } from '@/components/shell/program-switcher';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Badge } from '@/components/ui/chip';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { EmptyState } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { ROLE_LABELS } from '@/shared/schemas/auth';
import { MyGateActionsCard } from './my-gate-actions-card';
import { ProgramGlance } from './program-glance';

export function HomeScreen() {
  const { user, programs, currentProgramId, currentProgram, signOut } = useSession();
  const { isWide } = useBreakpoints();
  if (!user) return null;

  return (
    <Screen testID="home">
      <PageTitle title="Home" />
      <View style={styles.header}>
        <Heading level={1} variant="title">
          Signed in as{' '}
          <Text variant="title" testID="home-user-name">
            {user.name}
          </Text>
        </Heading>
        <View style={styles.identity}>
          <Badge label={ROLE_LABELS[user.role]} tone="primary" testID="home-role" />
          <Text variant="caption" tone="muted">
            {user.email}
          </Text>
        </View>
      </View>

      {currentProgram && user.role !== 'admin' ? <MyGateActionsCard programId={currentProgram.id} /> : null}

      <Card>
        <Heading level={2} variant="heading">
          Your programs
        </Heading>
        {programs.length === 0 ? (
          <EmptyState
            title="No programs yet"
            message="An administrator adds people to programs. Ask yours to add you to the vehicles you work on."
          />
        ) : isWide ? (
          <View style={styles.list} testID="home-programs">
            {programs.map((program) => {
              const current = program.id === currentProgramId;
              return (
                <View key={program.id} style={[styles.programRow, current && styles.programRowCurrent]}>
                  <View style={styles.programText}>
                    <Text variant="bodyStrong">{program.code}</Text>
                    <Text tone="muted" numberOfLines={1}>
                      {program.name}
                    </Text>
                  </View>
                  {current ? <Badge label="Current" tone="success" /> : null}
                </View>
              );
            })}
            <Text variant="caption" tone="muted">
              Change the current program in the side panel.
            </Text>
          </View>
        ) : (
          <ProgramSwitcher layout="list" />
        )}
      </Card>

      {currentProgram ? <ProgramGlance programId={currentProgram.id} programCode={currentProgram.code} /> : null}

      {user.role === 'admin' ? null : <EmailPrefsCard />}

      <Button label="Sign out" icon="logout" variant="secondary" onPress={signOut} testID="home-sign-out" />
    </Screen>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.sm,
  },
  identity: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.sm,
  },
  list: {
    gap: spacing.xs,
  },
  programRow: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    paddingVertical: spacing.sm,
    paddingHorizontal: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.border,
  },
  programRowCurrent: {
    borderColor: colors.success,
    backgroundColor: colors.successTint,
  },
  programText: {
    flex: 1,
    minWidth: 0,
  },
});
