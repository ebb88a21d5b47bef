import { useCallback, useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Select } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { spacing } from '@/components/theme/tokens';
import { formatKm } from '@/components/assets/asset-words';
import { fieldErrors } from '@/hooks/api/api-client';
import { randomId } from '@/hooks/api/ids';
import { refusalReasons, useCheckInMutation, useCheckOutMutation } from '@/hooks/queries/fleet';
import { FINDING_SEVERITIES, FINDING_SEVERITY_LABELS, type FindingSeverity } from '@/shared/schemas/finding-enums';
import type { Assignment, RefusalReason } from '@/shared/schemas/fleet';
import { fleetErrorMessage, REFUSAL_TITLES } from './fleet-words';
import { WalkAroundPhotos } from './walk-around-photos';

type Errors = Partial<Record<'odometerKm' | 'chargePercent' | 'notes' | 'damageNotes' | 'photoIds', string>>;

/** A number typed on a phone: digits with a point or a comma; null when it is not one. */
export function readNumber(text: string): number | null {
  const clean = text.trim().replace(/\s/g, '').replace(',', '.');
  if (!/^\d+(\.\d+)?$/.test(clean)) return null;
  return Number(clean);
}

function checkNumbers(odometer: string, charge: string): Errors {
  const out: Errors = {};
  const km = readNumber(odometer);
  const pct = readNumber(charge);
  if (km === null) out.odometerKm = 'Enter the odometer reading in kilometres, for example 12480.';
  if (pct === null || pct > 100) out.chargePercent = 'Enter the charge as a percentage from 0 to 100.';
  return out;
}

function serverErrors(error: unknown): Errors {
  const fields = fieldErrors(error);
  return { odometerKm: fields.odometerKm, chargePercent: fields.chargePercent, notes: fields.notes, damageNotes: fields.damageNotes, photoIds: fields.photoIds };
}

/** A refusal at check-out (the vehicle lost its clearance, a licence ran out ...): every reason in words. */
function RefusedAtCheck({ reasons }: { reasons: RefusalReason[] }) {
  return (
    <View accessibilityRole="alert" style={styles.refused} testID="check-refusal">
      <Notice message="This vehicle cannot be taken now:" />
      {reasons.map((r, i) => (
        <Text key={`${r.code}-${i}`}>
          {REFUSAL_TITLES[r.code]}: {r.message}
        </Text>
      ))}
    </View>
  );
}

function useKeyFor() {
  const last = useRef<{ body: string; key: string } | null>(null);
  return (body: unknown) => {
    const text = JSON.stringify(body);
    if (last.current?.body !== text) last.current = { body: text, key: randomId() };
    return last.current.key;
  };
}

/** The driver takes the vehicle: odometer (filled with the last reading), charge, photos, notes. */
export function CheckOutForm({ assignment, onDone }: { assignment: Assignment; onDone: (message: string) => void }) {
  const [odometer, setOdometer] = useState(String(assignment.vehicle.odometerKm));
  const [charge, setCharge] = useState('');
  const [notes, setNotes] = useState('');
  const [photos, setPhotos] = useState<{ photoIds: string[]; busy: boolean }>({ photoIds: [], busy: false });
  const [errors, setErrors] = useState<Errors>({});
  const [failure, setFailure] = useState<string | null>(null);
  const [reasons, setReasons] = useState<RefusalReason[] | null>(null);
  const checkOut = useCheckOutMutation(assignment.id);
  const keyFor = useKeyFor();
  const onPhotos = useCallback((state: { photoIds: string[]; busy: boolean }) => setPhotos(state), []);

  const submit = () => {
    setFailure(null);
    setReasons(null);
    const found = checkNumbers(odometer, charge);
    setErrors(found);
    if (Object.keys(found).length) return;
    const body = { odometerKm: readNumber(odometer) ?? 0, chargePercent: readNumber(charge) ?? 0, notes: notes.trim(), photoIds: photos.photoIds };
    checkOut.mutate(
      { ...body, idempotencyKey: keyFor(body) },
      {
        onSuccess: () => onDone('Checked out. Check the vehicle in here when you bring it back.'),
        onError: (error) => {
          const refused = refusalReasons(error);
          if (refused) return setReasons(refused);
          const fields = serverErrors(error);
          setErrors(fields);
          if (!Object.values(fields).some(Boolean)) setFailure(fleetErrorMessage(error));
        },
      },
    );
  };

  return (
    <Card testID="checkout-form">
      <Heading level={2} variant="heading">
        Check out
      </Heading>
      <Text tone="muted">Walk around the vehicle, read the odometer and the charge, then check it out.</Text>
      <View style={styles.numbers}>
        <View style={styles.number}>
          <TextField
            label="Odometer (km)"
            value={odometer}
            onChangeText={setOdometer}
            inputMode="decimal"
            keyboardType="decimal-pad"
            error={errors.odometerKm}
            hint={`Last reading: ${formatKm(assignment.vehicle.odometerKm)}.`}
            testID="checkout-odometer"
          />
        </View>
        <View style={styles.number}>
          <TextField label="Charge (%)" value={charge} onChangeText={setCharge} inputMode="decimal" keyboardType="decimal-pad" placeholder="0 to 100" error={errors.chargePercent} testID="checkout-charge" />
        </View>
      </View>
      <WalkAroundPhotos assetId={assignment.assetId} onChange={onPhotos} testID="checkout" />
      {errors.photoIds ? <Notice message={errors.photoIds} /> : null}
      <TextField label="Notes (optional)" value={notes} onChangeText={setNotes} multiline placeholder="Anything the next person should know" error={errors.notes} testID="checkout-notes" />
      {reasons ? <RefusedAtCheck reasons={reasons} /> : null}
      {failure ? <Notice message={failure} testID="checkout-error" /> : null}
      <Button
        label={photos.busy ? 'Waiting for the photos…' : 'Check out'}
        icon="check"
        fullWidth
        loading={checkOut.isPending}
        disabled={photos.busy}
        onPress={submit}
        testID="checkout-submit"
      />
    </Card>
  );
}

/** The vehicle comes back: odometer (never below the check-out reading), charge, photos, notes and damage. */
export function CheckInForm({ assignment, onDone }: { assignment: Assignment; onDone: (message: string) => void }) {
  const [odometer, setOdometer] = useState('');
  const [charge, setCharge] = useState('');
  const [notes, setNotes] = useState('');
  const [damage, setDamage] = useState('');
  const [severity, setSeverity] = useState<FindingSeverity>('major');
  const [photos, setPhotos] = useState<{ photoIds: string[]; busy: boolean }>({ photoIds: [], busy: false });
  const [errors, setErrors] = useState<Errors>({});
  const [failure, setFailure] = useState<string | null>(null);
  const checkIn = useCheckInMutation(assignment.id);
  const keyFor = useKeyFor();
  const onPhotos = useCallback((state: { photoIds: string[]; busy: boolean }) => setPhotos(state), []);
  const outKm = assignment.checkout?.odometerKm;

  const submit = () => {
    setFailure(null);
    const found = checkNumbers(odometer, charge);
    setErrors(found);
    if (Object.keys(found).length) return;
    const damageNotes = damage.trim();
    const body = {
      odometerKm: readNumber(odometer) ?? 0,
      chargePercent: readNumber(charge) ?? 0,
      notes: notes.trim(),
      damageNotes,
      ...(damageNotes ? { damageSeverity: severity } : {}),
      photoIds: photos.photoIds,
    };
    checkIn.mutate(
      { ...body, idempotencyKey: keyFor(body) },
      {
        onSuccess: (saved) => {
          const driven = saved.checkin && saved.checkout ? Math.max(0, saved.checkin.odometerKm - saved.checkout.odometerKm) : null;
          onDone(`Checked in${driven !== null ? `: ${formatKm(driven)} driven` : ''}. Thank you.`);
        },
        onError: (error) => {
          const fields = serverErrors(error);
          setErrors(fields);
          if (!Object.values(fields).some(Boolean)) setFailure(fleetErrorMessage(error));
        },
      },
    );
  };

  return (
    <Card testID="checkin-form">
      <Heading level={2} variant="heading">
        Check in
      </Heading>
      <Text tone="muted">Read the odometer and the charge, photograph any damage, then check the vehicle in.</Text>
      <View style={styles.numbers}>
        <View style={styles.number}>
          <TextField
            label="Odometer (km)"
            value={odometer}
            onChangeText={setOdometer}
            inputMode="decimal"
            keyboardType="decimal-pad"
            placeholder={outKm !== undefined ? String(outKm) : undefined}
            error={errors.odometerKm}
            hint={outKm !== undefined ? `At check-out: ${formatKm(outKm)}.` : undefined}
            testID="checkin-odometer"
          />
        </View>
        <View style={styles.number}>
          <TextField label="Charge (%)" value={charge} onChangeText={setCharge} inputMode="decimal" keyboardType="decimal-pad" placeholder="0 to 100" error={errors.chargePercent} testID="checkin-charge" />
        </View>
      </View>
      <WalkAroundPhotos assetId={assignment.assetId} onChange={onPhotos} testID="checkin" />
      {errors.photoIds ? <Notice message={errors.photoIds} /> : null}
      <TextField
        label="Damage (optional)"
        value={damage}
        onChangeText={setDamage}
        multiline
        placeholder="What is damaged and where"
        error={errors.damageNotes}
        hint="Anything written here becomes a finding on the vehicle."
        testID="checkin-damage"
      />
      {damage.trim() ? (
        <Select
          label="How serious is the damage?"
          options={FINDING_SEVERITIES.map((s) => ({ value: s, label: FINDING_SEVERITY_LABELS[s] }))}
          value={severity}
          onChange={setSeverity}
          hint={severity === 'safety' ? 'Safety: the vehicle may not be driven until the finding is resolved.' : undefined}
          testID="checkin-severity"
        />
      ) : null}
      <TextField label="Notes (optional)" value={notes} onChangeText={setNotes} multiline placeholder="Route, fuel card, anything else" error={errors.notes} testID="checkin-notes" />
      {failure ? <Notice message={failure} testID="checkin-error" /> : null}
      <Button
        label={photos.busy ? 'Waiting for the photos…' : 'Check in'}
        icon="check"
        fullWidth
        loading={checkIn.isPending}
        disabled={photos.busy}
        onPress={submit}
        testID="checkin-submit"
      />
    </Card>
  );
}

const styles = StyleSheet.create({
  numbers: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.md,
  },
  number: {
    flexGrow: 1,
    flexBasis: 140,
    minWidth: 0,
  },
  refused: {
    gap: spacing.xs,
  },
});
