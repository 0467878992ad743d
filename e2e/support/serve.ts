// The servers the end-to-end tests drive: one real app per lane, each with a fresh seeded database,
// serving the built client from dist/ (scripts/test.mjs builds it first).
import { spawn } from 'node:child_process';
import { mkdtempSync, openSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createApp } from '../../server/app';
import { startFakeSmtp } from '../../server/features/mail/fake-smtp';
import { createDataSource } from '../../server/db/data-source';
import { seedIfEmpty } from '../../server/db/setup';
import { createLogger } from '../../server/logger';
import { createTestDatabase } from '../../tests/support/db';
import { playPastDrapeUnload } from '../../server/db/seed/past-session';
import { E2E_BASE_PORT, FIRST_RUN_LANES, LANES, firstRunLog, type FirstRunLane } from './lanes';

const stops: (() => Promise<void>)[] = [];
// One local fake mail server for every lane; the mail spec reads what it keeps through the mailbox page.
const mailDir = mkdtempSync(join(tmpdir(), 'railcall-e2e-mail-'));
const smtp = await startFakeSmtp({ dir: mailDir });
for (const [i, lane] of LANES.entries()) {
  if ((FIRST_RUN_LANES as readonly string[]).includes(lane)) {
    stops.push(await serveFirstRun(lane as FirstRunLane, E2E_BASE_PORT + i));
    continue;
  }
  const database = await createTestDatabase();
  await seedIfEmpty(database.owner);
  const base = database.config;
  const config = {
    ...base,
    clientDir: 'dist',
    mail: { ...base.mail, smtp: { host: '127.0.0.1', port: smtp.port, secure: false }, mailboxDir: mailDir, publicUrl: `http://127.0.0.1:${E2E_BASE_PORT + i}`, pollMs: 250 },
  };
  const db = createDataSource(config.db);
  await db.initialize();
  const railcall = createApp({ config, db, logger: createLogger('warn') });
  await railcall.start();
  // The record's and the mail lanes need a session that finished yesterday, played through the real rules on its own clock.
  if (lane === 'record' || lane === 'mail') await playPastDrapeUnload(db, { startMs: Date.now() - 86_400_000 });
  await new Promise<void>((resolve) => railcall.httpServer.listen(E2E_BASE_PORT + i, '127.0.0.1', resolve));
  console.log(`[e2e] lane ${lane} on http://127.0.0.1:${E2E_BASE_PORT + i}`);
  stops.push(async () => {
    await railcall.close();
    await db.destroy();
    await database.drop();
  });
}

/**
 * An install on its first day: `node --import tsx server/index.ts` exactly as `npm start` runs it, on
 * a migrated empty database with RAILCALL_SEED_DEMO=0, so it prints a setup code to its console (the file
 * firstRunLog(lane)). Answers how to stop it: SIGTERM to that process (its own clean shutdown), then the database.
 */
async function serveFirstRun(lane: FirstRunLane, port: number): Promise<() => Promise<void>> {
  const database = await createTestDatabase();
  const url = `http://127.0.0.1:${port}`;
  const logFile = firstRunLog(lane);
  const log = openSync(logFile, 'w');
  const server = spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], {
    env: {
      PATH: process.env.PATH ?? '',
      ...database.env,
      RAILCALL_PORT: String(port), RAILCALL_HOST: '127.0.0.1', RAILCALL_PUBLIC_URL: url,
      RAILCALL_SEED_DEMO: '0', RAILCALL_CLIENT_DIR: 'dist', RAILCALL_LOG_LEVEL: 'warn',
      RAILCALL_DATA_DIR: mkdtempSync(join(tmpdir(), 'railcall-e2e-files-')),
      RAILCALL_SMTP_HOST: '127.0.0.1', RAILCALL_SMTP_PORT: String(smtp.port), RAILCALL_MAILBOX_DIR: mailDir,
    },
    stdio: ['ignore', log, log],
  });
  const exited = new Promise<void>((resolve) => server.once('exit', () => resolve()));
  // Ready when it answers; a server that exits first fails the whole run with its console to read.
  for (let tries = 0; ; tries++) {
    if (server.exitCode !== null) throw new Error(`the first-run server exited (${server.exitCode}): see ${logFile}`);
    const ok = await fetch(`${url}/api/setup`).then((r) => r.ok, () => false);
    if (ok) break;
    if (tries > 600) throw new Error(`the first-run server did not answer in 60 s: see ${logFile}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  console.log(`[e2e] lane ${lane} on ${url} (server/index.ts, no demo; console in ${logFile})`);
  return async () => {
    server.kill('SIGTERM');
    await exited;
    await database.drop();
  };
}

async function stop() {
  await Promise.allSettled(stops.map((s) => s()));
  await smtp.close();
  rmSync(mailDir, { recursive: true, force: true });
  process.exit(0);
}
process.on('SIGTERM', () => void stop());
process.on('SIGINT', () => void stop());
