import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { io as connect, type Socket } from 'socket.io-client';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import type { ClientToServerEvents, ServerToClientEvents } from '@shared/protocol/events';
import type { Ack } from '@shared/protocol/ack';
import type { LogEntry, SessionAction, SessionActAnswer, SessionState } from '@shared/protocol/session';
import { afterAll, beforeAll } from 'vitest';
import { cookieOf } from './people';
import { startTestApp, type TestApp } from './app';

type PhoneSocket = Socket<ServerToClientEvents, ClientToServerEvents>;
export type ActAnswer = SessionActAnswer;

/**
 * One crew member's phone in a test: a real sign-in, a real socket.io-client connection, and the
 * log as that phone has received it (by watch replies and broadcasts, merged by sequence number).
 */
export class Phone {
  readonly entries = new Map<number, LogEntry>();
  state: SessionState | null = null;
  alerts: unknown[] = [];
  private constructor(readonly url: string, readonly email: string, readonly cookie: string, public socket: PhoneSocket) {}

  static async signIn(url: string, email: string): Promise<Phone> {
    const res = await request(url).post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD });
    if (res.status !== 200) throw new Error(`sign-in failed for ${email}: ${res.status}`);
    const cookie = cookieOf(res);
    const phone = new Phone(url, email, cookie, Phone.open(url, cookie));
    await phone.connected();
    phone.bind();
    return phone;
  }

  private static open(url: string, cookie: string): PhoneSocket {
    return connect(url, { transports: ['websocket'], reconnection: false, forceNew: true, extraHeaders: { Cookie: cookie } });
  }

  private bind(): void {
    this.socket.on('session:entries', ({ entries, state }) => {
      for (const e of entries) this.entries.set(e.seq, e);
      this.state = state;
    });
    this.socket.on('session:alert', (alert) => this.alerts.push(alert));
  }

  private connected(): Promise<void> {
    return new Promise((resolve, reject) => {
      this.socket.once('connect', () => resolve());
      this.socket.once('connect_error', reject);
    });
  }

  get lastSeq(): number {
    return Math.max(0, ...this.entries.keys());
  }

  /** Entries in order; throws if any is missing (the phone's copy must be gapless). */
  log(): LogEntry[] {
    const out = [...this.entries.values()].sort((a, b) => a.seq - b.seq);
    out.forEach((e, i) => { if (e.seq !== i + 1) throw new Error(`${this.email} is missing entry ${i + 1}`); });
    return out;
  }

  async watch(sessionId: number, afterSeq = this.lastSeq): Promise<Ack<{ state: SessionState; lastSeq: number; entries: LogEntry[] }>> {
    const res = await this.socket.emitWithAck('session:watch', { sessionId, afterSeq });
    if (res.ok) {
      for (const e of res.entries) this.entries.set(e.seq, e);
      this.state = res.state;
    }
    return res;
  }

  act(sessionId: number, action: SessionAction, key: string = randomUUID()): Promise<ActAnswer> {
    return this.socket.emitWithAck('session:act', { sessionId, envelope: { key, clientTimeMs: Date.now(), action } });
  }

  /** Acts and insists on acceptance, naming the refusal otherwise. */
  async must(sessionId: number, action: SessionAction): Promise<number> {
    const res = await this.act(sessionId, action);
    if (!res.ok) throw new Error(`${this.email}: ${action.type} was refused: ${res.error.message}`);
    return res.seq;
  }

  /** Waits until this phone has received every entry up to seq. */
  async caughtUpTo(seq: number, timeoutMs = 5000): Promise<void> {
    const start = Date.now();
    while (this.lastSeq < seq) {
      if (Date.now() - start > timeoutMs) throw new Error(`${this.email} has entries up to ${this.lastSeq}, not ${seq}`);
      await new Promise((r) => setTimeout(r, 10));
    }
  }

  /** Drops the connection (as a phone losing signal). */
  drop(): void {
    this.socket.removeAllListeners();
    this.socket.disconnect();
  }

  /** Reconnects to a (maybe restarted) server at url with the same sign-in. */
  async reconnect(url = this.url): Promise<void> {
    this.socket = Phone.open(url, this.cookie);
    await this.connected();
    this.bind();
  }

  close(): void {
    this.socket.close();
  }
}

/** The demo crew of the Larkspur Playhouse: a lead, two loaders, deck and stage manager. */
export async function demoCrew(url: string) {
  const [rail, loader1, loader2, deck, sm] = await Promise.all([
    Phone.signIn(url, 'rail@larkspur.example'),
    Phone.signIn(url, 'loader1@larkspur.example'),
    Phone.signIn(url, 'loader2@larkspur.example'),
    Phone.signIn(url, 'deck@larkspur.example'),
    Phone.signIn(url, 'sm@larkspur.example'),
  ]);
  return { rail, loader1, loader2, deck, sm, all: [rail, loader1, loader2, deck, sm] };
}

/** Opens a session over HTTP as the demo rail operator: unload both drapes from line set 7. */
export async function openDrapeUnload(url: string, railCookie: string): Promise<{ sessionId: number; state: SessionState }> {
  const schedule = await request(url).get('/api/schedule').set('Cookie', railCookie);
  const ls7 = schedule.body.lineSets.find((l: { number: number }) => l.number === 7);
  const res = await request(url).post('/api/sessions').set('Cookie', railCookie).send({
    title: 'Strike the sea-mist drapes',
    lineSets: [{ lineSetId: ls7.id, remove: ls7.pieces.map((p: { id: number }) => p.id), add: [] }],
  });
  if (res.status !== 201) throw new Error(`opening the session failed: ${res.status} ${JSON.stringify(res.body)}`);
  return { sessionId: res.body.session.id, state: res.body.state };
}

export type Crew = Awaited<ReturnType<typeof demoCrew>>;

/**
 * Inside a `describe`: a fresh app and database, the demo crew signed in on their phones, and a
 * session open to unload line set 7. Read the fields inside tests (they are set in beforeAll).
 */
export function drapeUnloadFixture(opts: { watch?: boolean; before?: (t: TestApp) => Promise<void> } = {}) {
  const ctx = {} as { t: TestApp; crew: Crew; sessionId: number };
  beforeAll(async () => {
    ctx.t = await startTestApp();
    await opts.before?.(ctx.t);
    ctx.crew = await demoCrew(ctx.t.url);
    ({ sessionId: ctx.sessionId } = await openDrapeUnload(ctx.t.url, ctx.crew.rail.cookie));
    if (opts.watch) for (const phone of ctx.crew.all) await phone.watch(ctx.sessionId);
  });
  afterAll(async () => {
    ctx.crew?.all.forEach((p) => p.close());
    await ctx.t?.close();
  });
  return ctx;
}
