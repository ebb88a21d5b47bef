// Local S3-compatible fake (s3rver) on loopback; it accepts the key pair S3RVER/S3RVER and keeps objects on disk.
import fs from 'node:fs';
import S3rver from 's3rver';

const port = Number(process.env.S3_FAKE_PORT ?? 54330);
const directory = process.env.S3_FAKE_DIR ?? '.data/s3';
const bucket = process.env.S3_BUCKET ?? 'proofyard-photos';
fs.mkdirSync(directory, { recursive: true });

const server = new S3rver({
  address: '127.0.0.1',
  port,
  directory,
  silent: true,
  configureBuckets: [{ name: bucket, configs: [] }],
  allowMismatchedSignatures: true,
} as never);

server.run().then(() => console.log(`[s3-fake] listening on http://127.0.0.1:${port} (bucket ${bucket})`));
const stop = () => void server.close().finally(() => process.exit(0));
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
