import type { Readable } from 'node:stream';
import { DeleteObjectCommand, GetObjectCommand, NoSuchKey, PutObjectCommand, S3Client } from '@aws-sdk/client-s3';
import type { Config } from '../config/env';
import { AppError } from '../lib/app-error';

const unavailable = () =>
  new AppError(503, 'storage/unavailable', 'Photo storage cannot be reached right now, so the file was not saved. Try again in a moment.');

export type StoredObject = { body: Readable; contentType: string | undefined; contentLength: number | undefined };

export type Storage = {
  put(key: string, body: Buffer, contentType: string): Promise<void>;
  /** The object's bytes as a stream, or null when there is no such object. */
  get(key: string): Promise<StoredObject | null>;
  delete(key: string): Promise<void>;
  close(): void;
};

/**
 * The only place that talks to object storage. Locally it points at the S3 fake (s3rver, keys
 * S3RVER/S3RVER, path-style addressing); beyond one machine, at real S3 chosen by the environment.
 */
export function createStorage(s3: Config['s3']): Storage {
  // The SDK release pinned for Node 20 warns on every client about Node 22; the warning is known.
  process.env.AWS_SDK_JS_NODE_VERSION_SUPPORT_WARNING_DISABLED ??= 'true';
  const client = new S3Client({
    endpoint: s3.endpoint,
    region: s3.region,
    forcePathStyle: s3.forcePathStyle,
    credentials: { accessKeyId: s3.accessKeyId, secretAccessKey: s3.secretAccessKey },
    maxAttempts: 3,
  });
  const Bucket = s3.bucket;
  return {
    async put(key, body, contentType) {
      try {
        await client.send(new PutObjectCommand({ Bucket, Key: key, Body: body, ContentType: contentType, ContentLength: body.length }));
      } catch {
        throw unavailable();
      }
    },
    async get(key) {
      try {
        const out = await client.send(new GetObjectCommand({ Bucket, Key: key }));
        return { body: out.Body as Readable, contentType: out.ContentType, contentLength: out.ContentLength };
      } catch (err) {
        if (err instanceof NoSuchKey || (err as { name?: string }).name === 'NoSuchKey') return null;
        throw unavailable();
      }
    },
    async delete(key) {
      await client.send(new DeleteObjectCommand({ Bucket, Key: key }));
    },
    close() {
      client.destroy();
    },
  };
}
