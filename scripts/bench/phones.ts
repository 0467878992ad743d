// Phones for the load benchmark, in a process of their own (scripts/bench/load.ts forks a few):
// real socket.io-client connections, the real protocol. For each session given: six phones watch,
// the crew joins and begins; then, on "go", the session sends one action at a time, each after the
// last one reached all six phones plus a pause, and times sent -> received by every phone.
import { randomUUID } from 'node:crypto';
import { performance } from 'node:perf_hooks';
import { io as connect, type Socket } from 'socket.io-client';
import type { SessionAction } from '../../shared/protocol/session';

interface Setup { type: 'setup'; urls: string[]; cookies: Record<string, string>; sessions: Array<{ sessionId: number; index: number }> }
interface Go { type: 'go'; gapMs: number; durationMs: number }

const CREW = ['rail', 'loader1', 'loader2', 'deck', 'sm', 'td'] as const;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
/** After the crew has begun: notes, a hold called and released. Every action is accepted and logged. */
const CYCLE: Array<[typeof CREW[number], SessionAction]> = [
  ['sm', { type: 'note', text: 'Fly cue 14 standing by' }],
  ['loader1', { type: 'note', text: 'Bridge stocked' }],
  ['deck', { type: 'call-hold', reason: 'Someone on the deck under the set' }],
  ['rail', { type: 'release-hold' }],
];

class BenchSession {
  phones: Record<string, Socket> = {};
  private expectedSeq = 0;
  private waiting = new Map<number, { sentAt: number; remaining: number; done: () => void }>();
  private early = new Map<number, number>();
  latencies: number[] = [];
  errors = 0;
  private step = 0;

  constructor(readonly sessionId: number, readonly index: number) {}

  async open(urls: string[], cookies: Record<string, string>): Promise<void> {
    for (const [i, who] of CREW.entries()) {
      // Phones of one session spread over the server processes, as behind a proxy.
      const socket = connect(urls[(i + this.index) % urls.length], { transports: ['websocket'], forceNew: true, reconnection: false, extraHeaders: { Cookie: cookies[who] } });
      await new Promise<void>((resolve, reject) => { socket.once('connect', () => resolve()); socket.once('connect_error', reject); });
      socket.on('session:entries', ({ entries }: { entries: Array<{ seq: number }> }) => {
        for (const e of entries) {
          const w = this.waiting.get(e.seq);
          if (!w) { this.early.set(e.seq, (this.early.get(e.seq) ?? 0) + 1); continue; }
          if (--w.remaining === 0) { this.latencies.push(performance.now() - w.sentAt); this.waiting.delete(e.seq); w.done(); }
        }
      });
      const res = await socket.emitWithAck('session:watch', { sessionId: this.sessionId, afterSeq: 0 });
      this.expectedSeq = Math.max(this.expectedSeq, res.lastSeq);
      this.phones[who] = socket;
    }
    for (const [who, action] of [
      ['loader1', { type: 'join', role: 'loader' }], ['loader2', { type: 'join', role: 'loader' }],
      ['deck', { type: 'join', role: 'deck' }], ['sm', { type: 'join', role: 'stage-manager' }], ['rail', { type: 'begin' }],
    ] as Array<[string, SessionAction]>) await this.act(who, action);
    this.latencies = [];
  }

  async act(who: string, action: SessionAction): Promise<void> {
    const seq = ++this.expectedSeq;
    const sentAt = performance.now();
    const all = new Promise<void>((done) => this.waiting.set(seq, { sentAt, remaining: CREW.length - (this.early.get(seq) ?? 0), done }));
    this.early.delete(seq);
    const ack = await this.phones[who].timeout(10_000).emitWithAck('session:act', { sessionId: this.sessionId, envelope: { key: randomUUID(), clientTimeMs: Date.now(), action } })
      .catch(() => ({ ok: false, error: { message: 'no answer' } }));
    if (!ack.ok) {
      this.errors += 1;
      this.waiting.delete(seq);
      // Where the log really stands: take it from the answer when there is one.
      if (typeof ack.seq === 'number') this.expectedSeq = ack.seq;
      return;
    }
    if (ack.seq !== seq) { this.errors += 1; this.waiting.delete(seq); this.expectedSeq = ack.seq; return; }
    await Promise.race([all, sleep(10_000).then(() => { if (this.waiting.delete(seq)) this.errors += 1; })]);
  }

  async run(gapMs: number, untilMs: number): Promise<void> {
    // Crews do not all tap at the same instant: sessions start at random within one gap.
    await sleep(Math.random() * gapMs);
    while (performance.now() < untilMs) {
      const [who, action] = CYCLE[this.step++ % CYCLE.length];
      const started = performance.now();
      await this.act(who, action);
      const left = gapMs - (performance.now() - started);
      if (left > 0) await sleep(left);
    }
  }
}

let sessions: BenchSession[] = [];
process.on('message', async (msg: Setup | Go | { type: 'stop' }) => {
  if (msg.type === 'setup') {
    sessions = msg.sessions.map((s) => new BenchSession(s.sessionId, s.index));
    await Promise.all(sessions.map((s) => s.open(msg.urls, msg.cookies)));
    process.send!({ type: 'ready' });
  } else if (msg.type === 'go') {
    for (const s of sessions) { s.latencies = []; s.errors = 0; }
    const until = performance.now() + msg.durationMs;
    await Promise.all(sessions.map((s) => s.run(msg.gapMs, until)));
    process.send!({ type: 'done', latencies: sessions.flatMap((s) => s.latencies), errors: sessions.reduce((n, s) => n + s.errors, 0) });
  } else if (msg.type === 'stop') {
    for (const s of sessions) for (const p of Object.values(s.phones)) p.close();
    process.exit(0);
  }
});
process.send!({ type: 'started' });
