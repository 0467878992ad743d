import 'reflect-metadata';
import { DataSource } from 'typeorm';
import type { DbConfig } from '../config';
import { entities } from './entities';
import { migrations } from './migrations';

/** The schema changes only through migrations: synchronize stays off everywhere. */
export function createDataSource(db: DbConfig, opts: { poolSize?: number } = {}): DataSource {
  return new DataSource({
    type: 'mariadb',
    connectorPackage: 'mysql2',
    host: db.host,
    port: db.port,
    ...(db.socketPath ? { socketPath: db.socketPath } : {}),
    username: db.user,
    password: db.password,
    database: db.database,
    timezone: 'Z',
    charset: 'utf8mb4_unicode_ci',
    entities,
    migrations,
    migrationsTableName: 'schema_migration',
    synchronize: false,
    logging: false,
    poolSize: opts.poolSize ?? 10,
    extra: { decimalNumbers: true },
  });
}
