import { useState } from 'react';
import { Image, StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { usePhotoUpload, type UploadJob } from '@/hooks/use-photo-upload';
import { pickPhoto, preparePhoto, type PickSource } from './prepare-photo';

export type PhotoPickerProps = {
  assetId: string;
  checklistItemId?: string;
  /** The camera button's id; the library button gets `<testID>-library`. */
  testID?: string;
  label?: string;
  compact?: boolean;
};

/** "Take photo" and "Choose photo", then each upload with its progress bar, or its error and Retry. */
export function PhotoPicker({ assetId, checklistItemId, testID = 'add-photo', label = 'Take photo', compact = true }: PhotoPickerProps) {
  const { jobs, add, retry, dismiss } = usePhotoUpload({ assetId, checklistItemId });
  const [preparing, setPreparing] = useState(false);
  const [pickError, setPickError] = useState<string | null>(null);

  const start = async (source: PickSource) => {
    setPickError(null);
    let asset;
    try {
      asset = await pickPhoto(source);
    } catch {
      setPickError('The photo could not be opened. Try another one.');
      return;
    }
    if (!asset) return;
    setPreparing(true);
    const prepared = await preparePhoto(asset);
    setPreparing(false);
    void add(prepared);
  };

  return (
    <View style={styles.wrap}>
      <View style={styles.buttons}>
        <Button label={label} icon="camera" variant="secondary" compact={compact} loading={preparing} onPress={() => void start('camera')} testID={testID} />
        <Button
          label="Choose photo"
          icon="image"
          variant="ghost"
          compact={compact}
          disabled={preparing}
          onPress={() => void start('library')}
          testID={`${testID}-library`}
        />
      </View>
      {preparing ? (
        <Text variant="caption" tone="muted" aria-live="polite">
          Making the photo smaller for upload…
        </Text>
      ) : null}
      {pickError ? <Notice message={pickError} /> : null}
      {jobs.map((job) => (
        <UploadRow key={job.key} job={job} onRetry={() => retry(job.key)} onDismiss={() => dismiss(job.key)} />
      ))}
    </View>
  );
}

function UploadRow({ job, onRetry, onDismiss }: { job: UploadJob; onRetry: () => void; onDismiss: () => void }) {
  return (
    <View style={styles.job}>
      <Image source={{ uri: job.photo.previewUri }} style={styles.preview} alt="" accessibilityIgnoresInvertColors />
      <View style={styles.jobBody}>
        {job.status === 'failed' ? (
          <>
            <View accessibilityRole="alert" testID="photo-error">
              <Text tone="danger">{job.error ?? 'The photo was not sent.'}</Text>
            </View>
            <View style={styles.buttons}>
              <Button label="Retry" icon="refresh" compact onPress={onRetry} testID="photo-retry" />
              <Button label="Discard" variant="ghost" compact onPress={onDismiss} testID="photo-discard" />
            </View>
          </>
        ) : (
          <ProgressBar
            value={job.progress}
            label="Photo upload"
            caption={job.status === 'done' ? 'Sent.' : `Sending… ${Math.round(job.progress * 100)}%`}
            testID="photo-progress"
          />
        )}
      </View>
    </View>
  );
}

const PREVIEW = 56;

const styles = StyleSheet.create({
  wrap: {
    gap: spacing.sm,
    alignSelf: 'stretch',
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  job: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    padding: spacing.sm,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  preview: {
    width: PREVIEW,
    height: PREVIEW,
    borderRadius: radii.sm,
    backgroundColor: colors.surfaceMuted,
  },
  jobBody: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xs,
  },
});
