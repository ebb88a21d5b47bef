import { StyleSheet, View } from 'react-native';
import { Icon } from '@/components/ui/icon';
import { Text } from '@/components/ui/text';
import { TextField, type TextFieldProps } from '@/components/ui/text-field';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { VIN_LENGTH, checkVin } from '@/shared/domain/vin';
import type { VinCheck } from '@/shared/schemas/assets';

/** As the input schema stores it: upper case, no spaces. */
export function normaliseVin(value: string): string {
  return value.toUpperCase().replace(/\s+/g, '');
}

export function checkDigitWarning(expected: string | null): string {
  return `The check digit should be ${expected ?? '?'}; kept as typed — prototypes and non-North-American VINs may not carry one.`;
}

export function modelYearWords(years: readonly number[]): string | null {
  if (years.length === 0) return null;
  return years.length === 1 ? `model year ${years[0]}` : `model year ${years.slice().reverse().join(' or ')}`;
}

export type VinState =
  | { kind: 'empty' }
  | { kind: 'typing'; length: number }
  | { kind: 'malformed'; message: string }
  | { kind: 'wrong-check-digit'; check: VinCheck }
  | { kind: 'valid'; check: VinCheck };

/**
 * What to tell the user about a VIN as typed. Letters that are never allowed show at once; a
 * short VIN is only "in progress" until the field is left (`finished`).
 */
export function vinState(raw: string, finished: boolean): VinState {
  const vin = normaliseVin(raw);
  if (!vin) return { kind: 'empty' };
  const check = checkVin(vin);
  if (check.wellFormed) return check.checkDigitValid ? { kind: 'valid', check } : { kind: 'wrong-check-digit', check };
  const charProblems = check.problems.filter((problem) => !problem.startsWith('A VIN has'));
  if (charProblems.length > 0) return { kind: 'malformed', message: charProblems.join(' ') };
  if (vin.length < VIN_LENGTH && !finished) return { kind: 'typing', length: vin.length };
  return { kind: 'malformed', message: check.problems.join(' ') };
}

/** The VIN input with instant feedback from the shared check (49 CFR 565.15 check digit). */
export function VinField({
  value,
  onChangeText,
  onBlur,
  error,
  finished,
  testID = 'asset-vin',
  ...rest
}: Omit<TextFieldProps, 'label' | 'error' | 'hint'> & {
  value: string;
  onChangeText: (value: string) => void;
  error?: string;
  /** The field was left at least once: a short VIN is now an error, not a VIN in progress. */
  finished: boolean;
}) {
  const state = vinState(value, finished);
  const fieldError = error ?? (state.kind === 'malformed' ? state.message : undefined);
  const hint =
    state.kind === 'typing'
      ? `${state.length} of ${VIN_LENGTH} characters.`
      : state.kind === 'empty'
        ? 'Optional. 17 letters and digits; I, O and Q are never used.'
        : undefined;
  return (
    <View style={styles.wrap}>
      <TextField
        {...rest}
        label="VIN"
        value={value}
        onChangeText={(text) => onChangeText(text.toUpperCase())}
        onBlur={onBlur}
        error={fieldError}
        hint={hint}
        autoCapitalize="characters"
        autoCorrect={false}
        autoComplete="off"
        maxLength={24}
        testID={testID}
      />
      {!fieldError && (state.kind === 'valid' || state.kind === 'wrong-check-digit') ? (
        <VinCheckSummary check={state.check} testID={testID} />
      ) : null}
    </View>
  );
}

/** The result of a VIN check in words: a warning for a wrong check digit, else the model years. */
export function VinCheckSummary({ check, testID }: { check: VinCheck; testID?: string }) {
  if (!check.wellFormed) {
    return (
      <Text variant="caption" tone="danger" testID={testID ? `${testID}-problem` : undefined}>
        {check.problems.join(' ')}
      </Text>
    );
  }
  const year = modelYearWords(check.modelYears);
  if (!check.checkDigitValid) {
    return (
      <View style={[styles.box, styles.warning]} testID={testID ? `${testID}-warning` : undefined} aria-live="polite">
        <Icon name="warning" size={sizes.iconSm} color={colors.warning} />
        <Text variant="caption" tone="warning" style={styles.text}>
          {checkDigitWarning(check.expectedCheckDigit)}
        </Text>
      </View>
    );
  }
  return (
    <View style={[styles.box, styles.ok]} testID={testID ? `${testID}-ok` : undefined} aria-live="polite">
      <Icon name="check" size={sizes.iconSm} color={colors.success} />
      <Text variant="caption" tone="success" style={styles.text}>
        {`Check digit correct${year ? `; ${year}` : ''}.`}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: {
    gap: spacing.xs,
    alignSelf: 'stretch',
  },
  box: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.xs,
    borderRadius: radii.sm,
    borderWidth: 1,
    paddingHorizontal: spacing.sm,
    paddingVertical: spacing.xs,
  },
  warning: {
    backgroundColor: colors.warningTint,
    borderColor: colors.warning,
  },
  ok: {
    backgroundColor: colors.successTint,
    borderColor: colors.success,
  },
  text: {
    flex: 1,
  },
});
