import { useId, useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { spacing } from '@/components/theme/tokens';
import { formatKm } from '@/components/assets/asset-words';
import { ASSET_STATUS_LABELS, type AssetSummary, type Stage } from '@/shared/schemas/assets';
import { ChoiceRow, type ChoiceBadge } from './choice-row';

/** More vehicles than this get a search field above the list. */
const SEARCH_FROM = 8;

export function vehicleBadges(vehicle: AssetSummary): ChoiceBadge[] {
  const out: ChoiceBadge[] = [];
  if (!vehicle.cleared) out.push({ label: 'Not cleared: do not take it', tone: 'danger' });
  if (vehicle.status === 'down' || vehicle.status === 'retired') out.push({ label: ASSET_STATUS_LABELS[vehicle.status], tone: 'danger' });
  return out;
}

/** The program's vehicles as a single choice, with stage, level needed, status and safety state. */
export function VehiclePicker({
  vehicles,
  stages,
  value,
  onChange,
  error,
  hideLabel = false,
  testID = 'book-asset',
}: {
  vehicles: readonly AssetSummary[];
  stages: readonly Stage[];
  value: string | null;
  onChange: (assetId: string) => void;
  error?: string;
  /** A heading above already says it; the label stays for screen readers. */
  hideLabel?: boolean;
  testID?: string;
}) {
  const labelId = `${useId().replace(/[^a-zA-Z0-9_-]/g, '')}-label`;
  const [search, setSearch] = useState('');
  // Once a vehicle is chosen the list folds to it, so the rest of the form is a short scroll away.
  const [browsing, setBrowsing] = useState(!value);
  const chosen = vehicles.find((v) => v.id === value);
  const levelOf = useMemo(() => new Map(stages.map((stage) => [stage.id, stage.minDriverLevel])), [stages]);
  const needle = search.trim().toLowerCase();
  const shown =
    !browsing && chosen
      ? [chosen]
      : needle
        ? vehicles.filter((v) => v.id === value || `${v.tag} ${v.stage} ${v.location}`.toLowerCase().includes(needle))
        : vehicles;

  return (
    <View style={styles.field}>
      <Text variant="label" nativeID={labelId} style={hideLabel ? styles.visuallyHidden : undefined}>
        Vehicle
      </Text>
      {(browsing || !chosen) && vehicles.length > SEARCH_FROM ? (
        <TextField
          label="Find a vehicle"
          value={search}
          onChangeText={setSearch}
          placeholder="Tag, stage or location"
          autoCapitalize="characters"
          autoCorrect={false}
          inputMode="search"
          testID={`${testID}-search`}
        />
      ) : null}
      <View role="radiogroup" aria-labelledby={labelId} testID={testID} style={styles.list}>
        {shown.map((vehicle) => {
          const level = levelOf.get(vehicle.stageId);
          return (
            <ChoiceRow
              key={vehicle.id}
              title={vehicle.tag}
              subtitle={[
                vehicle.stage,
                level ? `needs level ${level}` : null,
                ASSET_STATUS_LABELS[vehicle.status],
                formatKm(vehicle.odometerKm),
              ]
                .filter(Boolean)
                .join(' · ')}
              badges={vehicleBadges(vehicle)}
              selected={vehicle.id === value}
              onPress={() => {
                onChange(vehicle.id);
                setBrowsing(false);
              }}
              testID={`${testID}-${vehicle.id}`}
            />
          );
        })}
        {shown.length === 0 ? <Text tone="muted">No vehicle matches “{search.trim()}”.</Text> : null}
      </View>
      {!browsing && chosen ? (
        <Button label="Choose another vehicle" variant="secondary" compact onPress={() => setBrowsing(true)} testID={`${testID}-change`} />
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
