import { parseConfig } from '../server/config/env';
import { createSequelize } from '../server/db/sequelize';
import { migrateUp } from '../server/db/migrate';

async function main() {
  const config = parseConfig({ JWT_SECRET: 'x'.repeat(32), ...process.env });
  const sequelize = createSequelize(config.databaseUrl);
  const done = await migrateUp(sequelize);
  console.log(`Applied ${done.length} migration(s).`);
  await sequelize.close();
}
void main();
