import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useAdminUsersQuery } from '@/hooks/queries/admin';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { InviteUserForm } from './invite-user-form';
import { UserCard } from './user-card';

export function UsersScreen() {
  const { user: me, programs } = useSession();
  const { isWide } = useBreakpoints();
  const users = useAdminUsersQuery();
  const [filter, setFilter] = useState('');

  const shown = useMemo(() => {
    const needle = filter.trim().toLowerCase();
    const list = [...(users.data ?? [])].sort((a, b) => a.name.localeCompare(b.name));
    if (!needle) return list;
    return list.filter((item) => item.name.toLowerCase().includes(needle) || item.email.toLowerCase().includes(needle));
  }, [users.data, filter]);

  const list = (
    <View style={styles.list}>
      <TextField
        label="Find a person"
        value={filter}
        onChangeText={setFilter}
        placeholder="Name or e-mail"
        autoCapitalize="none"
        autoCorrect={false}
        testID="users-filter"
      />
      {users.isPending ? (
        <LoadingState label="Loading people…" />
      ) : users.isError ? (
        <ErrorState message={errorMessage(users.error)} onRetry={() => void users.refetch()} retrying={users.isFetching} />
      ) : shown.length === 0 ? (
        <EmptyState title={filter ? 'Nobody matches that search.' : 'No people yet.'} />
      ) : (
        <View style={styles.list} testID="users-list">
          <Text variant="caption" tone="muted">
            {shown.length === 1 ? '1 person' : `${shown.length} people`}
          </Text>
          {shown.map((item) => (
            <UserCard key={item.id} user={item} programs={programs} isSelf={item.id === me?.id} />
          ))}
        </View>
      )}
    </View>
  );

  return (
    <Screen testID="users-screen">
      <PageTitle title="Users" />
      <View style={styles.header}>
        <Heading level={1} variant="title">
          Users
        </Heading>
        <Text tone="muted">Invite people, choose their role and the programs they work on.</Text>
      </View>
      {isWide ? (
        <View style={styles.columns}>
          <View style={styles.mainColumn}>{list}</View>
          <View style={styles.sideColumn}>
            <InviteUserForm />
          </View>
        </View>
      ) : (
        <>
          <InviteUserForm />
          <Heading level={2} variant="heading">
            People
          </Heading>
          {list}
        </>
      )}
    </Screen>
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
  mainColumn: {
    flex: 3,
    minWidth: 0,
  },
  sideColumn: {
    flex: 2,
    minWidth: 0,
  },
  list: {
    gap: spacing.md,
  },
});
