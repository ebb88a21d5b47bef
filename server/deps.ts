import type { Sequelize } from 'sequelize';
import type { Config } from './config/env';
import type { Mailer } from './integrations/mailer';
import type { Storage } from './integrations/storage';

/** Everything a request handler needs, built once at start-up (or per test). */
export type Deps = {
  config: Config;
  sequelize: Sequelize;
  mailer: Mailer;
  storage: Storage;
  log: (err: unknown) => void;
};
