import crypto from 'node:crypto';
import { UniqueConstraintError } from 'sequelize';
import sharp from 'sharp';
import { PHOTO_MAX_PIXELS, type Photo as PhotoDto } from '../../shared/schemas/assets';
import { Asset, ChecklistItem, Photo, User } from '../db/models';
import type { Deps } from '../deps';
import { AppError, notFound } from '../lib/app-error';
import { isUuid } from '../lib/ids';
import type { SessionUser } from '../middleware/auth';
import { recordHistory } from './history';

export type PhotoSize = 'original' | 'thumb';

/** A signed photo URL stays valid between 60 and 75 minutes; the expiry is rounded so the URL is stable for a quarter hour (browser caches hit). */
const SIGNED_URL_SECONDS = 3600;
const SIGNED_URL_STEP = 900;
export const THUMB_LONG_SIDE = 320;

function signingKey(deps: Deps) {
  // A key of its own, derived from the JWT secret, so a photo signature can never pass for anything else.
  return crypto.createHmac('sha256', deps.config.jwt.secret).update('proofyard/photo-url/v1').digest();
}

function signature(deps: Deps, id: string, size: PhotoSize, exp: number) {
  return crypto.createHmac('sha256', signingKey(deps)).update(`${id.toLowerCase()}\n${size}\n${exp}`).digest('base64url');
}

/**
 * `<img src>` cannot send the Authorization header, so photo URLs in API answers carry a
 * short-lived HMAC signature over the photo id, the size and the expiry time.
 */
export function signedPhotoUrl(deps: Deps, id: string, size: PhotoSize, nowMs = Date.now()): string {
  const exp = Math.ceil((nowMs / 1000 + SIGNED_URL_SECONDS) / SIGNED_URL_STEP) * SIGNED_URL_STEP;
  const sizeParam = size === 'thumb' ? 'size=thumb&' : '';
  return `/api/photos/${id}?${sizeParam}exp=${exp}&sig=${signature(deps, id, size, exp)}`;
}

export function verifyPhotoSignature(deps: Deps, id: string, size: PhotoSize, exp: unknown, sig: unknown, nowMs = Date.now()): boolean {
  if (typeof exp !== 'string' || typeof sig !== 'string' || !/^\d{1,12}$/.test(exp) || sig.length > 100) return false;
  if (Number(exp) * 1000 < nowMs) return false;
  const expected = Buffer.from(signature(deps, id, size, Number(exp)));
  const given = Buffer.from(sig);
  return given.length === expected.length && crypto.timingSafeEqual(given, expected);
}

export function toPhotoDto(deps: Deps, photo: Photo, createdByName: string | null): PhotoDto {
  return {
    id: photo.id,
    assetId: photo.assetId,
    checklistItemId: photo.checklistItemId,
    findingId: photo.findingId,
    contentType: photo.contentType,
    bytes: photo.bytes,
    width: photo.width,
    height: photo.height,
    url: signedPhotoUrl(deps, photo.id, 'original'),
    thumbnailUrl: signedPhotoUrl(deps, photo.id, 'thumb'),
    createdAt: photo.createdAt.toISOString(),
    createdBy: createdByName,
  };
}

/** Photos with their uploaders' names, in the order given. */
export async function photoDtos(deps: Deps, photos: Photo[]): Promise<PhotoDto[]> {
  const userIds = [...new Set(photos.map((p) => p.createdBy).filter((v): v is string => !!v))];
  const users = userIds.length ? await User.findAll({ attributes: ['id', 'name'], where: { id: userIds } }) : [];
  const names = new Map(users.map((u) => [u.id, u.name]));
  return photos.map((p) => toPhotoDto(deps, p, p.createdBy ? (names.get(p.createdBy) ?? null) : null));
}

// ---- Upload -------------------------------------------------------------------------------

const FORMATS: Record<string, { ext: string; contentType: string }> = {
  jpeg: { ext: 'jpg', contentType: 'image/jpeg' },
  png: { ext: 'png', contentType: 'image/png' },
  webp: { ext: 'webp', contentType: 'image/webp' },
  heif: { ext: 'heic', contentType: 'image/heic' },
};

const unsupported = () =>
  new AppError(415, 'upload/unsupported-type', 'This file is not a photo we can take. Send a JPEG, PNG, WebP or HEIC picture.', {
    fields: { photo: 'Not a JPEG, PNG, WebP or HEIC picture.' },
  });

const tooManyPixels = (pixels: number | null) =>
  new AppError(
    413,
    'upload/too-many-pixels',
    `This photo has ${pixels ? `${(pixels / 1e6).toFixed(0)} million` : 'too many'} pixels; the limit is ${PHOTO_MAX_PIXELS / 1e6} million. Send a smaller picture.`,
    { fields: { photo: 'Too many pixels.' } },
  );

export type ProbedImage = { format: string; contentType: string; ext: string; width: number | null; height: number | null };

/** Reads the real type from the bytes (never the name or the declared type) and refuses anything but a photo. */
export async function probeImage(buffer: Buffer): Promise<ProbedImage> {
  let meta: sharp.Metadata;
  try {
    // Reads the header only (no pixels are decoded), so the size is known before any limit applies.
    meta = await sharp(buffer, { limitInputPixels: false }).metadata();
  } catch {
    // The prebuilt libvips has no HEVC decoder (lovell/sharp#4050); a HEIC is still known by its ISO-BMFF brand.
    if (isHeic(buffer)) return { format: 'heif', contentType: 'image/heic', ext: 'heic', width: null, height: null };
    throw unsupported();
  }
  const known = meta.format ? FORMATS[meta.format] : undefined;
  if (!known) throw unsupported();
  const pixels = (meta.width ?? 0) * (meta.height ?? 0);
  if (pixels > PHOTO_MAX_PIXELS) throw tooManyPixels(pixels);
  // EXIF orientations 5 to 8 turn the picture a quarter: report the size as it is seen.
  const turned = (meta.orientation ?? 1) >= 5;
  let contentType = known.contentType;
  if (meta.format === 'heif' && meta.compression === 'av1') contentType = 'image/heif';
  return {
    format: meta.format!,
    contentType,
    ext: known.ext,
    width: (turned ? meta.height : meta.width) ?? null,
    height: (turned ? meta.width : meta.height) ?? null,
  };
}

/** An ISO-BMFF `ftyp` box at the start with a HEIC/HEIF brand (ISO/IEC 23008-12). */
function isHeic(buffer: Buffer): boolean {
  if (buffer.length < 12 || buffer.toString('latin1', 4, 8) !== 'ftyp') return false;
  return ['heic', 'heix', 'hevc', 'hevx', 'heim', 'heis', 'mif1', 'msf1'].includes(buffer.toString('latin1', 8, 12));
}

/** A ~320 px JPEG. HEVC-coded HEIC cannot be decoded by the prebuilt libvips, so it gets a plain placeholder. */
export async function makeThumbnail(buffer: Buffer, probed: ProbedImage): Promise<Buffer> {
  try {
    return await sharp(buffer, { limitInputPixels: PHOTO_MAX_PIXELS })
      .rotate()
      .resize(THUMB_LONG_SIDE, THUMB_LONG_SIDE, { fit: 'inside', withoutEnlargement: true })
      .flatten({ background: '#ffffff' })
      .jpeg({ quality: 78 })
      .toBuffer();
  } catch (err) {
    if (probed.format !== 'heif') {
      if (/pixel limit/i.test(String((err as Error).message))) throw tooManyPixels(null);
      throw new AppError(422, 'upload/unreadable', 'This photo could not be read; it may be damaged. Take it again.', {
        fields: { photo: 'Could not be read.' },
      });
    }
    return sharp({ create: { width: THUMB_LONG_SIDE, height: 240, channels: 3, background: '#d9dde3' } }).jpeg().toBuffer();
  }
}

const IDEMPOTENCY_KEY = /^[A-Za-z0-9_.:-]{8,100}$/;

export type UploadInput = {
  file: { buffer: Buffer } | undefined;
  checklistItemId: unknown;
  idempotencyKey: string | undefined;
};

async function visibleAsset(user: SessionUser, id: string): Promise<Asset> {
  const asset = await Asset.findByPk(id);
  if (!asset || !user.programIds.includes(asset.programId)) throw notFound('This asset');
  return asset;
}

async function replayOrRefuse(deps: Deps, existing: Photo, sha256: string, assetId: string) {
  if (existing.sha256 !== sha256 || existing.assetId !== assetId) {
    throw new AppError(
      422,
      'upload/idempotency-key-reused',
      'This upload key was already used for a different photo. Send the photo again as a new upload.',
      { fields: { 'Idempotency-Key': 'Already used for different content.' } },
    );
  }
  return { photo: (await photoDtos(deps, [existing]))[0], replayed: true };
}

/** Stores a photo of an asset (and optionally of one of its checklist items) in S3 and records it. */
export async function uploadPhoto(deps: Deps, user: SessionUser, assetId: string, input: UploadInput) {
  const asset = await visibleAsset(user, assetId);
  if (!input.file || !input.file.buffer?.length) {
    throw new AppError(400, 'request/invalid', 'photo: Choose a photo to upload.', { fields: { photo: 'Choose a photo to upload.' } });
  }
  let checklistItemId: string | null = null;
  if (input.checklistItemId !== undefined && input.checklistItemId !== '') {
    const item = isUuid(input.checklistItemId) ? await ChecklistItem.findByPk(input.checklistItemId) : null;
    if (!item || item.assetId !== asset.id) {
      throw new AppError(400, 'request/invalid', 'checklistItemId: This checklist item is not on this asset.', {
        fields: { checklistItemId: 'Not an item of this asset.' },
      });
    }
    checklistItemId = item.id;
  }
  const key = input.idempotencyKey?.trim() || null;
  if (key !== null && !IDEMPOTENCY_KEY.test(key)) {
    throw new AppError(400, 'request/invalid', 'Idempotency-Key: Use 8 to 100 letters, digits, dashes or underscores.', {
      fields: { 'Idempotency-Key': 'Use 8 to 100 letters, digits, dashes or underscores.' },
    });
  }
  const buffer = input.file.buffer;
  const sha256 = crypto.createHash('sha256').update(buffer).digest('hex');
  if (key) {
    const existing = await Photo.findOne({ where: { createdBy: user.id, idempotencyKey: key } });
    if (existing) return replayOrRefuse(deps, existing, sha256, asset.id);
  }

  const probed = await probeImage(buffer);
  const thumb = await makeThumbnail(buffer, probed);
  const id = crypto.randomUUID();
  const base = `programs/${asset.programId}/assets/${asset.id}/photos/${id}`;
  const s3Key = `${base}.${probed.ext}`;
  const thumbKey = `${base}-thumb.jpg`;
  await Promise.all([deps.storage.put(s3Key, buffer, probed.contentType), deps.storage.put(thumbKey, thumb, 'image/jpeg')]);

  try {
    const photo = await deps.sequelize.transaction(async (transaction) => {
      const created = await Photo.create(
        {
          id,
          programId: asset.programId,
          assetId: asset.id,
          checklistItemId,
          findingId: null,
          contentType: probed.contentType,
          bytes: buffer.length,
          width: probed.width,
          height: probed.height,
          s3Key,
          thumbKey,
          sha256,
          idempotencyKey: key,
          createdBy: user.id,
        },
        { transaction },
      );
      await recordHistory(
        {
          programId: asset.programId,
          entityType: 'photo',
          entityId: id,
          action: 'uploaded',
          actorId: user.id,
          after: { assetId: asset.id, checklistItemId, contentType: probed.contentType, bytes: buffer.length, sha256 },
        },
        transaction,
      );
      return created;
    });
    return { photo: (await photoDtos(deps, [photo]))[0], replayed: false };
  } catch (err) {
    // Nothing half-saved: the objects go when the row does not come.
    await Promise.allSettled([deps.storage.delete(s3Key), deps.storage.delete(thumbKey)]);
    if (err instanceof UniqueConstraintError && key) {
      // Two tries with the same key raced; the first one won.
      const existing = await Photo.findOne({ where: { createdBy: user.id, idempotencyKey: key } });
      if (existing) return replayOrRefuse(deps, existing, sha256, asset.id);
    }
    throw err;
  }
}

/** The photo row when the caller may see it: a valid signature, or a member of its program. */
export async function findPhotoFor(id: string, access: { signed: true } | { user: SessionUser }) {
  const photo = await Photo.findByPk(id);
  if (!photo || ('user' in access && !access.user.programIds.includes(photo.programId))) throw notFound('This photo');
  return photo;
}
