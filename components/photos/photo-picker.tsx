import { useEffect, useState } from 'react';
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
  /** The camera button's label once a photo was sent (with `keepSent`). */
  againLabel?: string;
  compact?: boolean;
  /** A label above the buttons. */
  heading?: string;
  /** What one photo is called ("Walk-around photo"): its preview's alt text and its Remove button say "<name> <n>". */
  name?: string;
  /** Prefix of each upload row's ids: `-retry`, `-discard`, `-error`, `-progress`. */
  rowTestID?: string;
  /**
   * Sent photos stay listed ("Photo 1 sent." and Remove) instead of joining the asset's photos,
   * for a form that links them by id; `onChange` hears their ids and whether any is on its way.
   */
  keepSent?: boolean;
  onChange?: (state: { photoIds: string[]; busy: boolean }) => void;
};

/** "Take photo" and "Choose photo", then each upload with its progress bar, or its error and Retry. */
export function PhotoPicker({
  assetId,
  checklistItemId,
  testID = 'add-photo',
  label = 'Take photo',
  againLabel = label,
  compact = true,
  heading,
  name,
  rowTestID = 'photo',
  keepSent = false,
  onChange,
}: PhotoPickerProps) {
  const { jobs, add, retry, dismiss } = usePhotoUpload({ assetId, checklistItemId, keepSent });
  const [preparing, setPreparing] = useState(false);
  const [pickError, setPickError] = useState<string | null>(null);

  useEffect(() => {
    onChange?.({
      photoIds: jobs.flatMap((job) => (job.saved ? [job.saved.id] : [])),
      busy: preparing || jobs.some((job) => job.status === 'uploading'),
    });
  }, [jobs, preparing, onChange]);

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
    try {
      void add(await preparePhoto(asset));
    } catch {
      setPickError('The photo could not be read. Try another one.');
    } finally {
      setPreparing(false);
    }
  };

  const sent = jobs.some((job) => job.saved);

  return (
    <View style={styles.wrap}>
      {heading ? <Text variant="label">{heading}</Text> : null}
      <View style={styles.buttons}>
        <Button label={keepSent && sent ? againLabel : label} icon="camera" variant="secondary" compact={compact} loading={preparing} onPress={() => void start('camera')} testID={testID} />
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
      {jobs.map((job, index) => (
        <UploadRow
          key={job.key}
          job={job}
          name={name ? `${name} ${index + 1}` : undefined}
          number={index + 1}
          kept={keepSent}
          testID={rowTestID}
          onRetry={() => retry(job.key)}
          onDismiss={() => dismiss(job.key)}
        />
      ))}
    </View>
  );
}

type UploadRowProps = {
  job: UploadJob;
  /** "Walk-around photo 2"; without it the preview is decorative. */
  name?: string;
  number: number;
  /** Kept once sent (`keepSent`): the record of what goes with the form, with a larger preview. */
  kept: boolean;
  testID: string;
  onRetry: () => void;
  onDismiss: () => void;
};

function UploadRow({ job, name, number, kept, testID, onRetry, onDismiss }: UploadRowProps) {
  return (
    <View style={styles.job}>
      <Image source={{ uri: job.photo.previewUri }} style={[styles.preview, kept && styles.previewLarge]} alt={name ?? ''} accessibilityIgnoresInvertColors />
      <View style={styles.jobBody}>
        {job.status === 'failed' ? (
          <>
            <View accessibilityRole="alert" testID={`${testID}-error`}>
              <Text tone="danger">{job.error ?? 'The photo was not sent.'}</Text>
            </View>
            <View style={styles.buttons}>
              <Button label="Retry" icon="refresh" compact onPress={onRetry} testID={`${testID}-retry`} />
              <Button label="Discard" variant="ghost" compact onPress={onDismiss} testID={`${testID}-discard`} />
            </View>
          </>
        ) : kept && job.status === 'done' ? (
          <View style={styles.sentRow}>
            <Text variant="caption" tone="success" style={styles.flex}>
              Photo {number} sent.
            </Text>
            <Button label="Remove" variant="ghost" compact accessibilityLabel={name ? `Remove ${name.toLowerCase()}` : undefined} onPress={onDismiss} />
          </View>
        ) : (
          <ProgressBar
            value={job.progress}
            label="Photo upload"
            caption={job.status === 'done' ? 'Sent.' : `Sending… ${Math.round(job.progress * 100)}%`}
            testID={`${testID}-progress`}
          />
        )}
      </View>
    </View>
  );
}

const PREVIEW = 56;
const PREVIEW_LARGE = 72;

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
  previewLarge: {
    width: PREVIEW_LARGE,
    height: PREVIEW_LARGE,
  },
  jobBody: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xs,
  },
  sentRow: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
  },
  flex: {
    flex: 1,
  },
});
