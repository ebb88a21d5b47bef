import { useRouter } from 'expo-router';
import { useMemo, useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Checkbox } from '@/components/ui/checkbox';
import { Chip } from '@/components/ui/chip';
import { Screen } from '@/components/ui/screen';
import { Select } from '@/components/ui/select';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { RequireRole } from '@/components/shell/require-role';
import { spacing } from '@/components/theme/tokens';
import { fieldErrors } from '@/hooks/api/api-client';
import { randomId } from '@/hooks/api/ids';
import { useAssetListQuery } from '@/hooks/queries/assets';
import { refusalReasons, useCreateAssignmentMutation, useDriversQuery } from '@/hooks/queries/fleet';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useSession } from '@/hooks/use-session';
import {
  ASSIGNMENT_PURPOSES,
  ASSIGNMENT_PURPOSE_LABELS,
  windowProblem,
  type AssignmentPurpose,
  type CreateAssignment,
  type RefusalReason,
} from '@/shared/schemas/fleet';
import { DateTimeField } from '@/components/ui/date-field';
import { DriverPicker } from './driver-picker';
import { FleetHeader, RoadCaution } from './fleet-header';
import { fromLocalInput, HOUR_MS, toLocalInput, zoneName } from './fleet-time';
import { fleetErrorMessage } from './fleet-words';
import { MIN_OVERRIDE_REASON, OVERRIDE_REASON_MESSAGE, RefusalPanel, overrideAllowed, type OverrideState } from './refusal-panel';
import { VehiclePicker } from './vehicle-picker';

export type BookParams = { assetId?: string; driverId?: string; start?: string };

const DURATIONS: Array<{ label: string; ms: number }> = [
  { label: '2 h', ms: 2 * HOUR_MS },
  { label: '4 h', ms: 4 * HOUR_MS },
  { label: '8 h', ms: 8 * HOUR_MS },
  { label: '1 day', ms: 24 * HOUR_MS },
  { label: '3 days', ms: 72 * HOUR_MS },
];

/** The window the form opens with: from the next full hour (or the day asked for, 08:00), four hours long. */
function initialWindow(start?: string): { start: string; end: string } {
  const asked = start ? new Date(`${start.slice(0, 10)}T08:00`) : null;
  let from: Date;
  if (asked && !Number.isNaN(asked.getTime()) && asked.getTime() > Date.now()) from = asked;
  else {
    from = new Date();
    from.setMinutes(0, 0, 0);
    from = new Date(from.getTime() + HOUR_MS);
  }
  return { start: toLocalInput(from), end: toLocalInput(new Date(from.getTime() + 4 * HOUR_MS)) };
}

type Errors = Partial<Record<'assetId' | 'driverId' | 'start' | 'end' | 'purpose' | 'notes' | 'override', string>>;

export function BookScreen({ params = {} }: { params?: BookParams }) {
  return (
    <RequireRole roles={['coordinator', 'lead']}>
      <BookForm params={params} />
    </RequireRole>
  );
}

function BookForm({ params }: { params: BookParams }) {
  const router = useRouter();
  const { user, currentProgramId } = useSession();
  const [assetId, setAssetId] = useState<string | null>(params.assetId ?? null);
  const [driverId, setDriverId] = useState<string | null>(params.driverId ?? null);
  const [span, setSpan] = useState(() => initialWindow(params.start));
  const [purpose, setPurpose] = useState<AssignmentPurpose | null>(null);
  const [notes, setNotes] = useState('');
  const [everyone, setEveryone] = useState(false);
  const [errors, setErrors] = useState<Errors>({});
  const [reasons, setReasons] = useState<RefusalReason[] | null>(null);
  const [override, setOverride] = useState<OverrideState>({ on: false, reason: '' });
  const [failure, setFailure] = useState<string | null>(null);
  // One key per distinct request, so a retry after a lost answer books once and a changed form is a new request.
  const lastKey = useRef<{ body: string; key: string } | null>(null);

  const vehicles = useAssetListQuery(currentProgramId ? { programId: currentProgramId, kind: 'vehicle', sort: 'tag', dir: 'asc' } : null);
  const vehicleItems = useMemo(() => vehicles.data?.pages.flatMap((page) => page.items) ?? [], [vehicles.data]);
  const stages = useStagesQuery(currentProgramId);
  const drivers = useDriversQuery(currentProgramId, { all: everyone });
  const create = useCreateAssignmentMutation();

  const vehicle = vehicleItems.find((v) => v.id === assetId) ?? null;
  const stage = stages.data?.find((s) => s.id === vehicle?.stageId);
  const startIso = fromLocalInput(span.start);
  const endIso = fromLocalInput(span.end);

  /** A new choice of vehicle, driver or window is a new booking: earlier reasons no longer apply. */
  const changed = () => {
    setReasons(null);
    setFailure(null);
  };

  const validate = (): Errors => {
    const out: Errors = {};
    if (!assetId) out.assetId = 'Choose a vehicle.';
    if (!driverId) out.driverId = 'Choose a driver.';
    if (!startIso) out.start = 'Use a date and time like 2026-12-03 08:00.';
    if (!endIso) out.end = 'Use a date and time like 2026-12-03 17:00.';
    if (startIso && endIso) {
      const problem = windowProblem(startIso, endIso);
      if (problem) out.end = problem;
      else if (Date.parse(endIso) <= Date.now()) out.end = 'This window has already ended.';
    }
    if (!purpose) out.purpose = 'Choose a purpose.';
    if (notes.trim().length > 2000) out.notes = 'Use at most 2000 characters.';
    if (reasons && override.on && overrideAllowed(reasons) && override.reason.trim().length < MIN_OVERRIDE_REASON) {
      out.override = OVERRIDE_REASON_MESSAGE;
    }
    return out;
  };

  const submit = () => {
    setFailure(null);
    const found = validate();
    setErrors(found);
    if (Object.keys(found).length || !currentProgramId || !assetId || !driverId || !startIso || !endIso || !purpose) return;
    const useOverride = Boolean(reasons && override.on && overrideAllowed(reasons));
    const body: CreateAssignment = {
      programId: currentProgramId,
      assetId,
      driverId,
      startsAt: startIso,
      endsAt: endIso,
      purpose,
      notes: notes.trim(),
      ...(useOverride ? { levelOverrideReason: override.reason.trim() } : {}),
    };
    const text = JSON.stringify(body);
    if (lastKey.current?.body !== text) lastKey.current = { body: text, key: randomId() };
    create.mutate(
      { ...body, idempotencyKey: lastKey.current.key },
      {
        onSuccess: (assignment) => router.replace(`/fleet/assignments/${assignment.id}?booked=1`),
        onError: (error) => {
          const refused = refusalReasons(error);
          if (refused) {
            setReasons(refused);
            if (!overrideAllowed(refused)) setOverride((o) => ({ ...o, on: false }));
            return;
          }
          const fields = fieldErrors(error);
          const mapped: Errors = {
            assetId: fields.assetId,
            driverId: fields.driverId,
            start: fields.startsAt,
            end: fields.endsAt,
            notes: fields.notes,
            override: fields.levelOverrideReason,
          };
          const shown = Object.fromEntries(Object.entries(mapped).filter(([, v]) => v)) as Errors;
          setErrors(shown);
          setFailure(fleetErrorMessage(error));
        },
      },
    );
  };

  const setDuration = (ms: number) => {
    if (!startIso) return;
    changed();
    setSpan((w) => ({ ...w, end: toLocalInput(new Date(Date.parse(startIso) + ms)) }));
  };

  const loading = vehicles.isPending || drivers.isPending || stages.isPending;
  const loadError = vehicles.error ?? drivers.error ?? stages.error;

  return (
    <Screen testID="fleet-book">
      <FleetHeader title="Book a vehicle" />
      <RoadCaution />
      {!currentProgramId ? (
        <Notice message="Join a program to book its vehicles." />
      ) : loading ? (
        <LoadingState label="Loading vehicles and drivers…" />
      ) : loadError ? (
        <ErrorState
          message={fleetErrorMessage(loadError)}
          onRetry={() => {
            void vehicles.refetch();
            void drivers.refetch();
            void stages.refetch();
          }}
        />
      ) : (
        <View style={styles.form}>
          <Card>
            <Heading level={2} variant="heading">
              1. Vehicle
            </Heading>
            <VehiclePicker
              vehicles={vehicleItems}
              stages={stages.data ?? []}
              value={assetId}
              onChange={(id) => {
                changed();
                setAssetId(id);
              }}
              error={errors.assetId}
              hideLabel
            />
            {vehicles.hasNextPage ? (
              <Button label="Show more vehicles" variant="ghost" compact loading={vehicles.isFetchingNextPage} onPress={() => void vehicles.fetchNextPage()} />
            ) : null}
            {vehicle && !vehicle.cleared ? (
              <Notice
                message={`${vehicle.tag} is not cleared${vehicle.notClearedReason ? `: ${vehicle.notClearedReason}` : ''}. It may not be driven until its safety findings are resolved; Proofyard will refuse the booking.`}
                testID="book-not-cleared"
              />
            ) : null}
          </Card>

          <Card>
            <Heading level={2} variant="heading">
              2. When
            </Heading>
            <Text variant="caption" tone="muted">
              Times are in this device’s time zone ({zoneName()}).
            </Text>
            <DateTimeField
              label="Starts"
              value={span.start}
              onChange={(start) => {
                changed();
                setSpan((w) => ({ ...w, start }));
              }}
              error={errors.start}
              testID="book-start"
            />
            <DateTimeField
              label="Ends"
              value={span.end}
              onChange={(end) => {
                changed();
                setSpan((w) => ({ ...w, end }));
              }}
              error={errors.end}
              testID="book-end"
            />
            <View style={styles.chips} role="group" aria-label="Length of the window">
              {DURATIONS.map((d) => (
                <Chip
                  key={d.label}
                  label={d.label}
                  accessibilityLabel={`Ends ${d.label} after the start`}
                  selected={Boolean(startIso && endIso && Date.parse(endIso) - Date.parse(startIso) === d.ms)}
                  onPress={() => setDuration(d.ms)}
                  testID={`book-length-${d.label.replace(' ', '')}`}
                />
              ))}
            </View>
          </Card>

          <Card>
            <Heading level={2} variant="heading">
              3. Driver
            </Heading>
            <DriverPicker
              drivers={drivers.data ?? []}
              value={driverId}
              onChange={(id) => {
                changed();
                setDriverId(id);
              }}
              needs={{ stage: stage?.name, minLevel: stage?.minDriverLevel, endsAt: endIso }}
              error={errors.driverId}
              hideLabel
            />
            <Checkbox
              label="Show everyone in the program"
              description="Not only drivers and people with a driving profile."
              checked={everyone}
              onChange={setEveryone}
              testID="book-driver-everyone"
            />
          </Card>

          <Card>
            <Heading level={2} variant="heading">
              4. Purpose and notes
            </Heading>
            <Select
              label="Purpose"
              options={ASSIGNMENT_PURPOSES.map((p) => ({ value: p, label: ASSIGNMENT_PURPOSE_LABELS[p] }))}
              value={purpose}
              onChange={setPurpose}
              error={errors.purpose}
              testID="book-purpose"
            />
            <TextField
              label="Notes (optional)"
              value={notes}
              onChangeText={setNotes}
              multiline
              placeholder="Route, load, what to watch for"
              error={errors.notes}
              testID="book-notes"
            />
          </Card>

          {reasons ? (
            <RefusalPanel
              reasons={reasons}
              canOverride={user?.role === 'coordinator' || user?.role === 'lead'}
              override={override}
              onOverrideChange={setOverride}
              reasonError={errors.override}
            />
          ) : null}
          {failure && !reasons ? <Notice message={failure} testID="book-error" /> : null}
          <Button
            label={reasons && override.on && overrideAllowed(reasons) ? 'Book with the override' : reasons ? 'Try again' : 'Book'}
            icon="check"
            fullWidth
            loading={create.isPending}
            onPress={submit}
            testID="book-submit"
          />
          <Text variant="caption" tone="muted">
            The driver gets an e-mail with the booking.
          </Text>
        </View>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  form: {
    gap: spacing.lg,
  },
  chips: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
