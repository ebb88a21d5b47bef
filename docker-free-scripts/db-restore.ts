// `npm run db:restore -- <file>`: restores a dump made by db:backup over the database.
import fs from 'node:fs';
import { restoreDatabase } from './lib/db-dump';
import { withDatabase } from './lib/local-db';

const file = process.argv[2];
if (!file || !fs.existsSync(file)) {
  console.error('Usage: npm run db:restore -- <backup file>');
  process.exit(2);
}
withDatabase((url) => restoreDatabase(url, file))
  .then(() => console.log(`Restored ${file}`))
  .catch((err) => {
    console.error(err instanceof Error ? err.message : err);
    process.exit(1);
  });
