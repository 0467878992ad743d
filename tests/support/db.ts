import { randomBytes } from 'node:crypto';
import type { DataSource } from 'typeorm';
import { loadConfig, type Config, type DbConfig } from '../../server/config';
import { createDataSource } from '../../server/db/data-source';
import { migrate } from '../../server/db/setup';

/** The throwaway MariaDB started by scripts/test.mjs, reached with its all-powerful test account. */
export function testServerAccount(): Omit<DbConfig, 'database'> {
  const env = process.env;
  if (!env.RAILCALL_TEST_DB_PORT || !env.RAILCALL_TEST_DB_USER) {
    throw new Error('No test database: run the tests with `npm test` (it starts a private MariaDB and sets RAILCALL_TEST_DB_*).');
  }
  return {
    host: env.RAILCALL_TEST_DB_HOST ?? '127.0.0.1',
    port: Number(env.RAILCALL_TEST_DB_PORT),
    user: env.RAILCALL_TEST_DB_USER,
    password: env.RAILCALL_TEST_DB_PASSWORD ?? '',
  };
}

export interface TestDatabase {
  config: Config;
  /** The environment `config` was read from: for starting the real server process (server/index.ts) on this database. */
  env: Record<string, string>;
  /** Connected as the schema owner (the test account): for arranging and inspecting. */
  owner: DataSource;
  drop(): Promise<void>;
}

/**
 * A fresh database and application account of its own for one test file, migrated as in production
 * (the application account gets the same table rights as in production).
 */
export async function createTestDatabase(opts: { migrate?: boolean } = {}): Promise<TestDatabase> {
  const server = testServerAccount();
  const name = `rc_${randomBytes(5).toString('hex')}`;
  const appPassword = randomBytes(12).toString('base64url');
  const admin = createDataSource({ ...server, database: 'mysql' }, { poolSize: 1 });
  await admin.initialize();
  await admin.query(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await admin.query(`CREATE USER '${name}'@'127.0.0.1' IDENTIFIED BY '${appPassword}'`);
  await admin.destroy();

  const env = {
    NODE_ENV: 'test',
    RAILCALL_DB_HOST: server.host,
    RAILCALL_DB_PORT: String(server.port),
    RAILCALL_DB_NAME: name,
    RAILCALL_DB_USER: name,
    RAILCALL_DB_PASSWORD: appPassword,
    RAILCALL_DB_OWNER_USER: server.user,
    RAILCALL_DB_OWNER_PASSWORD: server.password,
    RAILCALL_SESSION_SECRET: randomBytes(24).toString('hex'),
    RAILCALL_CLIENT_DIR: '',
    RAILCALL_LOG_LEVEL: 'silent',
  };
  const config = loadConfig(env);
  const owner = createDataSource(config.dbOwner, { poolSize: 3 });
  await owner.initialize();
  if (opts.migrate !== false) await migrate(owner, config);

  return {
    config,
    env,
    owner,
    async drop() {
      await owner.query(`DROP DATABASE IF EXISTS \`${name}\``);
      await owner.query(`DROP USER IF EXISTS '${name}'@'127.0.0.1'`);
      await owner.destroy();
    },
  };
}
