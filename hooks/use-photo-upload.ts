import { useCallback, useEffect, useRef, useState } from 'react';
import { Platform } from 'react-native';
import { errorMessage, isApiError } from '@/hooks/api/api-client';
import { randomId } from '@/hooks/api/ids';
import { uploadWithProgress } from '@/hooks/api/upload';
import { usePhotoAdded } from '@/hooks/queries/assets';
import { ERROR_SENTENCES } from '@/shared/api/errors';
import { API } from '@/shared/api/paths';
import { IDEMPOTENCY_HEADER, PHOTO_FIELD, PhotoSchema, type Photo } from '@/shared/schemas/assets';

/** A photo ready to send: a Blob on the web, a file URI on a phone. */
export type PreparedPhoto = {
  uri: string;
  name: string;
  type: string;
  blob?: Blob;
  /** Local preview while it uploads. */
  previewUri: string;
};

export type UploadJob = {
  /** The Idempotency-Key: made once per picked photo, so a retry never stores it twice. */
  key: string;
  photo: PreparedPhoto;
  status: 'uploading' | 'failed' | 'done';
  progress: number;
  error: string | null;
  /** The stored photo, once sent (kept in the list only with `keepSent`). */
  saved: Photo | null;
};

/**
 * The sentence for a failed upload. Upload refusals (413, 415, `upload/...`) carry a whole
 * sentence from the server, better than their one-word field note ("Too large."); anything
 * else reads like every other failure.
 */
export function uploadErrorMessage(error: unknown): string {
  if (isApiError(error) && (error.code.startsWith('upload/') || error.status === 413 || error.status === 415)) {
    const message = error.message.trim();
    if (message && message.length <= 300 && !/^[a-z-]+\/[a-z-]+$/.test(message)) return message;
    return ERROR_SENTENCES[error.code] ?? ERROR_SENTENCES['upload/unsupported-type'];
  }
  return errorMessage(error);
}

function formDataFor(photo: PreparedPhoto, checklistItemId?: string): FormData {
  const form = new FormData();
  if (Platform.OS === 'web' && photo.blob) {
    form.append(PHOTO_FIELD, photo.blob, photo.name);
  } else {
    // React Native's FormData takes a { uri, name, type } part for a file on the device.
    form.append(PHOTO_FIELD, { uri: photo.uri, name: photo.name, type: photo.type } as unknown as Blob);
  }
  if (checklistItemId) form.append('checklistItemId', checklistItemId);
  return form;
}

/**
 * Uploads picked photos to an asset (or one of its checklist items) with progress and retry.
 * A sent photo joins the asset's cached photos and leaves the list; with `keepSent` it stays in
 * the list with its stored record (`job.saved`) until dismissed, for a form that links the
 * photos by id when it is sent (the walk-around of a vehicle check).
 */
export function usePhotoUpload({ assetId, checklistItemId, keepSent = false }: { assetId: string; checklistItemId?: string; keepSent?: boolean }) {
  const [jobs, setJobs] = useState<UploadJob[]>([]);
  const photoAdded = usePhotoAdded();
  const mounted = useRef(true);
  useEffect(() => {
    mounted.current = true;
    return () => {
      mounted.current = false;
    };
  }, []);

  const patch = useCallback((key: string, change: Partial<UploadJob>) => {
    if (!mounted.current) return;
    setJobs((list) => list.map((job) => (job.key === key ? { ...job, ...change } : job)));
  }, []);

  const send = useCallback(
    async (key: string, photo: PreparedPhoto): Promise<Photo | null> => {
      patch(key, { status: 'uploading', progress: 0, error: null });
      try {
        const saved = await uploadWithProgress(API.assetPhotos(assetId), {
          body: formDataFor(photo, checklistItemId),
          schema: PhotoSchema,
          headers: { [IDEMPOTENCY_HEADER]: key },
          onProgress: (fraction) => patch(key, { progress: fraction }),
        });
        patch(key, { status: 'done', progress: 1, saved });
        if (keepSent) return saved;
        await photoAdded(saved);
        // A finished upload leaves the list: the photo now shows with the others.
        if (mounted.current) setJobs((list) => list.filter((job) => job.key !== key));
        return saved;
      } catch (error) {
        patch(key, { status: 'failed', error: uploadErrorMessage(error) });
        return null;
      }
    },
    [assetId, checklistItemId, keepSent, patch, photoAdded],
  );

  const add = useCallback(
    (photo: PreparedPhoto) => {
      const key = randomId();
      setJobs((list) => [...list, { key, photo, status: 'uploading', progress: 0, error: null, saved: null }]);
      return send(key, photo);
    },
    [send],
  );

  const retry = useCallback(
    (key: string) => {
      const job = jobs.find((item) => item.key === key);
      if (job) void send(job.key, job.photo);
    },
    [jobs, send],
  );

  const dismiss = useCallback((key: string) => setJobs((list) => list.filter((job) => job.key !== key)), []);

  return { jobs, add, retry, dismiss };
}
