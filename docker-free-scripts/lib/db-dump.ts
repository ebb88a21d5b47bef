import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { pgBinDir } from './postgres';

/** pg_dump in PostgreSQL's custom format (the server's own version of the tool, from Debian's package). */
export function dumpDatabase(databaseUrl: string, file: string) {
  const res = spawnSync(path.join(pgBinDir(), 'pg_dump'), ['--format=custom', '--no-owner', '--no-privileges', `--file=${file}`, databaseUrl], {
    encoding: 'utf8',
  });
  if (res.status !== 0) throw new Error(`pg_dump failed: ${res.stderr}`);
}

/** Restores a dump over the database: every object in the dump is dropped and recreated. */
export function restoreDatabase(databaseUrl: string, file: string) {
  const res = spawnSync(
    path.join(pgBinDir(), 'pg_restore'),
    ['--clean', '--if-exists', '--no-owner', '--no-privileges', '--single-transaction', '--exit-on-error', `--dbname=${databaseUrl}`, file],
    { encoding: 'utf8' },
  );
  if (res.status !== 0) throw new Error(`pg_restore failed: ${res.stderr}`);
}
