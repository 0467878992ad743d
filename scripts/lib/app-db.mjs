// Creates the database and the two accounts the app uses. Node built-ins only.
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { quote } from './mariadb.mjs';

const secret = () => randomBytes(24).toString('base64url');

/** Passwords and the session secret, made once and kept (git-ignored) with the data. */
export function loadOrCreateCredentials(file) {
  if (existsSync(file)) return JSON.parse(readFileSync(file, 'utf8'));
  const credentials = { ownerPassword: secret(), appPassword: secret(), sessionSecret: secret() };
  mkdirSync(dirname(file), { recursive: true });
  writeFileSync(file, JSON.stringify(credentials, null, 2), { mode: 0o600 });
  return credentials;
}

/**
 * The owner account runs migrations and hands out rights; the app account gets table rights
 * from the migration step (server/db/grants.ts), so it can never rewrite the kept log.
 */
export function provisionDatabase(db, { database, ownerUser, ownerPassword, appUser, appPassword }) {
  const owner = `${quote(ownerUser)}@'127.0.0.1'`;
  const app = `${quote(appUser)}@'127.0.0.1'`;
  db.sql(`
    CREATE DATABASE IF NOT EXISTS \`${database}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
    CREATE USER IF NOT EXISTS ${owner} IDENTIFIED BY ${quote(ownerPassword)};
    ALTER USER ${owner} IDENTIFIED BY ${quote(ownerPassword)};
    GRANT ALL PRIVILEGES ON \`${database}\`.* TO ${owner} WITH GRANT OPTION;
    CREATE USER IF NOT EXISTS ${app} IDENTIFIED BY ${quote(appPassword)};
    ALTER USER ${app} IDENTIFIED BY ${quote(appPassword)};
  `);
}
