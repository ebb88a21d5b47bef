// Photos: bytes sent for a 12 MP photo against its original. The client resizes on the phone
// (components/photos/prepare-photo.ts: long side PHOTO_CLIENT_LONG_SIDE, JPEG quality
// PHOTO_JPEG_QUALITY, through expo-image-manipulator, on the web a canvas). That code needs a
// browser or a phone, so the bench repeats the same resize with sharp in Node: same long side,
// same quality (a canvas's 0.8 taken as libjpeg's 80). The test image is gradients with noise at
// several scales, which compresses about as a real photo does.
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
  // Smooth gradients (a scene) with noise at three scales: per pixel (sensor grain), 4 px and
  // 16 px blocks (texture that survives the downscale). Saved at JPEG quality 92 it comes to
  // about 4 MB, like a 12 MP phone camera photo.
  const raw = Buffer.alloc(width * height * 3);
  let seed = 0x12345;
  const rand = () => {
    seed = (seed * 1103515245 + 12345) >>> 0;
    return ((seed >>> 16) & 0xff) - 128;
  };
  const w4 = Math.ceil(width / 4);
  const w16 = Math.ceil(width / 16);
  const n4 = Int16Array.from({ length: w4 * Math.ceil(height / 4) }, rand);
  const n16 = Int16Array.from({ length: w16 * Math.ceil(height / 16) }, rand);
  const clamp = (v: number) => Math.max(0, Math.min(255, v));
  for (let y = 0; y < height; y += 1) {
    for (let x = 0; x < width; x += 1) {
      const i = (y * width + x) * 3;
      const n = rand() * 0.08 + n4[(y >> 2) * w4 + (x >> 2)] * 0.15 + n16[(y >> 4) * w16 + (x >> 4)] * 0.15;
      raw[i] = clamp(((x * 255) / width) * 0.6 + 60 + n);
      raw[i + 1] = clamp(((y * 255) / height) * 0.5 + 70 + n * 0.9);
      raw[i + 2] = clamp(128 + 60 * Math.sin((x + y) / 180) + n * 1.1);
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
