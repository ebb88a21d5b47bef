import { Platform } from 'react-native';

/** The absolute address a label's QR code opens: this site's origin on the web. */
export function assetUrl(assetId: string): string {
  const origin =
    Platform.OS === 'web' && typeof window !== 'undefined' && window.location
      ? window.location.origin
      : (process.env.EXPO_PUBLIC_APP_URL ?? process.env.EXPO_PUBLIC_API_URL ?? 'http://localhost:8080');
  return `${origin}/assets/${assetId}`;
}
