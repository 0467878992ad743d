// The session report of a 1,000-entry session: time to build it and render it as PDF and as CSV,
// p50 and p99 of several runs, in ms. Run: node --import tsx scripts/bench/report.ts (starts its own MariaDB).
import { createDataSource } from '../../server/db/data-source';
import { playPastDrapeUnload } from '../../server/db/seed/past-session';
import { RecordService } from '../../server/features/record/record.service';
import { reportPdf } from '../../server/features/record/report-pdf';
import { reportCsv } from '../../server/features/record/report-csv';
import { percentile, startBenchDatabase, time } from './lib/bench-db';

const ENTRIES = 1000;
const RUNS = Number(process.env.BENCH_RUNS ?? 7);

const bench = await startBenchDatabase();
try {
  const { config } = bench;
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
  await bench.stop();
}
