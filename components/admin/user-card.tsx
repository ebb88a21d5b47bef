import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Badge } from '@/components/ui/chip';
import { Select } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage, isApiError } from '@/hooks/api/api-client';
import { useUpdateUserMutation } from '@/hooks/queries/admin';
import type { AdminUser } from '@/shared/schemas/admin';
import { ROLE_LABELS, type Program, type Role } from '@/shared/schemas/auth';
import { ROLE_OPTIONS, programOptions } from './role-options';

export const USER_CONFLICT = 'Someone else changed this user; the list is refreshed.';

type Draft = { role: Role; programIds: string[] };

export function UserCard({ user, programs, isSelf }: { user: AdminUser; programs: readonly Program[]; isSelf: boolean }) {
  const update = useUpdateUserMutation();
  const [editing, setEditing] = useState(false);
  const [draft, setDraft] = useState<Draft>({ role: user.role, programIds: user.programIds });
  const [notice, setNotice] = useState<{ tone: 'success' | 'danger'; message: string } | null>(null);

  // When a newer version arrives (our save, someone else's, or a refresh after a 409), the form
  // restarts from it so the next save carries the right version and values.
  const [draftVersion, setDraftVersion] = useState(user.version);
  if (draftVersion !== user.version) {
    setDraftVersion(user.version);
    setDraft({ role: user.role, programIds: user.programIds });
  }

  const known = new Map(programs.map((program) => [program.id, program]));
  const programCodes = user.programIds.map((id) => known.get(id)?.code).filter(Boolean);
  const otherPrograms = user.programIds.length - programCodes.length;
  // Programs the admin cannot see stay as they are when the admin saves.
  const hiddenIds = user.programIds.filter((id) => !known.has(id));

  const save = async (change: Partial<Pick<AdminUser, 'role' | 'active' | 'programIds'>>, done: string) => {
    setNotice(null);
    try {
      await update.mutateAsync({ id: user.id, version: user.version, ...change });
      setNotice({ tone: 'success', message: done });
      setEditing(false);
    } catch (error) {
      const conflict = isApiError(error) && error.status === 409;
      setNotice({ tone: 'danger', message: conflict ? USER_CONFLICT : errorMessage(error) });
    }
  };

  const tid = `user-${user.email}`;

  return (
    <Card testID={tid}>
      <View style={styles.head}>
        <View style={styles.identity}>
          <Text variant="bodyStrong">
            {user.name}
            {isSelf ? <Text tone="muted"> (you)</Text> : null}
          </Text>
          <Text variant="caption" tone="muted" selectable>
            {user.email}
          </Text>
        </View>
      </View>
      <View style={styles.badges}>
        <Badge label={ROLE_LABELS[user.role]} tone="primary" testID={`${tid}-role`} />
        {user.active ? (
          <Badge label="Active" tone="success" testID={`${tid}-active`} />
        ) : (
          <Badge label="Deactivated" tone="danger" testID={`${tid}-inactive`} />
        )}
        {user.invitedPending ? <Badge label="Invitation pending" tone="warning" testID={`${tid}-pending`} /> : null}
      </View>
      <Text variant="caption" tone="muted">
        {user.programIds.length === 0
          ? 'No programs'
          : `Programs: ${[...programCodes, ...(otherPrograms > 0 ? [`${otherPrograms} other`] : [])].join(', ')}`}
      </Text>

      {editing ? (
        <View style={styles.editor}>
          <Select
            label="Role"
            options={ROLE_OPTIONS.map((option) => ({ ...option, disabled: isSelf && option.value !== user.role }))}
            value={draft.role}
            onChange={(role) => setDraft((current) => ({ ...current, role }))}
            hint={isSelf ? 'You cannot change your own role.' : undefined}
            testID={`${tid}-edit-role`}
          />
          <Select
            multiple
            label="Programs"
            options={programOptions(programs, `${tid}-edit-program`)}
            value={draft.programIds.filter((id) => known.has(id))}
            onChange={(programIds) => setDraft((current) => ({ ...current, programIds }))}
            testID={`${tid}-edit-programs`}
          />
          <View style={styles.actions}>
            <Button
              label="Save changes"
              compact
              loading={update.isPending}
              onPress={() =>
                void save(
                  { role: draft.role, programIds: [...draft.programIds.filter((id) => known.has(id)), ...hiddenIds] },
                  'Changes saved.',
                )
              }
              accessibilityLabel={`Save changes to ${user.name}`}
              testID={`${tid}-save`}
            />
            <Button
              label="Cancel"
              variant="ghost"
              compact
              onPress={() => {
                setEditing(false);
                setDraft({ role: user.role, programIds: user.programIds });
              }}
              accessibilityLabel={`Cancel changes to ${user.name}`}
            />
          </View>
        </View>
      ) : (
        <View style={styles.actions}>
          <Button
            label="Edit role and programs"
            variant="secondary"
            compact
            onPress={() => {
              setNotice(null);
              setEditing(true);
            }}
            accessibilityLabel={`Edit role and programs of ${user.name}`}
            testID={`${tid}-edit`}
          />
          {isSelf ? null : user.active ? (
            <Button
              label="Deactivate"
              variant="danger"
              compact
              loading={update.isPending}
              onPress={() => void save({ active: false }, `${user.name} can no longer sign in.`)}
              accessibilityLabel={`Deactivate ${user.name}`}
              testID={`${tid}-deactivate`}
            />
          ) : (
            <Button
              label="Activate"
              variant="secondary"
              compact
              loading={update.isPending}
              onPress={() => void save({ active: true }, `${user.name} can sign in again.`)}
              accessibilityLabel={`Activate ${user.name}`}
              testID={`${tid}-activate`}
            />
          )}
        </View>
      )}
      {notice ? <Notice tone={notice.tone} message={notice.message} testID={`${tid}-notice`} /> : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  head: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.md,
  },
  identity: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xxs,
  },
  badges: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  editor: {
    gap: spacing.lg,
    borderTopWidth: 1,
    borderTopColor: colors.border,
    paddingTop: spacing.lg,
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
