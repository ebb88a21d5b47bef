import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import { waitForPort } from './ports';

export const ROOT = path.resolve(__dirname, '..', '..');

/** Starts a TypeScript entry point as its own process (node --import tsx, so the pid kept is the real one). */
export function startTs(
  entry: string,
  env: Record<string, string>,
  opts: { quiet?: boolean } = {},
): ChildProcess {
  const child = spawn(process.execPath, ['--import', 'tsx', path.join(ROOT, entry)], {
    cwd: ROOT,
    env: { ...process.env, ...env },
    stdio: opts.quiet ? ['ignore', 'ignore', 'inherit'] : ['ignore', 'inherit', 'inherit'],
  });
  return child;
}

export async function startFakes(opts: {
  s3Port: number;
  smtpPort: number;
  smtpHttpPort: number;
  dataDir: string;
  bucket: string;
  quiet?: boolean;
}) {
  const s3 = startTs(
    'docker-free-scripts/s3-fake.ts',
    { S3_FAKE_PORT: String(opts.s3Port), S3_FAKE_DIR: path.join(opts.dataDir, 's3'), S3_BUCKET: opts.bucket },
    { quiet: opts.quiet },
  );
  const smtp = startTs(
    'docker-free-scripts/smtp-fake.ts',
    {
      SMTP_FAKE_PORT: String(opts.smtpPort),
      SMTP_FAKE_HTTP_PORT: String(opts.smtpHttpPort),
      SMTP_FAKE_DIR: path.join(opts.dataDir, 'mail'),
    },
    { quiet: opts.quiet },
  );
  await Promise.all([waitForPort(opts.s3Port), waitForPort(opts.smtpPort), waitForPort(opts.smtpHttpPort)]);
  return { s3, smtp };
}

export function stopChild(child: ChildProcess | undefined) {
  if (child && child.exitCode === null && !child.killed) child.kill('SIGTERM');
}
