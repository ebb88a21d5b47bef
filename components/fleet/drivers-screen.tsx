import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { formatDate } from '@/components/assets/asset-words';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Checkbox } from '@/components/ui/checkbox';
import { Badge } from '@/components/ui/chip';
import { Screen } from '@/components/ui/screen';
import { Select } from '@/components/ui/select';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { fieldErrors } from '@/hooks/api/api-client';
import { driverConflictCurrent, useDriversQuery, useUpdateDriverMutation } from '@/hooks/queries/fleet';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { ROLE_LABELS } from '@/shared/schemas/auth';
import { DRIVING_LEVELS, DRIVING_LEVEL_LABELS, LICENCE_WARNING_DAYS, type DriverProfile } from '@/shared/schemas/fleet';
import { FleetHeader } from './fleet-header';
import { parseDay } from './fleet-time';
import { fleetErrorMessage, isFleetManager, licenceFlag } from './fleet-words';

/** Flagged licences first (expired, then expiring soon), then by name. */
function rosterOrder(a: DriverProfile, b: DriverProfile): number {
  const rank = (d: DriverProfile) => (d.licenceExpired || !d.licenceExpiry ? 0 : d.licenceExpiresSoon ? 1 : 2);
  return rank(a) - rank(b) || a.name.localeCompare(b.name);
}

export function DriversScreen() {
  const { user, currentProgramId } = useSession();
  const manager = isFleetManager(user?.role);
  const [everyone, setEveryone] = useState(false);
  const drivers = useDriversQuery(currentProgramId, { all: everyone });
  const [editing, setEditing] = useState<string | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const { isWide } = useBreakpoints();
  const items = [...(drivers.data ?? [])].sort(rosterOrder);
  const expiring = items.filter((d) => d.licenceExpiresSoon).length;
  const expired = items.filter((d) => d.licenceExpired).length;

  return (
    <Screen testID="fleet-drivers">
      <FleetHeader title="Drivers" />
      <Text tone="muted">
        Prototype driving level, high-voltage awareness and licence of each person who drives. Licences that end within {LICENCE_WARNING_DAYS} days are flagged.
      </Text>
      <StageLevels />
      <Checkbox
        label="Show everyone in the program"
        description="Not only drivers and people with a driving profile."
        checked={everyone}
        onChange={setEveryone}
        testID="drivers-everyone"
      />
      {notice ? <Notice tone="success" message={notice} testID="drivers-notice" /> : null}
      {!currentProgramId ? (
        <Notice message="Join a program to see its drivers." />
      ) : drivers.isPending ? (
        <LoadingState label="Loading drivers…" />
      ) : drivers.isError ? (
        <ErrorState message={fleetErrorMessage(drivers.error)} onRetry={() => void drivers.refetch()} retrying={drivers.isFetching} />
      ) : items.length === 0 ? (
        <EmptyState title="No drivers yet." message="People with the driver role show here; others once they have a driving profile." />
      ) : (
        <>
          <Text variant="caption" tone="muted" testID="drivers-summary">
            {items.length === 1 ? '1 person' : `${items.length} people`}
            {expired ? ` · ${expired} licence${expired === 1 ? '' : 's'} expired` : ''}
            {expiring ? ` · ${expiring} expiring soon` : ''}
          </Text>
          <View style={[styles.list, isWide && styles.grid]} role="list">
            {items.map((driver) =>
              editing === driver.userId ? (
                <View key={driver.userId} role="listitem" style={isWide ? styles.gridItemWide : undefined}>
                  <DriverForm
                    driver={driver}
                    onDone={(message) => {
                      setEditing(null);
                      setNotice(message);
                    }}
                  />
                </View>
              ) : (
                <View key={driver.userId} role="listitem" style={isWide ? styles.gridItem : undefined}>
                  <DriverCard
                    driver={driver}
                    onEdit={
                      manager
                        ? () => {
                            setNotice(null);
                            setEditing(driver.userId);
                          }
                        : undefined
                    }
                  />
                </View>
              ),
            )}
          </View>
        </>
      )}
    </Screen>
  );
}

/** The level each stage needs; a lead sets it on the stages page. */
function StageLevels() {
  const { user, currentProgramId } = useSession();
  const stages = useStagesQuery(currentProgramId);
  const live = (stages.data ?? []).filter((s) => !s.retired);
  if (!live.length) return null;
  return (
    <Card tone="muted" testID="stage-levels">
      <Text variant="label">Driving level each stage needs</Text>
      <Text>{live.map((s) => `${s.name}: ${s.minDriverLevel === 0 ? 'none' : s.minDriverLevel}`).join(' · ')}</Text>
      {user?.role === 'lead' ? <TextLink href="/stages" label="Change on the stages page" /> : null}
    </Card>
  );
}

function DriverCard({ driver, onEdit }: { driver: DriverProfile; onEdit?: () => void }) {
  const flag = licenceFlag(driver);
  return (
    <Card testID={`driver-${driver.userId}`}>
      <View style={styles.cardTop}>
        <View style={styles.flex}>
          <Text variant="bodyStrong">{driver.name}</Text>
          <Text variant="caption" tone="muted">
            {ROLE_LABELS[driver.role]}
            {driver.hasProfile ? '' : ' · no driving profile yet'}
          </Text>
        </View>
        {onEdit ? <Button label="Edit" variant="secondary" compact accessibilityLabel={`Edit ${driver.name}`} onPress={onEdit} testID={`driver-edit-${driver.userId}`} /> : null}
      </View>
      <View style={styles.badges}>
        <Badge label={DRIVING_LEVEL_LABELS[driver.drivingLevel] ?? `Level ${driver.drivingLevel}`} tone="primary" />
        <Badge label={driver.hvAwareness ? `HV awareness${driver.hvAwarenessDate ? ` since ${formatDate(driver.hvAwarenessDate)}` : ''}` : 'No HV awareness'} tone={driver.hvAwareness ? 'success' : 'neutral'} />
        {flag ? <Badge label={flag.label} tone={flag.tone} testID={`driver-flag-${driver.userId}`} /> : null}
      </View>
      <Text variant="caption">Licence valid to {driver.licenceExpiry ? formatDate(driver.licenceExpiry) : 'unknown'}</Text>
      {driver.notes ? (
        <Text variant="caption" tone="muted">
          {driver.notes}
        </Text>
      ) : null}
    </Card>
  );
}

type Errors = Partial<Record<'hvAwarenessDate' | 'licenceExpiry' | 'notes', string>>;

function DriverForm({ driver, onDone }: { driver: DriverProfile; onDone: (message: string | null) => void }) {
  const [level, setLevel] = useState(String(driver.drivingLevel));
  const [hv, setHv] = useState(driver.hvAwareness);
  const [hvDate, setHvDate] = useState(driver.hvAwarenessDate ?? '');
  const [licence, setLicence] = useState(driver.licenceExpiry ?? '');
  const [notes, setNotes] = useState(driver.notes);
  const [errors, setErrors] = useState<Errors>({});
  const [failure, setFailure] = useState<string | null>(null);
  const [version, setVersion] = useState(driver.version);
  const save = useUpdateDriverMutation();

  const submit = () => {
    setFailure(null);
    const found: Errors = {};
    if (hv && !parseDay(hvDate)) found.hvAwarenessDate = 'Give the date of the high-voltage awareness training, like 2026-03-14.';
    if (licence.trim() && !parseDay(licence)) found.licenceExpiry = 'Use a date like 2028-05-31.';
    setErrors(found);
    if (Object.keys(found).length) return;
    save.mutate(
      {
        userId: driver.userId,
        drivingLevel: Number(level),
        hvAwareness: hv,
        hvAwarenessDate: hv ? hvDate.trim() : null,
        licenceExpiry: licence.trim() || null,
        notes: notes.trim(),
        version,
      },
      {
        onSuccess: (saved) => onDone(`Saved ${saved.name}.`),
        onError: (error) => {
          const current = driverConflictCurrent(error);
          if (current) {
            setVersion(current.version);
            setFailure('Someone else changed this profile first. Their values are in the roster; press Save again to keep yours.');
            return;
          }
          const fields = fieldErrors(error);
          setErrors({ hvAwarenessDate: fields.hvAwarenessDate, licenceExpiry: fields.licenceExpiry, notes: fields.notes });
          if (!(fields.hvAwarenessDate || fields.licenceExpiry || fields.notes)) setFailure(fleetErrorMessage(error));
        },
      },
    );
  };

  return (
    <Card testID={`driver-form-${driver.userId}`}>
      <Heading level={2} variant="heading">
        {driver.name}
      </Heading>
      <Select
        label="Prototype driving level"
        options={DRIVING_LEVELS.map((l) => ({ value: String(l), label: DRIVING_LEVEL_LABELS[l] }))}
        value={level}
        onChange={setLevel}
        testID="driver-level"
      />
      <Checkbox label="High-voltage awareness training" checked={hv} onChange={setHv} testID="driver-hv" />
      {hv ? (
        <TextField
          label="Trained on"
          value={hvDate}
          onChangeText={setHvDate}
          placeholder="2026-03-14"
          inputMode="numeric"
          error={errors.hvAwarenessDate}
          hint="Year-month-day."
          testID="driver-hv-date"
        />
      ) : null}
      <TextField
        label="Driving licence valid to"
        value={licence}
        onChangeText={setLicence}
        placeholder="2028-05-31"
        inputMode="numeric"
        error={errors.licenceExpiry}
        hint={parseDay(licence) ? `Valid through ${formatDate(licence)}.` : 'Year-month-day; empty when not known (no bookings then).'}
        testID="driver-licence"
      />
      <TextField label="Notes" value={notes} onChangeText={setNotes} multiline error={errors.notes} testID="driver-notes" />
      {failure ? <Notice message={failure} testID="driver-error" /> : null}
      <View style={styles.buttons}>
        <Button label="Save" icon="check" loading={save.isPending} onPress={submit} testID="driver-save" />
        <Button label="Cancel" variant="ghost" onPress={() => onDone(null)} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({
  list: {
    gap: spacing.sm,
  },
  grid: {
    flexDirection: 'row',
    flexWrap: 'wrap',
  },
  gridItem: {
    flexBasis: '48%',
    flexGrow: 1,
  },
  gridItemWide: {
    flexBasis: '100%',
  },
  cardTop: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.sm,
  },
  flex: {
    flex: 1,
    minWidth: 0,
  },
  badges: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
