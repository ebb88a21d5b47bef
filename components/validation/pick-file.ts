import * as ImagePicker from 'expo-image-picker';
import type { ReportFile } from '@/hooks/queries/validation';

/**
 * On a phone the app has no document picker (expo-document-picker is not installed): a report
 * is a photo of it from the library, and a CSV log is pasted. The web build opens any file.
 */
export const CAN_PICK_DOCUMENTS = false;

export async function pickFile(_accept: string): Promise<ReportFile | null> {
  const result = await ImagePicker.launchImageLibraryAsync({ mediaTypes: ['images'], quality: 0.9, exif: false });
  const asset = result.canceled ? null : result.assets[0];
  if (!asset) return null;
  return { name: asset.fileName ?? 'report.jpg', type: asset.mimeType ?? 'image/jpeg', size: asset.fileSize ?? null, uri: asset.uri };
}

export function readFileText(_file: ReportFile): Promise<string> {
  return Promise.reject(new Error('Paste the log instead.'));
}
