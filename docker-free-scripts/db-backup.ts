// `npm run db:backup [-- file]`: dumps the database to .data/backups/ (or the file given).
import fs from 'node:fs';
import path from 'node:path';
import { dumpDatabase } from './lib/db-dump';
import { withDatabase } from './lib/local-db';
import { ROOT } from './lib/services';

const file = process.argv[2] ?? path.join(ROOT, '.data', 'backups', `proofyard-${new Date().toISOString().replace(/[:.]/g, '-')}.dump`);
fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
withDatabase((url) => dumpDatabase(url, file))
  .then(() => console.log(`Backup written: ${file}`))
  .catch((err) => {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  });
