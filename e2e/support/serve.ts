// The servers the end-to-end tests drive: one real app per lane, each with a fresh seeded database,
// serving the built client from dist/ (scripts/test.mjs builds it first).
import { createApp } from '../../server/app';
import { createDataSource } from '../../server/db/data-source';
import { seedIfEmpty } from '../../server/db/setup';
import { createLogger } from '../../server/logger';
import { createTestDatabase } from '../../tests/support/db';
import { playPastDrapeUnload } from '../../server/db/seed/past-session';
import { E2E_BASE_PORT, LANES } from './lanes';

const stops: (() => Promise<void>)[] = [];
for (const [i, lane] of LANES.entries()) {
  const database = await createTestDatabase();
  await seedIfEmpty(database.owner);
  const config = { ...database.config, clientDir: 'dist' };
  const db = createDataSource(config.db);
  await db.initialize();
  const railcall = createApp({ config, db, logger: createLogger('warn') });
  await railcall.start();
  // The record's lane needs a session that finished yesterday, played through the real rules on its own clock.
  if (lane === 'record') await playPastDrapeUnload(db, { startMs: Date.now() - 86_400_000 });
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
  process.exit(0);
}
process.on('SIGTERM', () => void stop());
process.on('SIGINT', () => void stop());
