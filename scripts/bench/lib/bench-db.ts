// What every benchmark script shares: a private MariaDB with the app's users, migrated and seeded
// with the demo venue; copies of the demo's drape line set (one per concurrent session); timing helpers.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { randomBytes } from 'node:crypto';
import type { DataSource } from 'typeorm';
import { MariaDb, freePort, quote } from '../../lib/mariadb.mjs';
import { loadConfig, type Config } from '../../../server/config';
import { createDataSource } from '../../../server/db/data-source';
import { migrate, seedIfEmpty } from '../../../server/db/setup';

export interface BenchDatabase {
  /** The environment a server process of the benchmark is started with. */
  env: Record<string, string>;
  config: Config;
  /** A short-lived owner connection, for the setup that the app's own user may not do. */
  withOwner<T>(fn: (owner: DataSource) => Promise<T>): Promise<T>;
  stop(): Promise<void>;
}

/** Starts MariaDB in a temporary folder, creates the database and its two users, migrates and seeds. */
export async function startBenchDatabase(extraEnv: Record<string, string> = {}): Promise<BenchDatabase> {
  const db = new MariaDb({ baseDir: mkdtempSync(join(tmpdir(), 'railcall-bench-')), port: await freePort() });
  await db.start();
  const pw = randomBytes(12).toString('hex');
  // Each user exists for TCP (127.0.0.1) and for the Unix socket (localhost): BENCH_DB_VIA picks which the servers use.
  db.sql(['127.0.0.1', 'localhost'].map((host) => `CREATE USER 'bench_owner'@'${host}' IDENTIFIED BY ${quote(pw)};
    GRANT ALL PRIVILEGES ON bench.* TO 'bench_owner'@'${host}' WITH GRANT OPTION;
    CREATE USER 'bench_app'@'${host}' IDENTIFIED BY ${quote(pw)};`).join('\n') + 'CREATE DATABASE bench;');
  const env = {
    RAILCALL_DB_PORT: String(db.port), RAILCALL_DB_NAME: 'bench', RAILCALL_DB_USER: 'bench_app', RAILCALL_DB_PASSWORD: pw,
    RAILCALL_DB_OWNER_USER: 'bench_owner', RAILCALL_DB_OWNER_PASSWORD: pw, RAILCALL_SESSION_SECRET: randomBytes(16).toString('hex'),
    RAILCALL_CLIENT_DIR: '', RAILCALL_LOG_LEVEL: process.env.BENCH_LOG_LEVEL ?? 'silent',
    ...(process.env.BENCH_DB_VIA === 'tcp' ? {} : { RAILCALL_DB_SOCKET: db.socket }), ...extraEnv,
  };
  const config = loadConfig(env);
  const withOwner = async <T>(fn: (owner: DataSource) => Promise<T>): Promise<T> => {
    const owner = createDataSource(config.dbOwner, { poolSize: 2 });
    await owner.initialize();
    try { return await fn(owner); } finally { await owner.destroy(); }
  };
  try {
    await withOwner(async (owner) => { await migrate(owner, config); await seedIfEmpty(owner); });
  } catch (error) {
    await db.stop();
    throw error;
  }
  return { env, config, withOwner, stop: async () => { await db.stop(); db.destroy(); } };
}

/**
 * Copies the demo's two-drape line set 7, pieces and all, `count` times from number `firstNumber` on:
 * a line set belongs to one open session at a time, so each concurrent session gets its own. The
 * bridge gets bricks enough for every session.
 */
export async function copyDrapeLineSets(owner: DataSource, count: number, firstNumber: number): Promise<number[]> {
  const [ls7] = await owner.query('SELECT * FROM line_set WHERE number = 7');
  const drapes = await owner.query('SELECT name, mass_kg FROM piece WHERE line_set_id = ?', [ls7.id]);
  const ids: number[] = [];
  for (let i = 0; i < count; i++) {
    const res = await owner.query(
      `INSERT INTO line_set (venue_id, number, name, purchase, pipe_size, pipe_length_m, pipe_kg, lift_lines_m, lift_line_rating_kg,
        batten_rating_kg_per_m, arbor_kg, arbor_capacity_kg, bricks) SELECT venue_id, ?, name, purchase, pipe_size, pipe_length_m, pipe_kg,
        lift_lines_m, lift_line_rating_kg, batten_rating_kg_per_m, arbor_kg, arbor_capacity_kg, bricks FROM line_set WHERE id = ?`,
      [firstNumber + i, ls7.id]);
    for (const d of drapes) await owner.query('INSERT INTO piece (line_set_id, name, mass_kg) VALUES (?, ?, ?)', [res.insertId, d.name, d.mass_kg]);
    ids.push(res.insertId);
  }
  await owner.query('UPDATE brick_type SET bridge_count = ?', [Math.max(10_000, count * 2_000)]);
  return ids;
}

/** The nearest-rank percentile of an ascending list (NaN for an empty one). */
export function percentile(sorted: number[], p: number): number {
  return sorted.length ? sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] : NaN;
}

export async function time<T>(fn: () => Promise<T> | T): Promise<{ ms: number; value: T }> {
  const start = performance.now();
  const value = await fn();
  return { ms: performance.now() - start, value };
}
