// `npm start`: installs what is missing, starts the private MariaDB, builds the client and serves Railcall.
// Node built-ins only until `npm ci` has run.
import { spawn, spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { ensureDebianPackages, ensureNodeModules } from './lib/install.mjs';
import { createConnection } from 'node:net';
import { MariaDb } from './lib/mariadb.mjs';
import { loadOrCreateCredentials, provisionDatabase } from './lib/app-db.mjs';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const dataDir = join(root, '.data');
const dbPort = Number(process.env.RAILCALL_DB_PORT ?? 3407);
const appPort = Number(process.env.RAILCALL_PORT ?? 3000);
// Without a mail server of your own (RAILCALL_SMTP_HOST), a local fake one keeps every message in .data/mail.
const ownSmtp = Boolean(process.env.RAILCALL_SMTP_HOST);
const catcherPort = Number(process.env.RAILCALL_MAIL_CATCHER_PORT ?? 2525);
const mailDir = join(dataDir, 'mail');

/** True when something already listens on the port (another Railcall, most likely). */
const portInUse = (port) => new Promise((resolve) => {
  const socket = createConnection({ port, host: '127.0.0.1' });
  socket.once('connect', () => { socket.destroy(); resolve(true); });
  socket.once('error', () => resolve(false));
});
if (await portInUse(appPort)) {
  console.error(`[start] port ${appPort} is in use: is Railcall already running? Stop it first, or set RAILCALL_PORT.`);
  process.exit(1);
}

ensureDebianPackages(['mariadb-server']);
ensureNodeModules(root);

const db = new MariaDb({ baseDir: join(dataDir, 'mariadb'), port: dbPort });
console.log(`[start] MariaDB on 127.0.0.1:${dbPort} (data in .data/mariadb)`);
// The app port is free, so a database already running here is a leftover: take it over.
await db.start({ adoptRunning: true });

let server;
let catcher;
let stopping = false;
async function stop(code = 0) {
  if (stopping) return;
  stopping = true;
  for (const child of [server, catcher]) {
    if (child && child.exitCode === null) {
      child.kill('SIGTERM');
      await new Promise((resolve) => child.once('exit', resolve));
    }
  }
  console.log('[start] stopping MariaDB');
  await db.stop();
  process.exit(code);
}
process.on('SIGINT', () => void stop(0));
process.on('SIGTERM', () => void stop(0));

try {
  const credentials = loadOrCreateCredentials(join(dataDir, 'credentials.json'));
  const names = { database: 'railcall', ownerUser: 'railcall_owner', appUser: 'railcall_app' };
  provisionDatabase(db, { ...names, ownerPassword: credentials.ownerPassword, appPassword: credentials.appPassword });

  if (!process.env.RAILCALL_SKIP_BUILD) {
    console.log('[start] building the client');
    const build = spawnSync(join(root, 'node_modules', '.bin', 'vite'), ['build', '--logLevel', 'warn'], { cwd: root, stdio: 'inherit' });
    if (build.status !== 0) throw new Error('the client build failed');
  }

  if (!ownSmtp) {
    if (await portInUse(catcherPort)) throw new Error(`port ${catcherPort} (the local mail catcher) is in use: set RAILCALL_MAIL_CATCHER_PORT`);
    catcher = spawn(process.execPath, ['--import', 'tsx', 'scripts/mail-catcher.ts', String(catcherPort), mailDir], { cwd: root, stdio: 'inherit' });
  }

  server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    cwd: root,
    stdio: 'inherit',
    env: {
      ...process.env,
      NODE_ENV: process.env.NODE_ENV ?? 'development',
      RAILCALL_PORT: String(appPort),
      RAILCALL_DB_PORT: String(dbPort),
      RAILCALL_DB_NAME: names.database,
      RAILCALL_DB_USER: names.appUser,
      RAILCALL_DB_PASSWORD: credentials.appPassword,
      RAILCALL_DB_OWNER_USER: names.ownerUser,
      RAILCALL_DB_OWNER_PASSWORD: credentials.ownerPassword,
      RAILCALL_SESSION_SECRET: credentials.sessionSecret,
      RAILCALL_CLIENT_DIR: join(root, 'dist'),
      ...(ownSmtp ? {} : { RAILCALL_SMTP_HOST: '127.0.0.1', RAILCALL_SMTP_PORT: String(catcherPort), RAILCALL_MAILBOX_DIR: mailDir }),
    },
  });
  server.on('exit', (code) => {
    if (!stopping) {
      console.error(`[start] the server stopped (exit code ${code})`);
      void stop(code ?? 1);
    }
  });
} catch (error) {
  console.error(`[start] ${error.message}`);
  await stop(1);
}
