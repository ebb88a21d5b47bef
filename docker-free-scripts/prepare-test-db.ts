import { parseConfig } from '../server/config/env';
import { createSequelize } from '../server/db/sequelize';
import { initModels } from '../server/db/models';
import { migrateUp } from '../server/db/migrate';
import { databaseIsEmpty, seedDemo } from '../server/db/demo/seed';

async function main() {
  const config = parseConfig();
  const sequelize = createSequelize(config.databaseUrl);
  initModels(sequelize);
  await migrateUp(sequelize);
  if (await databaseIsEmpty(sequelize)) await seedDemo(sequelize, config);
  await sequelize.close();
}
main().catch((err) => {
  console.error(err);
  process.exit(1);
});
