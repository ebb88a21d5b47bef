import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Chip } from '@/components/ui/chip';
import { LoadingState, Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useAssetListQuery } from '@/hooks/queries/assets';
import { useDebouncedValue } from '@/hooks/use-debounced-value';

const SHOWN = 8;

/** Finds the asset by tag, VIN or words when the capture did not start from an asset. */
export function AssetPicker({
  programId,
  onPick,
  error,
}: {
  programId: string | null;
  onPick: (asset: { id: string; tag: string }) => void;
  error?: string;
}) {
  const [search, setSearch] = useState('');
  const q = useDebouncedValue(search.trim(), 300);
  const list = useAssetListQuery(programId ? { programId, q: q || undefined, sort: 'tag', dir: 'asc' } : null);
  const items = useMemo(() => list.data?.pages[0]?.items.slice(0, SHOWN) ?? [], [list.data]);

  return (
    <View style={styles.wrap}>
      <TextField
        label="Which asset?"
        value={search}
        onChangeText={setSearch}
        placeholder="Tag, VIN or words"
        autoCapitalize="characters"
        autoCorrect={false}
        inputMode="search"
        error={error}
        hint="Or open the asset (or scan its label) and press File a finding there."
        testID="finding-asset-search"
      />
      {list.isPending && programId ? <LoadingState label="Looking for assets…" /> : null}
      {list.isError ? <Notice message={errorMessage(list.error)} /> : null}
      {list.isSuccess && items.length === 0 ? <Text tone="muted">No asset matches.</Text> : null}
      <View style={styles.chips} role="list">
        {items.map((asset) => (
          <Chip
            key={asset.id}
            label={`${asset.tag} · ${asset.stage}`}
            accessibilityLabel={`File on ${asset.tag}, ${asset.stage}`}
            onPress={() => onPick({ id: asset.id, tag: asset.tag })}
            testID={`finding-asset-${asset.tag}`}
          />
        ))}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: {
    gap: spacing.sm,
  },
  chips: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
