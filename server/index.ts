import path from 'node:path';
import { ConfigError, parseConfig } from './config/env';
import { createApp } from './app';
import { createSequelize } from './db/sequelize';
import { initModels } from './db/models';
import { createMailer } from './integrations/mailer';
import { startOutboxLoop } from './services/outbox';
import type { Deps } from './deps';

async function main() {
  let config;
  try {
    config = parseConfig();
  } catch (err) {
    if (err instanceof ConfigError) {
      console.error(err.message);
      process.exit(2);
    }
    throw err;
  }
  const sequelize = createSequelize(config.databaseUrl);
  initModels(sequelize);
  const deps: Deps = {
    config,
    sequelize,
    mailer: createMailer(config.mail.smtpUrl, config.mail.from),
    log: (err) => console.error('[proofyard]', err),
  };
  const { app } = createApp(deps, { webDist: path.resolve(__dirname, '..', 'dist') });
  const stopOutbox = startOutboxLoop(deps);
  const server = app.listen(config.port, () => {
    console.log(`[proofyard] API and web app on http://localhost:${config.port}`);
  });
  const shutdown = () => {
    stopOutbox();
    server.close(() => {
      void sequelize.close().finally(() => process.exit(0));
    });
    setTimeout(() => process.exit(0), 5_000).unref();
  };
  process.on('SIGINT', shutdown);
  process.on('SIGTERM', shutdown);
}

void main();
