// Photos: bytes sent for a 12 MP photo against its original. The client resizes on the phone
// (components/photos/prepare-photo.ts: long side PHOTO_CLIENT_LONG_SIDE, JPEG quality
// PHOTO_JPEG_QUALITY, through expo-image-manipulator, on the web a canvas). That code needs a
// browser or a phone, so the bench repeats the same resize with sharp in Node: same long side,
// same quality (a canvas's 0.8 taken as libjpeg's 80). The test image is noise over gradients,
// which compresses about as badly as a real photo.
import fs from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import { PHOTO_CLIENT_LONG_SIDE } from '../../shared/schemas/assets';
import { ROOT } from '../lib/services';

export type PhotoFigure = { width: number; height: number; originalBytes: number; sentBytes: number; sentWidth: number; sentHeight: number; ratio: number; quality: number; longSide: number };

/** The client's JPEG quality, read from its source so the bench follows a change (0.8 when it cannot be read). */
function clientQuality(): number {
  try {
    const src = fs.readFileSync(path.join(ROOT, 'components', 'photos', 'prepare-photo.ts'), 'utf8');
    const m = /PHOTO_JPEG_QUALITY\s*=\s*([0-9.]+)/.exec(src);
    const q = m ? Number(m[1]) : NaN;
    return q > 0 && q <= 1 ? q : 0.8;
  } catch {
    return 0.8;
  }
}

export async function makeTestPhoto(width = 4000, height = 3000): Promise<Buffer> {
  // Smooth gradients (a scene) plus per-pixel noise (sensor grain and texture), as a camera JPEG at quality 92.
  const raw = Buffer.alloc(width * height * 3);
  let seed = 0x12345;
  const rand = () => {
    seed = (seed * 1103515245 + 12345) >>> 0;
    return (seed >>> 16) & 0xff;
  };
  for (let y = 0; y < height; y += 1) {
    for (let x = 0; x < width; x += 1) {
      const i = (y * width + x) * 3;
      const n = rand() - 128;
      raw[i] = Math.max(0, Math.min(255, ((x * 255) / width) * 0.6 + 60 + n * 0.35));
      raw[i + 1] = Math.max(0, Math.min(255, ((y * 255) / height) * 0.5 + 70 + n * 0.3));
      raw[i + 2] = Math.max(0, Math.min(255, 128 + 60 * Math.sin((x + y) / 180) + n * 0.4));
    }
  }
  return sharp(raw, { raw: { width, height, channels: 3 } }).jpeg({ quality: 92 }).toBuffer();
}

export async function measurePhoto(): Promise<PhotoFigure> {
  const original = await makeTestPhoto();
  const meta = await sharp(original).metadata();
  const quality = clientQuality();
  const longSide = PHOTO_CLIENT_LONG_SIDE;
  const sent = await sharp(original)
    .resize(longSide, longSide, { fit: 'inside', withoutEnlargement: true })
    .jpeg({ quality: Math.round(quality * 100) })
    .toBuffer({ resolveWithObject: true });
  return {
    width: meta.width ?? 0,
    height: meta.height ?? 0,
    originalBytes: original.length,
    sentBytes: sent.data.length,
    sentWidth: sent.info.width,
    sentHeight: sent.info.height,
    ratio: sent.data.length / original.length,
    quality,
    longSide,
  };
}
