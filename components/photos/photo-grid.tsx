import { Image, Linking, Pressable, StyleSheet, View } from 'react-native';
import { Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import type { Photo } from '@/shared/schemas/assets';

/** Thumbnails (signed URLs, used as they come); a tap opens the full photo. */
export function PhotoGrid({ photos, size = 96, label, testID }: { photos: readonly Photo[]; size?: number; label: string; testID?: string }) {
  if (photos.length === 0) return null;
  return (
    <View style={styles.grid} testID={testID}>
      {photos.map((photo, index) => (
        <Thumb key={photo.id} photo={photo} size={size} label={`${label}, photo ${index + 1} of ${photos.length}`} />
      ))}
    </View>
  );
}

function Thumb({ photo, size, label }: { photo: Photo; size: number; label: string }) {
  const ring = useFocusRing();
  return (
    <Pressable
      accessibilityRole="link"
      accessibilityLabel={`${label}. Opens the full photo`}
      onPress={() => void Linking.openURL(photo.url)}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      style={({ pressed }) => [styles.thumb, { width: size, height: size }, pressed && styles.pressed, ring.focused && styles.focused]}
      testID={`photo-${photo.id}`}
    >
      <Image source={{ uri: photo.thumbnailUrl }} style={styles.image} alt="" accessibilityIgnoresInvertColors />
    </Pressable>
  );
}

export function PhotoCount({ count }: { count: number }) {
  return (
    <Text variant="caption" tone="muted">
      {count === 0 ? 'No photos yet.' : count === 1 ? '1 photo' : `${count} photos`}
    </Text>
  );
}

const styles = StyleSheet.create({
  grid: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  thumb: {
    borderRadius: radii.md,
    overflow: 'hidden',
    backgroundColor: colors.surfaceMuted,
    borderWidth: 1,
    borderColor: colors.border,
    minWidth: sizes.touch,
    minHeight: sizes.touch,
  },
  image: {
    width: '100%',
    height: '100%',
  },
  pressed: {
    opacity: 0.8,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
});
