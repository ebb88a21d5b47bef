import { Platform } from 'react-native';
import { randomId } from '@/hooks/api/ids';
import type { PreparedPhoto } from '@/hooks/use-photo-upload';
import { PHOTO_FIELD } from '@/shared/schemas/assets';

/**
 * A photo waiting to be sent with a queued change. It must survive a reload as JSON, so on the
 * web the bytes travel as a data URL (the page's storage cannot hold a Blob); on a phone the
 * resized file stays on the device and only its URI is kept.
 */
export type QueuedPhoto = {
  /** The photo's own Idempotency-Key. */
  key: string;
  name: string;
  type: string;
  dataUrl?: string;
  uri?: string;
};

export function blobToDataUrl(blob: Blob): Promise<string> {
  return new Promise((resolve, reject) => {
    const reader = new FileReader();
    reader.onload = () => (typeof reader.result === 'string' ? resolve(reader.result) : reject(new Error('Unreadable photo.')));
    reader.onerror = () => reject(reader.error ?? new Error('Unreadable photo.'));
    reader.readAsDataURL(blob);
  });
}

export function dataUrlToBlob(dataUrl: string): Blob {
  const comma = dataUrl.indexOf(',');
  const head = dataUrl.slice(0, comma);
  const type = /^data:([^;,]+)/.exec(head)?.[1] ?? 'application/octet-stream';
  const payload = dataUrl.slice(comma + 1);
  if (!head.includes(';base64')) return new Blob([decodeURIComponent(payload)], { type });
  const binary = atob(payload);
  const bytes = new Uint8Array(binary.length);
  for (let i = 0; i < binary.length; i += 1) bytes[i] = binary.charCodeAt(i);
  return new Blob([bytes], { type });
}

export async function queuedPhotoFrom(photo: PreparedPhoto): Promise<QueuedPhoto> {
  const base = { key: randomId(), name: photo.name, type: photo.type };
  if (Platform.OS === 'web' && photo.blob) return { ...base, dataUrl: await blobToDataUrl(photo.blob) };
  return { ...base, uri: photo.uri };
}

/** What an `<Image>` can show of a queued photo. */
export const queuedPhotoPreview = (photo: QueuedPhoto) => photo.dataUrl ?? photo.uri ?? '';

export function photoFormData(photo: QueuedPhoto): FormData {
  const form = new FormData();
  if (photo.dataUrl) form.append(PHOTO_FIELD, dataUrlToBlob(photo.dataUrl), photo.name);
  // React Native's FormData takes a { uri, name, type } part for a file on the device.
  else form.append(PHOTO_FIELD, { uri: photo.uri, name: photo.name, type: photo.type } as unknown as Blob);
  return form;
}
