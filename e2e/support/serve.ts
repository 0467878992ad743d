// The servers the end-to-end tests drive: one real app per lane, each with a fresh seeded database,
// serving the built client from dist/ (scripts/test.mjs builds it first).
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createApp } from '../../server/app';
import { startFakeSmtp } from '../../server/features/mail/fake-smtp';
import { createDataSource } from '../../server/db/data-source';
import { seedIfEmpty } from '../../server/db/setup';
import { createLogger } from '../../server/logger';
import { createTestDatabase } from '../../tests/support/db';
import { playPastDrapeUnload } from '../../server/db/seed/past-session';
import { E2E_BASE_PORT, LANES } from './lanes';

const stops: (() => Promise<void>)[] = [];
// One local fake mail server for every lane; the mail spec reads what it keeps through the mailbox page.
const mailDir = mkdtempSync(join(tmpdir(), 'railcall-e2e-mail-'));
const smtp = await startFakeSmtp({ dir: mailDir });
for (const [i, lane] of LANES.entries()) {
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

async function stop() {
  await Promise.allSettled(stops.map((s) => s()));
  await smtp.close();
  rmSync(mailDir, { recursive: true, force: true });
  process.exit(0);
}
process.on('SIGTERM', () => void stop());
process.on('SIGINT', () => void stop());
