import path from 'node:path';
import { ConfigError, parseConfig } from './config/env';
import { createApp } from './app';
import { createSequelize } from './db/sequelize';
import { initModels } from './db/models';
import { createMailer } from './integrations/mailer';
import { createStorage } from './integrations/storage';
import { startOutboxLoop } from './services/outbox';
import { JOBS, startJobLoop } from './services/jobs';
import { FLEET_JOBS } from './services/fleet-jobs';
import { READINESS_JOBS } from './services/readiness-jobs';
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
    storage: createStorage(config.s3),
    log: (err) => console.error('[proofyard]', err),
  };
  const { app } = createApp(deps, { webDist: process.env.WEB_DIST ?? path.resolve(__dirname, '..', 'dist') });
  const stopOutbox = startOutboxLoop(deps);
  const stopJobs = startJobLoop(deps, undefined, [...JOBS, ...FLEET_JOBS, ...READINESS_JOBS]);
  const server = app.listen(config.port, () => {
    console.log(`[proofyard] API and web app on http://localhost:${config.port}`);
  });
  const shutdown = () => {
    stopOutbox();
    stopJobs();
    server.close(() => {
      deps.storage.close();
      void sequelize.close().finally(() => process.exit(0));
    });
    setTimeout(() => process.exit(0), 5_000).unref();
  };
  process.on('SIGINT', shutdown);
  process.on('SIGTERM', shutdown);
}

void main();
