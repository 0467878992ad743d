import { loadConfig } from './config';
import { createLogger } from './logger';
import { createDataSource } from './db/data-source';
import { migrate, seedIfEmpty } from './db/setup';
import { createApp } from './app';
import { Venue } from './features/venue/venue.entity';
import { newSetupCode } from './features/setup/setup.service';
import { connectRedis } from './realtime/redis';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '@shared/protocol/http';

const config = loadConfig();
const logger = createLogger(config.logLevel);

// Migrations and the seed run as the schema owner; the app itself runs as the application account.
const owner = createDataSource(config.dbOwner, { poolSize: 2 });
await owner.initialize();
const ran = await migrate(owner, config);
if (ran.length) logger.info({ migrations: ran }, 'migrated');
const seeded = config.seedDemo ? await seedIfEmpty(owner) : false;
// An install with no venue yet waits for its first-run setup, claimed with a code only this console shows.
const setupCode = (await owner.getRepository(Venue).count()) === 0 ? newSetupCode() : null;
await owner.destroy();

const db = createDataSource(config.db);
await db.initialize();
// Several server processes share Socket.IO through Redis; one process alone needs none.
const redis = config.redisUrl ? await connectRedis(config.redisUrl, logger) : undefined;
const railcall = createApp({ config, db, logger, redis, setupCode });
await railcall.start();
railcall.httpServer.listen(config.port, config.host, () => {
  const url = `http://localhost:${config.port}`;
  if (seeded) logger.info('seeded the demo venue');
  console.log(`\nRailcall is running at ${url}`);
  if (config.seedDemo) {
    console.log(`Demo accounts (password "${DEMO_PASSWORD}"):`);
    for (const a of DEMO_ACCOUNTS) console.log(`  ${a.email.padEnd(28)} ${a.roles.join(', ').padEnd(14)} ${a.name}`);
  }
  if (setupCode) {
    console.log(`First run: open ${url}/setup and enter the setup code ${setupCode}`);
    console.log('to create the venue and its technical director. The code works once.');
  }
  console.log('');
});

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  logger.info({ signal }, 'stopping');
  await railcall.close();
  await redis?.close();
  await db.destroy();
  process.exit(0);
}
process.on('SIGINT', () => void stop('SIGINT'));
process.on('SIGTERM', () => void stop('SIGTERM'));
