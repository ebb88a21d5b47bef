import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import type { Blocker } from '@/shared/schemas/readiness';
import { blockerItemLabel, itemHref } from './readiness-words';

/** What stops the gate, in plain words, each with links to the first few items and their assets. */
export function BlockerList({ blockers, testID }: { blockers: Blocker[]; testID?: string }) {
  return (
    <View style={styles.list} testID={testID} accessibilityLabel="What stops the gate">
      {blockers.length === 0 ? <Text tone="muted">Nothing stops this gate.</Text> : null}
      {blockers.map((blocker) => (
        <View key={blocker.kind} style={styles.blocker}>
          <Text variant="bodyStrong">{blocker.text}</Text>
          {blocker.items.map((item) => (
            <View key={`${item.kind}-${item.id}-${item.assetId}`} style={styles.item}>
              <TextLink href={itemHref(item, item.assetId)} label={blockerItemLabel(item)} />
              {item.kind === 'finding' || item.kind === 'validation-test' ? (
                <TextLink href={`/assets/${item.assetId}`} label={`Asset ${item.assetTag}`} />
              ) : null}
            </View>
          ))}
          {blocker.count > blocker.items.length ? (
            <Text tone="muted" variant="caption">{`and ${blocker.count - blocker.items.length} more`}</Text>
          ) : null}
        </View>
      ))}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: spacing.md },
  blocker: { gap: spacing.xxs },
  item: { paddingLeft: spacing.md, maxWidth: '100%' },
});
