import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Select } from '@/components/ui/select';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useAdminProgramQuery, useAdminUsersQuery, useSetProgramMembersMutation } from '@/hooks/queries/admin';
import { useSession } from '@/hooks/use-session';
import type { User } from '@/shared/schemas/auth';
import { ROLE_LABELS } from '@/shared/schemas/auth';

export function ProgramMembersPanel({ programId, onClose }: { programId: string; onClose?: () => void }) {
  const detail = useAdminProgramQuery(programId);
  const users = useAdminUsersQuery();
  const setMembers = useSetProgramMembersMutation();
  const { user: me } = useSession();
  const [draft, setDraft] = useState<string[] | null>(null);
  const [filter, setFilter] = useState('');
  const [saved, setSaved] = useState(false);

  // The draft restarts whenever the server's member list changes (a save, or another admin).
  const memberKey = detail.data ? detail.data.members.map((member) => member.id).sort().join(',') : null;
  const [draftFor, setDraftFor] = useState<string | null>(null);
  if (memberKey !== draftFor) {
    setDraftFor(memberKey);
    setDraft(detail.data ? detail.data.members.map((member) => member.id) : null);
  }

  const candidates = useMemo(() => {
    const byId = new Map<string, User>();
    for (const member of detail.data?.members ?? []) byId.set(member.id, member);
    for (const user of users.data ?? []) byId.set(user.id, user);
    const needle = filter.trim().toLowerCase();
    return [...byId.values()]
      .filter((user) => !needle || user.name.toLowerCase().includes(needle) || user.email.toLowerCase().includes(needle))
      .sort((a, b) => a.name.localeCompare(b.name));
  }, [detail.data, users.data, filter]);

  if (detail.isPending) return <LoadingState label="Loading the program…" />;
  if (detail.isError) {
    return <ErrorState message={errorMessage(detail.error)} onRetry={() => void detail.refetch()} retrying={detail.isFetching} />;
  }

  const program = detail.data;
  const selected = draft ?? [];
  const changed = memberKey !== [...selected].sort().join(',');

  const save = async () => {
    setSaved(false);
    try {
      await setMembers.mutateAsync({ programId: program.id, userIds: selected });
      setSaved(true);
    } catch {
      // The mutation's error is shown below.
    }
  };

  return (
    <Card testID="program-detail">
      {onClose ? <Button label="All programs" icon="back" variant="ghost" compact onPress={onClose} testID="program-detail-close" /> : null}
      <View style={styles.title}>
        <Heading level={2} variant="heading">
          {program.code} · {program.name}
        </Heading>
        <Text variant="caption" tone="muted">
          {program.members.length === 1 ? '1 member' : `${program.members.length} members`}
        </Text>
      </View>

      <TextField
        label="Find a person"
        value={filter}
        onChangeText={setFilter}
        placeholder="Name or e-mail"
        autoCapitalize="none"
        autoCorrect={false}
        testID="program-members-filter"
      />
      {users.isError ? <Notice tone="warning" message="The full list of people could not load; only current members are shown." /> : null}
      <Select
        multiple
        layout="list"
        label="Members"
        options={candidates.map((user) => ({
          value: user.id,
          label: user.id === me?.id ? `${user.name} (you)` : user.name,
          description: `${user.email} · ${ROLE_LABELS[user.role]}${user.active ? '' : ' · deactivated'}`,
          // Administrators keep themselves in the programs they manage; the server insists too.
          disabled: user.id === me?.id && selected.includes(user.id),
          testID: `member-${user.email}`,
        }))}
        value={selected}
        onChange={(ids) => {
          setSaved(false);
          setDraft(ids);
        }}
        testID="program-members"
      />
      {saved && !changed ? <Notice tone="success" message="Members saved." testID="program-members-saved" /> : null}
      {setMembers.isError ? <Notice message={errorMessage(setMembers.error)} testID="program-members-error" /> : null}
      <Button
        label="Save members"
        onPress={() => void save()}
        disabled={!changed}
        loading={setMembers.isPending}
        testID="program-members-save"
      />
    </Card>
  );
}

const styles = StyleSheet.create({
  title: {
    gap: spacing.xxs,
  },
});
