import * as ImagePicker from 'expo-image-picker';
import { ImageManipulator, SaveFormat } from 'expo-image-manipulator';
import { Platform } from 'react-native';
import type { PreparedPhoto } from '@/hooks/use-photo-upload';
import { PHOTO_CLIENT_LONG_SIDE } from '@/shared/schemas/assets';

/** JPEG quality after resizing: small enough for a weak site connection, sharp enough to read a label. */
export const PHOTO_JPEG_QUALITY = 0.8;

export type PickSource = 'camera' | 'library';

/**
 * Asks for one photo. The camera where the device has one and allows it, else the library; on
 * the web both open the browser's file chooser (the camera one hints phones to open the camera).
 */
export async function pickPhoto(source: PickSource): Promise<ImagePicker.ImagePickerAsset | null> {
  const options: ImagePicker.ImagePickerOptions = { mediaTypes: ['images'], quality: 1, exif: false };
  if (source === 'camera') {
    const allowed = Platform.OS === 'web' || (await ImagePicker.requestCameraPermissionsAsync()).granted;
    if (allowed) {
      try {
        const result = await ImagePicker.launchCameraAsync(options);
        return result.canceled ? null : (result.assets[0] ?? null);
      } catch {
        // No camera (a simulator, a desktop): fall through to the library.
      }
    }
  }
  const result = await ImagePicker.launchImageLibraryAsync(options);
  return result.canceled ? null : (result.assets[0] ?? null);
}

function base64ToBlob(base64: string, type: string): Blob {
  const binary = atob(base64);
  const bytes = new Uint8Array(binary.length);
  for (let i = 0; i < binary.length; i += 1) bytes[i] = binary.charCodeAt(i);
  return new Blob([bytes], { type });
}

function jpegName(name: string | null | undefined): string {
  const base = (name ?? 'photo').replace(/\.[^.]+$/, '') || 'photo';
  return `${base}.jpg`;
}

/** The size to draw at: the long side brought down to PHOTO_CLIENT_LONG_SIDE, never up. */
export function targetSize(width: number, height: number, longSide = PHOTO_CLIENT_LONG_SIDE): { width: number; height: number } | null {
  const long = Math.max(width, height);
  if (!width || !height || long <= longSide) return null;
  const scale = longSide / long;
  return { width: Math.round(width * scale), height: Math.round(height * scale) };
}

/**
 * Resizes to a long side of about 1600 px and re-encodes as JPEG before upload (on the web
 * through a canvas). When the browser cannot decode the file (HEIC in most desktop browsers),
 * the original goes up as it is and the server converts it.
 */
export async function preparePhoto(asset: ImagePicker.ImagePickerAsset): Promise<PreparedPhoto> {
  const original: PreparedPhoto = {
    uri: asset.uri,
    name: asset.fileName ?? asset.file?.name ?? 'photo.jpg',
    type: asset.mimeType ?? asset.file?.type ?? 'image/jpeg',
    blob: asset.file,
    previewUri: asset.uri,
  };
  try {
    const context = ImageManipulator.manipulate(asset.uri);
    const size = targetSize(asset.width, asset.height);
    if (size) context.resize(size);
    let image = await context.renderAsync();
    if (!size) {
      // The picker did not know the size (some browsers): check the decoded image.
      const late = targetSize(image.width, image.height);
      if (late) image = await ImageManipulator.manipulate(asset.uri).resize(late).renderAsync();
    }
    const web = Platform.OS === 'web';
    const saved = await image.saveAsync({ compress: PHOTO_JPEG_QUALITY, format: SaveFormat.JPEG, base64: web });
    const prepared: PreparedPhoto = { uri: saved.uri, name: jpegName(original.name), type: 'image/jpeg', previewUri: saved.uri };
    // The page's Content-Security-Policy refuses fetch() of blob: URLs, so the bytes come from the base64 copy.
    if (web) {
      if (!saved.base64) return original;
      prepared.blob = base64ToBlob(saved.base64, 'image/jpeg');
    }
    return prepared;
  } catch {
    return original;
  }
}
