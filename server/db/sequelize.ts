import { Sequelize } from 'sequelize';
import pg from 'pg';

// Return BIGINT counts as numbers: every count in Proofyard fits in 2^53.
pg.types.setTypeParser(20, (v) => Number(v));

export function createSequelize(databaseUrl: string, options: { logging?: boolean } = {}): Sequelize {
  return new Sequelize(databaseUrl, {
    dialect: 'postgres',
    dialectModule: pg,
    logging: options.logging ? (sql) => console.log(sql) : false,
    pool: { max: 10, min: 0, idle: 10_000, acquire: 10_000 },
    dialectOptions: { connectionTimeoutMillis: 3_000, statement_timeout: 30_000 },
    define: { underscored: true },
  });
}
