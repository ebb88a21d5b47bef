import { useId, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Text } from '@/components/ui/text';
import { spacing } from '@/components/theme/tokens';
import { licenceEndsAt } from '@/shared/domain/fleet';
import type { DriverProfile } from '@/shared/schemas/fleet';
import { ChoiceRow, type ChoiceBadge } from './choice-row';
import { driverSummary, licenceFlag } from './fleet-words';

export type DriverNeeds = {
  /** The chosen vehicle's stage and the level it needs. */
  stage?: string;
  minLevel?: number;
  /** The end of the window (an instant), to flag a licence that runs out before it. */
  endsAt?: string | null;
};

/** Flags for one driver against what the booking needs, in words (a preview; the server decides). */
export function driverBadges(driver: DriverProfile, needs: DriverNeeds): ChoiceBadge[] {
  const out: ChoiceBadge[] = [];
  const flag = licenceFlag(driver);
  if (flag) out.push(flag);
  if (needs.minLevel !== undefined && driver.drivingLevel < needs.minLevel) {
    out.push({ label: `Below level ${needs.minLevel}${needs.stage ? ` for ${needs.stage}` : ''}`, tone: 'warning' });
  }
  if (driver.licenceExpiry && !driver.licenceExpired && needs.endsAt && licenceEndsAt(driver.licenceExpiry) < Date.parse(needs.endsAt)) {
    out.push({ label: 'Licence ends before the window does', tone: 'warning' });
  }
  return out;
}

/** The roster as a single choice: level, HV awareness and licence, with its flags, on every row. */
export function DriverPicker({
  label = 'Driver',
  drivers,
  value,
  onChange,
  needs = {},
  error,
  hideLabel = false,
  testID = 'book-driver',
}: {
  label?: string;
  drivers: readonly DriverProfile[];
  value: string | null;
  onChange: (userId: string) => void;
  needs?: DriverNeeds;
  error?: string;
  /** A heading above already says it; the label stays for screen readers. */
  hideLabel?: boolean;
  testID?: string;
}) {
  const labelId = `${useId().replace(/[^a-zA-Z0-9_-]/g, '')}-label`;
  const [browsing, setBrowsing] = useState(!value);
  const chosen = drivers.find((d) => d.userId === value);
  const shown = !browsing && chosen ? [chosen] : drivers;
  return (
    <View style={styles.field}>
      <Text variant="label" nativeID={labelId} style={hideLabel ? styles.visuallyHidden : undefined}>
        {label}
      </Text>
      <View role="radiogroup" aria-labelledby={labelId} testID={testID} style={styles.list}>
        {shown.map((driver) => (
          <ChoiceRow
            key={driver.userId}
            title={driver.name}
            subtitle={driverSummary(driver)}
            badges={driverBadges(driver, needs)}
            selected={driver.userId === value}
            onPress={() => {
              onChange(driver.userId);
              setBrowsing(false);
            }}
            testID={`${testID}-${driver.userId}`}
          />
        ))}
      </View>
      {!browsing && chosen ? (
        <Button label="Choose another driver" variant="secondary" compact onPress={() => setBrowsing(true)} testID={`${testID}-change`} />
      ) : null}
      {error ? (
        <Text variant="caption" tone="danger" aria-live="polite" testID={`${testID}-error`}>
          {error}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  field: {
    gap: spacing.sm,
    alignSelf: 'stretch',
  },
  list: {
    gap: spacing.xs,
  },
  visuallyHidden: {
    position: 'absolute',
    width: 1,
    height: 1,
    overflow: 'hidden',
    opacity: 0,
  },
});
