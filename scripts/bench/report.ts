// The session report of a 1,000-entry session: time to build it and render it as PDF and as CSV,
// p50 and p99 of several runs, in ms. Run: node --import tsx scripts/bench/report.ts (starts its own MariaDB).
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { randomBytes } from 'node:crypto';
import { MariaDb, freePort, quote } from '../lib/mariadb.mjs';
import { loadConfig } from '../../server/config';
import { createDataSource } from '../../server/db/data-source';
import { migrate, seedIfEmpty } from '../../server/db/setup';
import { playPastDrapeUnload } from '../../server/db/seed/past-session';
import { RecordService } from '../../server/features/record/record.service';
import { reportPdf } from '../../server/features/record/report-pdf';
import { reportCsv } from '../../server/features/record/report-csv';

const ENTRIES = 1000;
const RUNS = Number(process.env.BENCH_RUNS ?? 7);
const percentile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))];

async function time<T>(fn: () => Promise<T> | T): Promise<{ ms: number; value: T }> {
  const start = performance.now();
  const value = await fn();
  return { ms: performance.now() - start, value };
}

const db = new MariaDb({ baseDir: mkdtempSync(join(tmpdir(), 'railcall-bench-')), port: await freePort() });
await db.start();
try {
  const pw = randomBytes(12).toString('hex');
  db.sql(`CREATE DATABASE bench; CREATE USER 'bench_owner'@'127.0.0.1' IDENTIFIED BY ${quote(pw)};
    GRANT ALL PRIVILEGES ON bench.* TO 'bench_owner'@'127.0.0.1' WITH GRANT OPTION;
    CREATE USER 'bench_app'@'127.0.0.1' IDENTIFIED BY ${quote(pw)};`);
  const config = loadConfig({
    RAILCALL_DB_PORT: String(db.port), RAILCALL_DB_NAME: 'bench', RAILCALL_DB_USER: 'bench_app', RAILCALL_DB_PASSWORD: pw,
    RAILCALL_DB_OWNER_USER: 'bench_owner', RAILCALL_DB_OWNER_PASSWORD: pw, RAILCALL_SESSION_SECRET: randomBytes(16).toString('hex'),
    RAILCALL_CLIENT_DIR: '', RAILCALL_LOG_LEVEL: 'silent',
  });
  const owner = createDataSource(config.dbOwner, { poolSize: 2 });
  await owner.initialize();
  await migrate(owner, config);
  await seedIfEmpty(owner);
  await owner.destroy();
  const appDb = createDataSource(config.db, { poolSize: 4 });
  await appDb.initialize();

  // The drape unload writes 22 entries of its own; notes make up the rest.
  const made = await time(() => playPastDrapeUnload(appDb, { startMs: Date.now() - 86_400_000, stepMs: 2000, notes: ENTRIES - 22 }));
  const sessionId = made.value;
  const [{ venue_id: venueId, last_seq: lastSeq }] = await appDb.query('SELECT venue_id, last_seq FROM loading_session WHERE id = ?', [sessionId]);
  const record = new RecordService(appDb);

  const build: number[] = [];
  const pdf: number[] = [];
  const csv: number[] = [];
  let pdfBytes = 0;
  let csvBytes = 0;
  for (let i = 0; i < RUNS; i++) {
    const r = await time(() => record.report(venueId, sessionId));
    build.push(r.ms);
    const p = await time(() => reportPdf(r.value));
    pdf.push(r.ms + p.ms);
    pdfBytes = p.value.length;
    const c = await time(() => reportCsv(r.value));
    csv.push(r.ms + c.ms);
    csvBytes = Buffer.byteLength(c.value);
  }
  const show = (label: string, xs: number[]) => {
    const s = [...xs].sort((a, b) => a - b);
    console.log(`${label.padEnd(34)} p50 ${percentile(s, 50).toFixed(0).padStart(6)} ms   p99 ${percentile(s, 99).toFixed(0).padStart(6)} ms   (${RUNS} runs)`);
  };
  console.log(`session of ${lastSeq} entries (played through the rules in ${(made.ms / 1000).toFixed(1)} s)`);
  show('report from the database', build);
  show(`PDF, from the database (${(pdfBytes / 1024).toFixed(0)} KiB)`, pdf);
  show(`CSV, from the database (${(csvBytes / 1024).toFixed(0)} KiB)`, csv);
  await appDb.destroy();
} finally {
  await db.stop();
}
