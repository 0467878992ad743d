// Backup and restore of Railcall's database with Debian's mariadb-dump and mariadb clients.
// Node built-ins only. The connection comes from the same variables the server reads (server/config.ts),
// as the schema owner; on a machine set up by `npm start`, the owner's password from .data/credentials.json.
import { spawn } from 'node:child_process';
import { createReadStream, createWriteStream, existsSync, readFileSync } from 'node:fs';
import { createGunzip, createGzip } from 'node:zlib';
import { pipeline } from 'node:stream/promises';

export function connectionFromEnv(root, env = process.env) {
  const file = `${root}/.data/credentials.json`;
  const credentials = existsSync(file) ? JSON.parse(readFileSync(file, 'utf8')) : {};
  return {
    host: env.RAILCALL_DB_HOST ?? '127.0.0.1',
    port: env.RAILCALL_DB_PORT ?? '3407',
    database: env.RAILCALL_DB_NAME ?? 'railcall',
    user: env.RAILCALL_DB_OWNER_USER ?? 'railcall_owner',
    password: env.RAILCALL_DB_OWNER_PASSWORD ?? credentials.ownerPassword ?? '',
  };
}

function client(cmd, c, args) {
  // The password goes in the environment, not on the command line (where `ps` would show it).
  return spawn(cmd, ['--no-defaults', `--host=${c.host}`, `--port=${c.port}`, `--user=${c.user}`, '--default-character-set=utf8mb4', ...args], {
    env: { ...process.env, MYSQL_PWD: c.password },
    stdio: ['pipe', 'pipe', 'inherit'],
  });
}

const finished = (child, what) => new Promise((resolve, reject) => {
  child.once('error', reject);
  child.once('exit', (code) => (code === 0 ? resolve() : reject(new Error(`${what} exited with ${code}`))));
});

/**
 * A consistent snapshot taken while Railcall runs: --single-transaction reads every InnoDB table as of
 * one moment without locking writers, so a session's log and its row agree. `.gz` files are gzipped.
 */
export async function backup(c, file) {
  const dump = client('mariadb-dump', c, ['--single-transaction', '--quick', '--routines', '--triggers', '--hex-blob', '--no-tablespaces', c.database]);
  dump.stdin.end();
  const done = finished(dump, 'mariadb-dump');
  const out = createWriteStream(file, { mode: 0o600 });
  await (file.endsWith('.gz') ? pipeline(dump.stdout, createGzip(), out) : pipeline(dump.stdout, out));
  await done;
}

/** Loads a dump into the (existing, preferably empty) database; the next server start grants the app account its rights again. */
export async function restore(c, file) {
  const load = client('mariadb', c, [`--database=${c.database}`]);
  load.stdout.resume();
  const done = finished(load, 'mariadb');
  const input = createReadStream(file);
  await (file.endsWith('.gz') ? pipeline(input, createGunzip(), load.stdin) : pipeline(input, load.stdin));
  await done;
}
