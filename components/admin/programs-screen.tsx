import { Pressable, StyleSheet, View } from 'react-native';
import { Card } from '@/components/ui/card';
import { Badge } from '@/components/ui/chip';
import { Icon } from '@/components/ui/icon';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useAdminProgramsQuery, type AdminProgramSummary } from '@/hooks/queries/admin';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { CreateProgramForm } from './create-program-form';
import { ProgramMembersPanel } from './program-members-panel';

export function ProgramsScreen({
  selectedId,
  onSelect,
}: {
  selectedId: string | null;
  onSelect: (programId: string | null) => void;
}) {
  const { isWide } = useBreakpoints();
  const programs = useAdminProgramsQuery();

  const list = programs.isPending ? (
    <LoadingState label="Loading programs…" />
  ) : programs.isError ? (
    <ErrorState message={errorMessage(programs.error)} onRetry={() => void programs.refetch()} retrying={programs.isFetching} />
  ) : programs.data.length === 0 ? (
    <EmptyState title="No programs yet." message="Create the first one with its code and name." />
  ) : (
    <View style={styles.list} testID="programs-list">
      {[...programs.data]
        .sort((a, b) => a.code.localeCompare(b.code))
        .map((program) => (
          <ProgramRow
            key={program.id}
            program={program}
            selected={program.id === selectedId}
            onPress={() => onSelect(program.id)}
          />
        ))}
    </View>
  );

  const header = (
    <View style={styles.header}>
      <Heading level={1} variant="title">
        Programs
      </Heading>
      <Text tone="muted">Each program is a vehicle project. People see only the programs they belong to.</Text>
    </View>
  );

  if (isWide) {
    return (
      <Screen testID="programs-screen">
        <PageTitle title="Programs" />
        {header}
        <View style={styles.columns}>
          <View style={styles.column}>
            {list}
            <CreateProgramForm onCreated={onSelect} />
          </View>
          <View style={styles.column}>
            {selectedId ? (
              <ProgramMembersPanel programId={selectedId} />
            ) : (
              <EmptyState title="Choose a program" message="Its members appear here, ready to change." />
            )}
          </View>
        </View>
      </Screen>
    );
  }

  if (selectedId) {
    return (
      <Screen testID="programs-screen">
        <PageTitle title="Program members" />
        <ProgramMembersPanel programId={selectedId} onClose={() => onSelect(null)} />
      </Screen>
    );
  }

  return (
    <Screen testID="programs-screen">
      <PageTitle title="Programs" />
      {header}
      {list}
      <CreateProgramForm />
    </Screen>
  );
}

function ProgramRow({ program, selected, onPress }: { program: AdminProgramSummary; selected: boolean; onPress: () => void }) {
  const ring = useFocusRing();
  const members = program.memberCount === 1 ? '1 member' : `${program.memberCount} members`;
  return (
    <Pressable
      accessibilityRole="button"
      accessibilityLabel={`${program.code}, ${program.name}, ${members}. Open members`}
      aria-pressed={selected}
      onPress={onPress}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      testID={`program-${program.code}`}
      style={({ pressed }) => [ring.focused && styles.focused, pressed && styles.pressed]}
    >
      <Card style={[styles.row, selected && styles.rowSelected]}>
        <View style={styles.rowText}>
          <Text variant="bodyStrong">{program.code}</Text>
          <Text tone="muted" numberOfLines={1}>
            {program.name}
          </Text>
        </View>
        <Badge label={members} tone={selected ? 'primary' : 'neutral'} testID={`program-${program.code}-count`} />
        <Icon name="chevron-right" color={colors.textMuted} />
      </Card>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.xs,
  },
  columns: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.xl,
  },
  column: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xl,
  },
  list: {
    gap: spacing.sm,
  },
  row: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    minHeight: sizes.control,
  },
  rowSelected: {
    borderColor: colors.primary,
    backgroundColor: colors.primaryTint,
  },
  rowText: {
    flex: 1,
    minWidth: 0,
  },
  pressed: {
    opacity: 0.85,
  },
  focused: {
    borderRadius: radii.lg,
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
});
