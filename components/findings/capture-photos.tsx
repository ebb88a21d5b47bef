import { useState } from 'react';
import { Image, StyleSheet, View } from 'react-native';
import { pickPhoto, preparePhoto, type PickSource } from '@/components/photos/prepare-photo';
import { Button } from '@/components/ui/button';
import { Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { queuedPhotoFrom, queuedPhotoPreview, type QueuedPhoto } from '@/hooks/offline/photo-data';

const THUMB = 88;

/**
 * Camera first: photos are resized on the device (the photo picker's own preparation) and held
 * with the capture until it is sent, so they go with it even when the connection is gone.
 */
export function CapturePhotos({
  photos,
  onAdd,
  onRemove,
}: {
  photos: readonly QueuedPhoto[];
  onAdd: (photo: QueuedPhoto) => void;
  onRemove: (key: string) => void;
}) {
  const [preparing, setPreparing] = useState(false);
  const [error, setError] = useState<string | null>(null);

  const start = async (source: PickSource) => {
    setError(null);
    let picked;
    try {
      picked = await pickPhoto(source);
    } catch {
      setError('The photo could not be opened. Try another one.');
      return;
    }
    if (!picked) return;
    setPreparing(true);
    try {
      onAdd(await queuedPhotoFrom(await preparePhoto(picked)));
    } catch {
      setError('The photo could not be read. Try another one.');
    } finally {
      setPreparing(false);
    }
  };

  return (
    <View style={styles.wrap}>
      <View style={styles.buttons}>
        <Button
          label={photos.length ? 'Take another photo' : 'Take photo'}
          icon="camera"
          loading={preparing}
          onPress={() => void start('camera')}
          testID="finding-photo-add"
        />
        <Button label="Choose photo" icon="image" variant="secondary" disabled={preparing} onPress={() => void start('library')} testID="finding-photo-add-library" />
      </View>
      {preparing ? (
        <Text variant="caption" tone="muted" aria-live="polite">
          Making the photo smaller for upload…
        </Text>
      ) : null}
      {error ? <Notice message={error} /> : null}
      {photos.length ? (
        <View style={styles.thumbs} testID="finding-photos">
          {photos.map((photo, index) => (
            <View key={photo.key} style={styles.thumbBox}>
              <Image source={{ uri: queuedPhotoPreview(photo) }} style={styles.thumb} alt={`Photo ${index + 1}`} accessibilityIgnoresInvertColors />
              <Button
                label="Remove"
                variant="ghost"
                compact
                accessibilityLabel={`Remove photo ${index + 1}`}
                onPress={() => onRemove(photo.key)}
                testID={`finding-photo-remove-${index}`}
              />
            </View>
          ))}
        </View>
      ) : (
        <Text variant="caption" tone="muted">
          A photo helps the person who fixes it. You can also file without one.
        </Text>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: {
    gap: spacing.sm,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  thumbs: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.md,
  },
  thumbBox: {
    alignItems: 'center',
  },
  thumb: {
    width: THUMB,
    height: THUMB,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.border,
    backgroundColor: colors.surfaceMuted,
  },
});
