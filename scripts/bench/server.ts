// One Railcall server process for the load benchmark (scripts/bench/load.ts starts it as a child):
// the real app, as server/index.ts builds it, plus measurements answered over IPC: event-loop delay,
// CPU time, database commit times and database round trips per action. Not used in production.
import { monitorEventLoopDelay, performance } from 'node:perf_hooks';
import { MysqlQueryRunner } from 'typeorm/driver/mysql/MysqlQueryRunner.js';
import { loadConfig } from '../../server/config';
import { createLogger } from '../../server/logger';
import { createDataSource } from '../../server/db/data-source';
import { createApp } from '../../server/app';
import { connectRedis } from '../../server/realtime/redis';

const config = loadConfig();
const logger = createLogger(config.logLevel);

// Count every round trip to the database and time every commit, without touching the app's code.
// An action's last round trip ends with its COMMIT (several statements in one): it is timed as the commit.
let queries = 0;
let commits: number[] = [];
const proto = MysqlQueryRunner.prototype as unknown as Record<string, (...args: unknown[]) => Promise<unknown>>;
const query = proto.query;
proto.query = async function (this: unknown, ...args: unknown[]) {
  queries += 1;
  if (typeof args[0] !== 'string' || !args[0].endsWith('COMMIT')) return query.apply(this, args);
  const t = performance.now();
  try { return await query.apply(this, args); } finally { commits.push(performance.now() - t); }
};
const commit = proto.commitTransaction;
proto.commitTransaction = async function (this: unknown, ...args: unknown[]) {
  const t = performance.now();
  try { return await commit.apply(this, args); } finally { commits.push(performance.now() - t); }
};

const db = createDataSource(config.db, { poolSize: Number(process.env.BENCH_POOL ?? 10) });
await db.initialize();
const redis = config.redisUrl ? await connectRedis(config.redisUrl, logger) : undefined;
const railcall = createApp({ config, db, logger, redis });
let actions = 0;
railcall.sessions.onCommitted(() => { actions += 1; });
await railcall.start();
await new Promise<void>((r) => railcall.httpServer.listen(config.port, '127.0.0.1', r));

const loop = monitorEventLoopDelay({ resolution: 5 });
loop.enable();
let cpu = process.cpuUsage();
const sorted = (xs: number[]) => [...xs].sort((a, b) => a - b);
const pct = (xs: number[], p: number) => (xs.length ? xs[Math.min(xs.length - 1, Math.floor((p / 100) * xs.length))] : 0);

process.on('message', (msg: { type: string }) => {
  if (msg.type === 'reset') {
    loop.reset(); cpu = process.cpuUsage(); commits = []; queries = 0; actions = 0;
    process.send!({ type: 'reset' });
  } else if (msg.type === 'metrics') {
    const used = process.cpuUsage(cpu);
    const c = sorted(commits);
    process.send!({
      type: 'metrics',
      actions, queries,
      cpuMs: (used.user + used.system) / 1000,
      loopP99Ms: loop.percentile(99) / 1e6,
      commitP99Ms: pct(c, 99),
      commitP50Ms: pct(c, 50),
    });
  } else if (msg.type === 'stop') {
    void railcall.close().then(() => redis?.close()).then(() => db.destroy()).then(() => process.exit(0));
  }
});
process.send!({ type: 'ready' });
