// Broadcast latency of live sessions: p50/p99 time from an action sent by one phone to its entry
// received by every phone in the room, for 20 concurrent sessions of 6 phones each.
// Run: npm run bench (or node --import tsx scripts/bench/sessions.ts). Starts its own MariaDB.
import { randomUUID } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import { io as connect, type Socket } from 'socket.io-client';
import { DEMO_PASSWORD } from '../../shared/protocol/http';
import type { SessionAction } from '../../shared/protocol/session';
import { createApp } from '../../server/app';
import { createDataSource } from '../../server/db/data-source';
import { createLogger } from '../../server/logger';
import { copyDrapeLineSets, percentile, startBenchDatabase } from './lib/bench-db';

const SESSIONS = Number(process.env.BENCH_SESSIONS ?? 20);
const CREW = ['rail', 'loader1', 'loader2', 'deck', 'sm', 'td'];
/** Pause between one session's actions. 0 = as fast as the server answers (saturation). */
const GAP_MS = Number(process.env.BENCH_GAP_MS ?? 0);

const bench = await startBenchDatabase();
try {
  const { config } = bench;
  const lineSetIds = await bench.withOwner((owner) => copyDrapeLineSets(owner, SESSIONS, 100));

  const appDb = createDataSource(config.db, { poolSize: 20 });
  await appDb.initialize();
  const railcall = createApp({ config, db: appDb, logger: createLogger('silent') });
  await railcall.start();
  await new Promise<void>((r) => railcall.httpServer.listen(0, '127.0.0.1', r));
  const url = `http://127.0.0.1:${(railcall.httpServer.address() as AddressInfo).port}`;

  const cookies: Record<string, string> = {};
  for (const who of CREW) {
    const res = await request(url).post('/api/auth/sign-in').send({ email: `${who}@larkspur.example`, password: DEMO_PASSWORD });
    cookies[who] = (res.headers['set-cookie'] as unknown as string[])[0].split(';')[0];
  }

  const latencies: number[] = [];
  async function setUpSession(lineSetId: number): Promise<() => Promise<void>> {
    const opened = await request(url).post('/api/sessions').set('Cookie', cookies.rail)
      .send({ title: 'Bench', lineSets: [{ lineSetId, remove: [], add: [] }] });
    const sessionId: number = opened.body.session.id;
    const pieces = (await request(url).get(`/api/sessions/${sessionId}`).set('Cookie', cookies.rail)).body;
    void pieces;
    const phones: Record<string, Socket> = {};
    const waiting = new Map<number, { sentAt: number; remaining: number; done: () => void }>();
    const early = new Map<number, number>();
    for (const who of CREW) {
      const socket = connect(url, { transports: ['websocket'], forceNew: true, extraHeaders: { Cookie: cookies[who] } });
      await new Promise<void>((r) => socket.once('connect', () => r()));
      socket.on('session:entries', ({ entries }: { entries: Array<{ seq: number }> }) => {
        for (const e of entries) {
          const w = waiting.get(e.seq);
          if (!w) { early.set(e.seq, (early.get(e.seq) ?? 0) + 1); continue; }
          if (--w.remaining === 0) { latencies.push(performance.now() - w.sentAt); waiting.delete(e.seq); w.done(); }
        }
      });
      await socket.emitWithAck('session:watch', { sessionId, afterSeq: 0 });
      phones[who] = socket;
    }
    // Everything above is set-up; the measured part starts when every session is ready.
    return async () => {
    // Crews do not all tap at the same instant: sessions start at random within one gap.
    await new Promise((r) => setTimeout(r, Math.random() * GAP_MS));
    let expectedSeq = 1;
    const act = async (who: string, action: SessionAction) => {
      const seq = ++expectedSeq;
      const sentAt = performance.now();
      const all = new Promise<void>((done) => waiting.set(seq, { sentAt, remaining: CREW.length - (early.get(seq) ?? 0), done }));
      const ack = await phones[who].emitWithAck('session:act', { sessionId, envelope: { key: randomUUID(), clientTimeMs: Date.now(), action } });
      if (!ack.ok) throw new Error(`${who} ${action.type}: ${ack.error.message}`);
      await all;
      if (GAP_MS) await new Promise((r) => setTimeout(r, GAP_MS * (0.5 + Math.random())));
    };
    await act('loader1', { type: 'join', role: 'loader' });
    await act('loader2', { type: 'join', role: 'loader' });
    await act('deck', { type: 'join', role: 'deck' });
    await act('sm', { type: 'join', role: 'stage-manager' });
    await act('rail', { type: 'begin', shortCrewReason: 'bench' });
    await act('rail', { type: 'call-move' });
    for (const who of ['loader1', 'loader2', 'deck']) await act(who, { type: 'answer-clear' });
    await act('rail', { type: 'confirm-locked' });
    for (let n = 0; n < 10; n++) await act('sm', { type: 'note', text: `Note ${n}` });
    await act('sm', { type: 'call-hold', reason: 'bench hold' });
    await act('rail', { type: 'release-hold' });
    Object.values(phones).forEach((s) => s.close());
    };
  }

  const runs = await Promise.all(lineSetIds.map(setUpSession));
  const started = performance.now();
  await Promise.all(runs.map((run) => run()));
  const seconds = (performance.now() - started) / 1000;
  latencies.sort((a, b) => a - b);
  const p50 = percentile(latencies, 50);
  const p99 = percentile(latencies, 99);
  console.log(`sessions ${SESSIONS} x ${CREW.length} phones, gap ${GAP_MS} ms, ${latencies.length} actions in ${seconds.toFixed(1)} s (${(latencies.length / seconds).toFixed(0)} actions/s)`);
  console.log(`action sent -> received by every phone: p50 ${p50.toFixed(1)} ms, p99 ${p99.toFixed(1)} ms, max ${latencies.at(-1)!.toFixed(1)} ms`);
  console.log(`p99 is ${(p99 / 50).toFixed(2)}x the 50 ms goal`);
  await railcall.close();
  await appDb.destroy();
} finally {
  await bench.stop();
}
