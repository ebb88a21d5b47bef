import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { pickPhoto, preparePhoto, type PickSource } from '@/components/photos/prepare-photo';
import { Button } from '@/components/ui/button';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Notice } from '@/components/ui/states';
import { spacing } from '@/components/theme/tokens';
import { queuedPhotoFrom } from '@/hooks/offline/photo-data';
import { useAddFindingPhotoMutation } from '@/hooks/queries/findings';
import { uploadErrorMessage } from '@/hooks/use-photo-upload';

/** "Add photo" on a finding's page: resized on the device, sent with progress and its own Idempotency-Key. */
export function FindingPhotoAdder({ findingId, online }: { findingId: string; online: boolean }) {
  const add = useAddFindingPhotoMutation(findingId);
  const [progress, setProgress] = useState<number | null>(null);
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
    setProgress(0);
    const photo = await queuedPhotoFrom(await preparePhoto(picked));
    add.mutate(
      { photo, onProgress: setProgress },
      {
        onSettled: () => setProgress(null),
        onError: (reason) => setError(uploadErrorMessage(reason)),
      },
    );
  };

  return (
    <View style={styles.wrap}>
      <View style={styles.buttons}>
        <Button label="Add photo" icon="camera" variant="secondary" compact disabled={!online} loading={progress !== null} onPress={() => void start('camera')} testID="finding-detail-photo-add" />
        <Button label="Choose photo" icon="image" variant="ghost" compact disabled={!online || progress !== null} onPress={() => void start('library')} />
      </View>
      {progress !== null ? <ProgressBar value={progress} label="Photo upload" caption={`Sending… ${Math.round(progress * 100)}%`} /> : null}
      {error ? <Notice message={error} /> : null}
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
});
