import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Select } from '@/components/ui/select';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useProgramMembersQuery } from '@/hooks/queries/members';
import type { ProgramMember } from '@/shared/schemas/admin';
import { ROLE_LABELS } from '@/shared/schemas/auth';
import type { Attendee } from '@/shared/schemas/readiness';
import { splitNames } from './gate-words';

/** Who attends: members of the program by id, and people without an account by name. */
export type AttendeeDraft = {
  memberIds: string[];
  guests: string[];
  /** A name typed but not added yet: it counts as added when the form is sent. */
  guestText: string;
};

/** The review's attendees as a draft: a member who has left the program (or whose account is closed) stays on as a name. */
export function draftFromAttendees(attendees: readonly Attendee[], members: readonly ProgramMember[]): AttendeeDraft {
  const known = new Set(members.map((m) => m.id));
  return {
    memberIds: attendees.filter((a) => a.userId && known.has(a.userId)).map((a) => a.userId as string),
    guests: attendees.filter((a) => !a.userId || !known.has(a.userId)).map((a) => a.name),
    guestText: '',
  };
}

/** What the API takes: member ids, then names (the typed one included); names are not repeated. */
export function attendeesFromDraft(draft: AttendeeDraft): string[] {
  const names = [...draft.guests, ...splitNames(draft.guestText)].filter((name, i, all) => all.findIndex((n) => n.toLowerCase() === name.toLowerCase()) === i);
  return [...new Set(draft.memberIds), ...names];
}

/** A program's members above this many get a filter field. */
const FILTER_FROM = 12;

/**
 * The people picker of a gate review: the program's members to tick (with their role, the
 * signed-in user first), and names of people without an account (a supplier, a guest).
 */
export function AttendeePicker({
  programId,
  meId,
  value,
  onChange,
  testID,
}: {
  programId: string;
  meId: string | null;
  value: AttendeeDraft;
  onChange: (draft: AttendeeDraft) => void;
  /** `<testID>-people` for the members, `<testID>` for the name field, `<testID>-add` and `<testID>-guest-<n>-remove`. */
  testID: string;
}) {
  const members = useProgramMembersQuery(programId);
  const [filter, setFilter] = useState('');

  const all = members.data ?? [];
  const needle = filter.trim().toLowerCase();
  const shown = [...all]
    .sort((a, b) => Number(b.id === meId) - Number(a.id === meId))
    // Ticked members always stay in view, whatever the filter.
    .filter((m) => !needle || value.memberIds.includes(m.id) || m.name.toLowerCase().includes(needle) || ROLE_LABELS[m.role].toLowerCase().includes(needle));

  const addTyped = () => {
    const names = splitNames(value.guestText);
    if (!names.length) return;
    const guests = [...value.guests];
    for (const name of names) if (!guests.some((g) => g.toLowerCase() === name.toLowerCase())) guests.push(name);
    onChange({ ...value, guests, guestText: '' });
  };

  return (
    <View style={styles.picker}>
      {members.isPending ? (
        <LoadingState label="Loading the program’s people…" />
      ) : members.isError ? (
        <ErrorState message={errorMessage(members.error)} onRetry={() => void members.refetch()} retrying={members.isFetching} />
      ) : (
        <>
          {all.length > FILTER_FROM ? (
            <TextField
              label="Find a member"
              value={filter}
              onChangeText={setFilter}
              placeholder="Name or role"
              autoCorrect={false}
              testID={`${testID}-filter`}
            />
          ) : null}
          <Select
            label="Members of the program"
            multiple
            options={shown.map((m) => ({
              value: m.id,
              label: m.id === meId ? `${m.name} (you)` : m.name,
              description: ROLE_LABELS[m.role],
            }))}
            value={value.memberIds}
            onChange={(memberIds) => onChange({ ...value, memberIds })}
            hint={
              all.length === 0
                ? 'Nobody else is in this program yet.'
                : `${value.memberIds.length} of ${all.length} ${all.length === 1 ? 'member' : 'members'} ticked.${needle && shown.length === value.memberIds.length ? ' Nobody else matches the filter.' : ''}`
            }
            testID={`${testID}-people`}
          />
        </>
      )}
      <View style={styles.guests}>
        <Text variant="label">People without an account</Text>
        {value.guests.length === 0 ? (
          <Text tone="muted" variant="caption">
            None yet. Add a supplier or a guest by name.
          </Text>
        ) : (
          value.guests.map((name, i) => (
            <View key={`${name}-${i}`} style={styles.guest} testID={`${testID}-guest-${i}`}>
              <Text style={styles.guestName}>{name}</Text>
              <Button
                label="Remove"
                variant="ghost"
                compact
                accessibilityLabel={`Remove ${name}`}
                onPress={() => onChange({ ...value, guests: value.guests.filter((_, k) => k !== i) })}
                testID={`${testID}-guest-${i}-remove`}
              />
            </View>
          ))
        )}
        <View style={styles.addRow}>
          <View style={styles.addField}>
            <TextField
              label="Add by name"
              value={value.guestText}
              onChangeText={(guestText) => onChange({ ...value, guestText })}
              onSubmitEditing={addTyped}
              placeholder="A name, or several with commas"
              testID={testID}
            />
          </View>
          {/* A view of its own: a button places itself at the top of a row. */}
          <View>
            <Button label="Add" icon="plus" variant="secondary" onPress={addTyped} disabled={!value.guestText.trim()} testID={`${testID}-add`} />
          </View>
        </View>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  picker: { gap: spacing.lg },
  guests: { gap: spacing.sm },
  guest: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    paddingLeft: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.border,
  },
  guestName: { flex: 1, minWidth: 0 },
  addRow: { flexDirection: 'row', alignItems: 'flex-end', gap: spacing.sm, flexWrap: 'wrap' },
  addField: { flexGrow: 1, flexBasis: 160, minWidth: 0 },
});
