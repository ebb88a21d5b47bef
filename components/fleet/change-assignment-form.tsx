import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Select } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { spacing } from '@/components/theme/tokens';
import { fieldErrors, isApiError } from '@/hooks/api/api-client';
import { assignmentConflictCurrent, refusalReasons, useDriversQuery, useUpdateAssignmentMutation } from '@/hooks/queries/fleet';
import { useSession } from '@/hooks/use-session';
import {
  ASSIGNMENT_PURPOSES,
  ASSIGNMENT_PURPOSE_LABELS,
  ASSIGNMENT_STATUS_LABELS,
  windowProblem,
  type Assignment,
  type AssignmentPurpose,
  type RefusalReason,
  type UpdateAssignment,
} from '@/shared/schemas/fleet';
import { DateTimeField } from '@/components/ui/date-field';
import { DriverPicker } from './driver-picker';
import { formatDayTime, fromLocalInput, toLocalInput, zoneName } from './fleet-time';
import { fleetErrorMessage } from './fleet-words';
import { MIN_OVERRIDE_REASON, OVERRIDE_REASON_MESSAGE, RefusalPanel, overrideAllowed, type OverrideState } from './refusal-panel';

type Change = Omit<UpdateAssignment, 'version'>;

/** What differs between two copies of an assignment, in words: "Ends: Thu 3 Dec, 17:00 → Fri 4 Dec, 12:00". */
export function describeAssignmentChanges(before: Assignment, after: Assignment): string[] {
  const out: string[] = [];
  if (before.assetTag !== after.assetTag) out.push(`Vehicle: ${before.assetTag} → ${after.assetTag}`);
  if (before.driver.id !== after.driver.id) out.push(`Driver: ${before.driver.name} → ${after.driver.name}`);
  if (before.startsAt !== after.startsAt) out.push(`Starts: ${formatDayTime(before.startsAt)} → ${formatDayTime(after.startsAt)}`);
  if (before.endsAt !== after.endsAt) out.push(`Ends: ${formatDayTime(before.endsAt)} → ${formatDayTime(after.endsAt)}`);
  if (before.purpose !== after.purpose) out.push(`Purpose: ${ASSIGNMENT_PURPOSE_LABELS[before.purpose]} → ${ASSIGNMENT_PURPOSE_LABELS[after.purpose]}`);
  if (before.notes !== after.notes) out.push(`Notes: “${before.notes || '(none)'}” → “${after.notes || '(none)'}”`);
  if (before.status !== after.status) out.push(`Status: ${ASSIGNMENT_STATUS_LABELS[before.status]} → ${ASSIGNMENT_STATUS_LABELS[after.status]}`);
  return out;
}

type Errors = Partial<Record<'start' | 'end' | 'notes' | 'override', string>>;

/** Change the window, the driver, the purpose or the notes (coordinator or lead), sent with the version read. */
export function ChangeAssignmentForm({ assignment, onDone }: { assignment: Assignment; onDone: (message: string) => void }) {
  const { user, currentProgramId } = useSession();
  const out = assignment.status === 'checked-out';
  const [base] = useState(assignment);
  const [start, setStart] = useState(toLocalInput(assignment.startsAt));
  const [end, setEnd] = useState(toLocalInput(assignment.endsAt));
  const [purpose, setPurpose] = useState<AssignmentPurpose>(assignment.purpose);
  const [notes, setNotes] = useState(assignment.notes);
  const [driverId, setDriverId] = useState(assignment.driver.id);
  const [errors, setErrors] = useState<Errors>({});
  const [failure, setFailure] = useState<string | null>(null);
  const [reasons, setReasons] = useState<RefusalReason[] | null>(null);
  const [override, setOverride] = useState<OverrideState>({ on: false, reason: '' });
  const [conflict, setConflict] = useState<{ theirs: string[]; current: Assignment } | null>(null);
  const drivers = useDriversQuery(out ? null : currentProgramId);
  const update = useUpdateAssignmentMutation(assignment.id);

  /** Only what the person changed, so a retry on a newer version keeps the other person's changes. */
  const draft = (): { change: Change; errors: Errors } => {
    const found: Errors = {};
    const change: Change = {};
    const startIso = fromLocalInput(start);
    const endIso = fromLocalInput(end);
    if (!startIso) found.start = 'Use a date and time like 2026-12-03 08:00.';
    if (!endIso) found.end = 'Use a date and time like 2026-12-03 17:00.';
    if (startIso && endIso) {
      const problem = windowProblem(startIso, endIso);
      if (problem) found.end = problem;
    }
    if (startIso && toLocalInput(startIso) !== toLocalInput(base.startsAt)) change.startsAt = startIso;
    if (endIso && toLocalInput(endIso) !== toLocalInput(base.endsAt)) change.endsAt = endIso;
    if (purpose !== base.purpose) change.purpose = purpose;
    if (notes.trim() !== base.notes) change.notes = notes.trim();
    if (driverId !== base.driver.id) change.driverId = driverId;
    if (reasons && override.on && overrideAllowed(reasons)) {
      if (override.reason.trim().length < MIN_OVERRIDE_REASON) found.override = OVERRIDE_REASON_MESSAGE;
      else change.levelOverrideReason = override.reason.trim();
    }
    return { change, errors: found };
  };

  const send = (version: number) => {
    setFailure(null);
    const { change, errors: found } = draft();
    setErrors(found);
    if (Object.keys(found).length) return;
    if (!Object.keys(change).length) {
      onDone('Nothing changed.');
      return;
    }
    update.mutate(
      { ...change, version },
      {
        onSuccess: () => onDone('Saved. The driver gets an e-mail with the change.'),
        onError: (error) => {
          const current = assignmentConflictCurrent(error);
          if (current) {
            setConflict({ theirs: describeAssignmentChanges(base, current), current });
            return;
          }
          const refused = refusalReasons(error);
          if (refused) {
            setReasons(refused);
            return;
          }
          const fields = fieldErrors(error);
          setErrors({ start: fields.startsAt, end: fields.endsAt, notes: fields.notes, override: fields.levelOverrideReason });
          if (!(fields.startsAt || fields.endsAt || fields.notes || fields.levelOverrideReason)) setFailure(fleetErrorMessage(error));
          if (isApiError(error) && error.code === 'assignment/closed') setConflict(null);
        },
      },
    );
  };

  const mine = (() => {
    const { change } = draft();
    const shown: Assignment = {
      ...base,
      startsAt: change.startsAt ?? base.startsAt,
      endsAt: change.endsAt ?? base.endsAt,
      purpose: change.purpose ?? base.purpose,
      notes: change.notes ?? base.notes,
      driver: change.driverId ? { id: change.driverId, name: drivers.data?.find((d) => d.userId === change.driverId)?.name ?? 'another driver' } : base.driver,
    };
    return describeAssignmentChanges(base, shown);
  })();

  return (
    <Card testID="assignment-change">
      <Heading level={2} variant="heading">
        Change this assignment
      </Heading>
      {out ? <Text tone="muted">The vehicle is checked out: only the end, the purpose and the notes can still change.</Text> : null}
      <Text variant="caption" tone="muted">
        Times are in this device’s time zone ({zoneName()}).
      </Text>
      {out ? null : (
        <DateTimeField
          label="Starts"
          value={start}
          onChange={(v) => {
            setReasons(null);
            setStart(v);
          }}
          error={errors.start}
          testID="change-start"
        />
      )}
      <DateTimeField
        label="Ends"
        value={end}
        onChange={(v) => {
          setReasons(null);
          setEnd(v);
        }}
        error={errors.end}
        testID="change-end"
      />
      <Select
        label="Purpose"
        options={ASSIGNMENT_PURPOSES.map((p) => ({ value: p, label: ASSIGNMENT_PURPOSE_LABELS[p] }))}
        value={purpose}
        onChange={setPurpose}
        testID="change-purpose"
      />
      <TextField label="Notes" value={notes} onChangeText={setNotes} multiline error={errors.notes} testID="change-notes" />
      {out || !drivers.data ? null : (
        <DriverPicker
          drivers={drivers.data}
          value={driverId}
          onChange={(id) => {
            setReasons(null);
            setDriverId(id);
          }}
          needs={{ stage: assignment.vehicle.stage, minLevel: assignment.vehicle.minDriverLevel, endsAt: fromLocalInput(end) }}
          testID="change-driver"
        />
      )}
      {conflict ? (
        <View style={styles.conflict} accessibilityRole="alert" testID="change-conflict">
          <Notice tone="warning" message="Someone else changed this assignment while you were editing." />
          <Text variant="label">Their change</Text>
          <View testID="change-conflict-theirs">
            {conflict.theirs.length ? conflict.theirs.map((line) => <Text key={line}>{line}</Text>) : <Text tone="muted">No visible change (a check or a note in the history).</Text>}
          </View>
          <Text variant="label">Your change</Text>
          <View testID="change-conflict-mine">
            {mine.length ? mine.map((line) => <Text key={line}>{line}</Text>) : <Text tone="muted">Nothing.</Text>}
          </View>
          <View style={styles.buttons}>
            <Button label="Apply my change to the latest" compact onPress={() => send(conflict.current.version)} loading={update.isPending} testID="change-conflict-apply" />
            <Button label="Keep theirs" variant="secondary" compact onPress={() => onDone('Kept the latest version.')} testID="change-conflict-discard" />
          </View>
        </View>
      ) : null}
      {reasons ? (
        <RefusalPanel
          reasons={reasons}
          canOverride={user?.role === 'coordinator' || user?.role === 'lead'}
          override={override}
          onOverrideChange={setOverride}
          reasonError={errors.override}
          testID="change-refusal"
        />
      ) : null}
      {failure ? <Notice message={failure} testID="change-error" /> : null}
      {conflict ? null : (
        <View style={styles.buttons}>
          <Button label="Save the change" icon="check" loading={update.isPending} onPress={() => send(base.version)} testID="change-save" />
          <Button label="Close" variant="ghost" onPress={() => onDone('')} testID="change-close" />
        </View>
      )}
    </Card>
  );
}

const styles = StyleSheet.create({
  conflict: {
    gap: spacing.sm,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
