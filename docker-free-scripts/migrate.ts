// `npm run db:migrate`: applies the migrations to DATABASE_URL (or the local cluster of `npm start`).
import { createSequelize } from '../server/db/sequelize';
import { migrateUp } from '../server/db/migrate';
import { withDatabase } from './lib/local-db';

withDatabase(async (url) => {
  const sequelize = createSequelize(url);
  try {
    const done = await migrateUp(sequelize);
    console.log(`Applied ${done.length} migration(s).`);
  } finally {
    await sequelize.close();
  }
}).catch((err) => {
  console.error(err instanceof Error ? err.message : err);
  process.exit(1);
});
