import type { AddressInfo } from 'node:net';
import type { DataSource } from 'typeorm';
import { createApp, type RailcallApp } from '../../server/app';
import type { Config } from '../../server/config';
import { createDataSource } from '../../server/db/data-source';
import { createLogger } from '../../server/logger';
import { seedIfEmpty } from '../../server/db/setup';
import { createTestDatabase, type TestDatabase } from './db';

export interface TestApp {
  railcall: RailcallApp;
  /** http://127.0.0.1:<port> */
  url: string;
  /** Connected as the application account, as the running app is. */
  db: DataSource;
  database: TestDatabase;
  /** Closes the app and its pool, keeping the database (for restart tests). */
  stop(): Promise<void>;
  /** A new app on the same database, as after a server restart. */
  restart(): Promise<TestApp>;
  close(): Promise<void>;
}

async function listen(database: TestDatabase, config: Config, setupCode: string | null = null): Promise<TestApp> {
  const db = createDataSource(config.db, { poolSize: 10 });
  await db.initialize();
  const railcall = createApp({ config, db, setupCode, logger: createLogger('silent') });
  await railcall.start();
  await new Promise<void>((resolve) => railcall.httpServer.listen(0, '127.0.0.1', resolve));
  const { port } = railcall.httpServer.address() as AddressInfo;
  const stop = async () => {
    await railcall.close();
    await db.destroy();
  };
  return {
    railcall,
    url: `http://127.0.0.1:${port}`,
    db,
    database,
    stop,
    restart: async () => listen(database, config),
    async close() {
      await stop();
      await database.drop();
    },
  };
}

/** The real app on port 0 with a fresh database of its own, seeded with the demo venue unless told not to. */
/** `setupCode`: the first-run code the app accepts, as server/index.ts would print it. */
export async function startTestApp(opts: { seed?: boolean; config?: (c: Config) => Config; setupCode?: string } = {}): Promise<TestApp> {
  const database = await createTestDatabase();
  if (opts.seed !== false) await seedIfEmpty(database.owner);
  const config = opts.config ? opts.config(database.config) : database.config;
  return listen(database, config, opts.setupCode);
}
