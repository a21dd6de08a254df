import { Sequelize } from 'sequelize';
import type { Logger } from 'pino';

/**
 * One Sequelize instance per process, built from DATABASE_URL.
 * SQL logging is off unless a pino logger is given, then it goes out at debug level.
 */
export function createSequelize(url = process.env.DATABASE_URL, logger?: Logger): Sequelize {
  if (!url) throw new Error('DATABASE_URL is not set (e.g. postgres://postgres@127.0.0.1:5479/modewright)');
  return new Sequelize(url, {
    dialect: 'postgres',
    logging: logger ? (sql: string) => logger.debug({ sql }, 'sql') : false,
    pool: { max: 10, min: 0, idle: 10_000 },
  });
}
