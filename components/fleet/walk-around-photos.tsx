import { useCallback, useEffect, useRef, useState } from 'react';
import { Image, Platform, StyleSheet, View } from 'react-native';
import { pickPhoto, preparePhoto, type PickSource } from '@/components/photos/prepare-photo';
import { Button } from '@/components/ui/button';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { randomId } from '@/hooks/api/ids';
import { uploadWithProgress } from '@/hooks/api/upload';
import { uploadErrorMessage, type PreparedPhoto } from '@/hooks/use-photo-upload';
import { API } from '@/shared/api/paths';
import { IDEMPOTENCY_HEADER, PHOTO_FIELD, PhotoSchema, type Photo } from '@/shared/schemas/assets';

type Job = { key: string; photo: PreparedPhoto; status: 'uploading' | 'failed' | 'done'; progress: number; error: string | null; saved: Photo | null };

const THUMB = 72;

function formDataFor(photo: PreparedPhoto): FormData {
  const form = new FormData();
  if (Platform.OS === 'web' && photo.blob) form.append(PHOTO_FIELD, photo.blob, photo.name);
  // React Native's FormData takes a { uri, name, type } part for a file on the device.
  else form.append(PHOTO_FIELD, { uri: photo.uri, name: photo.name, type: photo.type } as unknown as Blob);
  return form;
}

/**
 * Walk-around photos for a check-out or check-in: picked and resized like every other photo
 * (the photo picker's own preparation), uploaded to the vehicle at once with progress, then
 * linked to the check by id. Each photo keeps one Idempotency-Key across retries.
 */
export function WalkAroundPhotos({
  assetId,
  onChange,
  testID,
}: {
  assetId: string;
  /** The ids of the photos sent so far, and whether any is still on its way. */
  onChange: (state: { photoIds: string[]; busy: boolean }) => void;
  testID: string;
}) {
  const [jobs, setJobs] = useState<Job[]>([]);
  const [preparing, setPreparing] = useState(false);
  const [pickError, setPickError] = useState<string | null>(null);
  const mounted = useRef(true);
  useEffect(() => {
    mounted.current = true;
    return () => {
      mounted.current = false;
    };
  }, []);

  useEffect(() => {
    onChange({
      photoIds: jobs.flatMap((job) => (job.saved ? [job.saved.id] : [])),
      busy: preparing || jobs.some((job) => job.status === 'uploading'),
    });
  }, [jobs, preparing, onChange]);

  const patch = useCallback((key: string, change: Partial<Job>) => {
    if (mounted.current) setJobs((list) => list.map((job) => (job.key === key ? { ...job, ...change } : job)));
  }, []);

  const send = useCallback(
    async (key: string, photo: PreparedPhoto) => {
      patch(key, { status: 'uploading', progress: 0, error: null });
      try {
        const saved = await uploadWithProgress(API.assetPhotos(assetId), {
          body: formDataFor(photo),
          schema: PhotoSchema,
          headers: { [IDEMPOTENCY_HEADER]: key },
          onProgress: (progress) => patch(key, { progress }),
        });
        patch(key, { status: 'done', progress: 1, saved });
      } catch (error) {
        patch(key, { status: 'failed', error: uploadErrorMessage(error) });
      }
    },
    [assetId, patch],
  );

  const start = async (source: PickSource) => {
    setPickError(null);
    let picked;
    try {
      picked = await pickPhoto(source);
    } catch {
      setPickError('The photo could not be opened. Try another one.');
      return;
    }
    if (!picked) return;
    setPreparing(true);
    try {
      const photo = await preparePhoto(picked);
      const key = randomId();
      setJobs((list) => [...list, { key, photo, status: 'uploading', progress: 0, error: null, saved: null }]);
      void send(key, photo);
    } catch {
      setPickError('The photo could not be read. Try another one.');
    } finally {
      if (mounted.current) setPreparing(false);
    }
  };

  const done = jobs.filter((job) => job.saved).length;

  return (
    <View style={styles.wrap}>
      <Text variant="label">Walk-around photos (optional)</Text>
      <View style={styles.buttons}>
        <Button
          label={done ? 'Take another photo' : 'Take photo'}
          icon="camera"
          variant="secondary"
          compact
          loading={preparing}
          onPress={() => void start('camera')}
          testID={`${testID}-photo`}
        />
        <Button label="Choose photo" icon="image" variant="ghost" compact disabled={preparing} onPress={() => void start('library')} testID={`${testID}-photo-library`} />
      </View>
      {preparing ? (
        <Text variant="caption" tone="muted" aria-live="polite">
          Making the photo smaller for upload…
        </Text>
      ) : null}
      {pickError ? <Notice message={pickError} /> : null}
      {jobs.map((job, index) => (
        <View key={job.key} style={styles.job}>
          <Image source={{ uri: job.photo.previewUri }} style={styles.preview} alt={`Walk-around photo ${index + 1}`} accessibilityIgnoresInvertColors />
          <View style={styles.jobBody}>
            {job.status === 'failed' ? (
              <>
                <Text tone="danger" accessibilityRole="alert">
                  {job.error ?? 'The photo was not sent.'}
                </Text>
                <View style={styles.buttons}>
                  <Button label="Retry" icon="refresh" compact onPress={() => void send(job.key, job.photo)} testID={`${testID}-photo-retry`} />
                  <Button label="Discard" variant="ghost" compact onPress={() => setJobs((list) => list.filter((j) => j.key !== job.key))} />
                </View>
              </>
            ) : job.status === 'done' ? (
              <View style={styles.doneRow}>
                <Text variant="caption" tone="success" style={styles.flex}>
                  Photo {index + 1} sent.
                </Text>
                <Button
                  label="Remove"
                  variant="ghost"
                  compact
                  accessibilityLabel={`Remove walk-around photo ${index + 1}`}
                  onPress={() => setJobs((list) => list.filter((j) => j.key !== job.key))}
                />
              </View>
            ) : (
              <ProgressBar value={job.progress} label="Photo upload" caption={`Sending… ${Math.round(job.progress * 100)}%`} />
            )}
          </View>
        </View>
      ))}
    </View>
  );
}

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
    width: THUMB,
    height: THUMB,
    borderRadius: radii.sm,
    backgroundColor: colors.surfaceMuted,
  },
  jobBody: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xs,
  },
  doneRow: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
  },
  flex: {
    flex: 1,
  },
});
