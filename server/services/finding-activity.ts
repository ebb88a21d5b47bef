import crypto from 'node:crypto';
import { UniqueConstraintError } from 'sequelize';
import type { Photo as PhotoDto } from '../../shared/schemas/assets';
import type { Comment, CreateComment } from '../../shared/schemas/findings';
import { FindingComment, Photo } from '../db/models';
import type { Deps } from '../deps';
import { AppError } from '../lib/app-error';
import type { SessionUser } from '../middleware/auth';
import { peopleByIds, visibleFinding } from './findings';
import { historyOf, recordHistory } from './history';
import { makeThumbnail, probeImage, toPhotoDto } from './photos';

// ---- Comments -----------------------------------------------------------------------------

function toCommentDto(c: FindingComment, names: Map<string, { id: string; name: string }>): Comment {
  return {
    id: c.id,
    findingId: c.findingId,
    author: c.authorId ? (names.get(c.authorId) ?? { id: c.authorId, name: '' }) : null,
    body: c.body,
    createdAt: c.createdAt.toISOString(),
  };
}

export async function listComments(user: SessionUser, findingId: string): Promise<{ items: Comment[] }> {
  const finding = await visibleFinding(user, findingId);
  const comments = await FindingComment.findAll({ where: { findingId: finding.id }, order: [['createdAt', 'ASC'], ['id', 'ASC']] });
  const names = await peopleByIds(comments.map((c) => c.authorId));
  return { items: comments.map((c) => toCommentDto(c, names)) };
}

/** Comments are append-only; each one goes into the finding's history in the same transaction. */
export async function addComment(
  deps: Deps,
  user: SessionUser,
  findingId: string,
  input: Required<CreateComment>,
  idempotencyKey: string | null = null,
): Promise<Comment> {
  try {
    return await deps.sequelize.transaction(async (transaction) => {
      const finding = await visibleFinding(user, findingId, transaction);
      const comment = await FindingComment.create(
        { programId: finding.programId, findingId: finding.id, authorId: user.id, body: input.body, idempotencyKey },
        { transaction },
      );
      await recordHistory(
        {
          programId: finding.programId,
          entityType: 'finding',
          entityId: finding.id,
          action: 'commented',
          actorId: user.id,
          after: { commentId: comment.id, body: comment.body },
        },
        transaction,
      );
      return toCommentDto(comment, new Map([[user.id, { id: user.id, name: user.name }]]));
    });
  } catch (err) {
    if (err instanceof UniqueConstraintError && idempotencyKey) {
      const existing = await FindingComment.findOne({ where: { authorId: user.id, idempotencyKey } });
      if (existing) return toCommentDto(existing, await peopleByIds([existing.authorId]));
    }
    throw err;
  }
}

// ---- Photos -------------------------------------------------------------------------------

/**
 * Stores a photo of a finding: the bytes are checked and thumbnailed by the photo service's own
 * functions, kept under the finding's asset in S3, and recorded with `finding_id` set, with a
 * history entry on the finding, in one transaction (the objects are removed when it fails).
 */
export async function addFindingPhoto(
  deps: Deps,
  user: SessionUser,
  findingId: string,
  file: { buffer: Buffer } | undefined,
  idempotencyKey: string | null = null,
): Promise<PhotoDto> {
  const finding = await visibleFinding(user, findingId);
  if (!file || !file.buffer?.length) {
    throw new AppError(400, 'request/invalid', 'photo: Choose a photo to upload.', { fields: { photo: 'Choose a photo to upload.' } });
  }
  if (!finding.assetId) {
    throw new AppError(400, 'finding/no-asset', 'This finding has no asset to keep the photo with.');
  }
  const assetId = finding.assetId;
  const buffer = file.buffer;
  const probed = await probeImage(buffer);
  const thumb = await makeThumbnail(buffer, probed);
  const sha256 = crypto.createHash('sha256').update(buffer).digest('hex');
  const id = crypto.randomUUID();
  const base = `programs/${finding.programId}/assets/${assetId}/photos/${id}`;
  const s3Key = `${base}.${probed.ext}`;
  const thumbKey = `${base}-thumb.jpg`;
  await Promise.all([deps.storage.put(s3Key, buffer, probed.contentType), deps.storage.put(thumbKey, thumb, 'image/jpeg')]);
  try {
    const photo = await deps.sequelize.transaction(async (transaction) => {
      // The finding must still be there when the photo row joins it.
      await visibleFinding(user, findingId, transaction, true);
      const created = await Photo.create(
        {
          id,
          programId: finding.programId,
          assetId,
          checklistItemId: null,
          findingId: finding.id,
          contentType: probed.contentType,
          bytes: buffer.length,
          width: probed.width,
          height: probed.height,
          s3Key,
          thumbKey,
          sha256,
          idempotencyKey,
          createdBy: user.id,
        },
        { transaction },
      );
      await recordHistory(
        {
          programId: finding.programId,
          entityType: 'finding',
          entityId: finding.id,
          action: 'photo-added',
          actorId: user.id,
          after: { photoId: id, contentType: probed.contentType, bytes: buffer.length, sha256 },
        },
        transaction,
      );
      return created;
    });
    return toPhotoDto(deps, photo, user.name);
  } catch (err) {
    await Promise.allSettled([deps.storage.delete(s3Key), deps.storage.delete(thumbKey)]);
    if (err instanceof UniqueConstraintError && idempotencyKey) {
      const existing = await Photo.findOne({ where: { createdBy: user.id, idempotencyKey } });
      if (existing && existing.findingId === finding.id && existing.sha256 === sha256) return toPhotoDto(deps, existing, user.name);
      throw new AppError(422, 'request/idempotency-mismatch', 'This Idempotency-Key was already used for a different upload. Send it again with a new key.');
    }
    throw err;
  }
}

// ---- History ------------------------------------------------------------------------------

export async function findingHistory(deps: Deps, user: SessionUser, id: string) {
  const finding = await visibleFinding(user, id);
  return historyOf(deps, 'finding', finding.id, { programId: finding.programId });
}
