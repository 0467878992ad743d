// The schedule at size: 200 line sets of 5 pieces each, imported by CSV (BENCH_IMPORTS runs, each into an
// empty schedule), then read with computed balances. Reports p50/p95 of the import and p50/p99 of the read.
// Run: node --import tsx scripts/bench/schedule.ts (starts its own MariaDB). Not a timed test: it reports.
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import { stringify } from 'csv-stringify/sync';
import { DEMO_PASSWORD } from '../../shared/protocol/http';
import { csvHeaders } from '../../shared/protocol/schedule-csv';
import { createApp } from '../../server/app';
import { createDataSource } from '../../server/db/data-source';
import { createLogger } from '../../server/logger';
import { percentile, startBenchDatabase, time } from './lib/bench-db';

const SETS = Number(process.env.BENCH_LINE_SETS ?? 200);
const PIECES = 5;
const READS = Number(process.env.BENCH_READS ?? 200);
const IMPORTS = Number(process.env.BENCH_IMPORTS ?? 5);
const ascending = (xs: number[]) => [...xs].sort((a, b) => a - b);

function scheduleCsv(): string {
  const empty = Object.fromEntries(csvHeaders('imperial').map((h) => [h, '']));
  const rows: Record<string, string>[] = [];
  for (let n = 101; n < 101 + SETS; n++) {
    rows.push({
      ...empty, row: 'line set', line_set: String(n), name: `Bench set ${n}`, distance_from_plaster_line_ft: String(n / 2), purchase: n % 4 === 0 ? '2' : '1',
      pipe: '1-1/2 in Schedule 40', pipe_weight_lb_per_ft: '2.72', batten_length_ft: '40', lift_lines_ft: '2;11;20;29;38', batten_rating_lb_per_ft: '25',
      lift_line_rating_lb: '500', arbor_empty_lb: '90', arbor_capacity_lb: '1800', high_trim_ft: '30', low_trim_ft: '4', bricks: 'full:4;half:1',
    });
    for (let p = 0; p < PIECES; p++) {
      rows.push(p % 2 === 0
        ? { ...empty, row: 'piece', line_set: String(n), name: `Piece ${p + 1}`, weight_lb: String(10 + p * 3.5), at_ft: String(4 + p * 7), department: 'Scenery' }
        : { ...empty, row: 'piece', line_set: String(n), name: `Piece ${p + 1}`, weight_lb: String(12 + p), spread_from_ft: String(p * 4), spread_to_ft: String(p * 4 + 10), department: 'Soft goods' });
    }
  }
  return stringify(rows, { header: true, columns: csvHeaders('imperial') });
}

const bench = await startBenchDatabase();
try {
  const { config } = bench;
  // Only the bench's line sets: the demo's own are removed so the figures are for exactly that schedule.
  const emptySchedule = () => bench.withOwner(async (owner) => {
    await owner.query('DELETE FROM piece');
    await owner.query('DELETE FROM line_set');
    await owner.query("DELETE FROM schedule_change WHERE subject IN ('line-set', 'piece')");
  });
  await emptySchedule();

  const appDb = createDataSource(config.db, { poolSize: 10 });
  await appDb.initialize();
  const railcall = createApp({ config, db: appDb, logger: createLogger('silent') });
  await railcall.start();
  await new Promise<void>((r) => railcall.httpServer.listen(0, '127.0.0.1', r));
  const url = `http://127.0.0.1:${(railcall.httpServer.address() as AddressInfo).port}`;
  const signIn = await request(url).post('/api/auth/sign-in').send({ email: 'td@larkspur.example', password: DEMO_PASSWORD });
  const cookie = (signIn.headers['set-cookie'] as unknown as string[])[0].split(';')[0];

  const csv = scheduleCsv();
  const previews: number[] = [];
  const imports: number[] = [];
  for (let run = 0; run < IMPORTS; run++) {
    if (run > 0) await emptySchedule();
    const preview = await time(() => request(url).post('/api/schedule/csv/preview').set('Cookie', cookie).set('Content-Type', 'text/csv').send(csv));
    if (preview.value.status !== 200) throw new Error(`preview: ${JSON.stringify(preview.value.body).slice(0, 400)}`);
    const done = await time(() => request(url).post(`/api/schedule/csv/import?token=${preview.value.body.token}`).set('Cookie', cookie).set('Content-Type', 'text/csv').send(csv));
    if (done.value.status !== 200 || done.value.body.counts.created !== SETS) throw new Error(`import: ${JSON.stringify(done.value.body).slice(0, 400)}`);
    previews.push(preview.ms / 1000);
    imports.push(done.ms / 1000);
  }

  const times: number[] = [];
  for (let i = 0; i < READS; i++) {
    const s = performance.now();
    const res = await request(url).get('/api/schedule').set('Cookie', cookie);
    if (res.status !== 200 || res.body.lineSets.length !== SETS) throw new Error('schedule read failed');
    times.push(performance.now() - s);
  }
  const [p, i, r] = [ascending(previews), ascending(imports), ascending(times)];
  console.log(`CSV of ${SETS} line sets x ${PIECES} pieces (${(csv.length / 1024).toFixed(0)} kB), ${IMPORTS} runs into an empty schedule:`);
  console.log(`  preview p50 ${percentile(p, 50).toFixed(2)} s, p95 ${percentile(p, 95).toFixed(2)} s; import p50 ${percentile(i, 50).toFixed(2)} s, p95 ${percentile(i, 95).toFixed(2)} s`);
  console.log(`GET /api/schedule with computed balances, ${READS} reads: p50 ${percentile(r, 50).toFixed(1)} ms, p99 ${percentile(r, 99).toFixed(1)} ms`);
  await railcall.close();
  await appDb.destroy();
} finally {
  await bench.stop();
}
