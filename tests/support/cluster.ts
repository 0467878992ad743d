import { spawn, type ChildProcess } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { request as httpRequest } from 'node:http';
import { join, resolve } from 'node:path';
import { randomUUID } from 'node:crypto';
import { io as connect, type Socket } from 'socket.io-client';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import type { ClientToServerEvents, ServerToClientEvents } from '@shared/protocol/events';
import type { Ack } from '@shared/protocol/ack';
import type { LogEntry, SessionAction, SessionState } from '@shared/protocol/session';
import type { Config } from '../../server/config';

const root = resolve(import.meta.dirname, '../..');
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** A child process of the test: a Railcall server, Redis or nginx, stopped by its own PID. */
export class Child {
  private exited: Promise<void>;
  output = '';
  constructor(readonly name: string, readonly proc: ChildProcess) {
    proc.stdout?.on('data', (d) => { this.output += String(d); });
    proc.stderr?.on('data', (d) => { this.output += String(d); });
    this.exited = new Promise((r) => proc.once('exit', () => r()));
  }

  async waitFor(text: string, timeoutMs = 90_000): Promise<void> {
    const start = Date.now();
    while (!this.output.includes(text)) {
      if (this.proc.exitCode !== null || this.proc.signalCode !== null) throw new Error(`${this.name} exited:\n${this.output.slice(-2000)}`);
      if (Date.now() - start > timeoutMs) throw new Error(`${this.name} did not say "${text}" in time:\n${this.output.slice(-2000)}`);
      await sleep(50);
    }
  }

  get running(): boolean {
    return this.proc.exitCode === null && this.proc.signalCode === null;
  }

  /** SIGKILL: no clean-up, no goodbye to the sockets, as a crash or a power cut. */
  async kill(): Promise<void> {
    if (this.running) this.proc.kill('SIGKILL');
    await this.exited;
  }

  async stop(): Promise<void> {
    if (this.running) this.proc.kill('SIGTERM');
    await Promise.race([this.exited, sleep(5000)]);
    await this.kill();
  }
}

/** The environment a server process reads (server/config.ts) for a test database's config. */
export function serverEnv(config: Config, port: number, extra: Record<string, string> = {}): Record<string, string> {
  return {
    PATH: process.env.PATH ?? '',
    NODE_ENV: 'test',
    RAILCALL_PORT: String(port),
    RAILCALL_HOST: '127.0.0.1',
    RAILCALL_DB_HOST: config.db.host,
    RAILCALL_DB_PORT: String(config.db.port),
    RAILCALL_DB_NAME: config.db.database,
    RAILCALL_DB_USER: config.db.user,
    RAILCALL_DB_PASSWORD: config.db.password,
    RAILCALL_DB_OWNER_USER: config.dbOwner.user,
    RAILCALL_DB_OWNER_PASSWORD: config.dbOwner.password,
    RAILCALL_SESSION_SECRET: config.sessionSecret,
    RAILCALL_CLIENT_DIR: '',
    RAILCALL_SEED_DEMO: '0',
    RAILCALL_LOG_LEVEL: process.env.RAILCALL_TEST_SERVER_LOG ?? 'error',
    ...extra,
  };
}

/** A real server process, as `npm start` runs it (one PID: node --import tsx). */
export async function startServer(name: string, env: Record<string, string>): Promise<Child> {
  const child = new Child(name, spawn(process.execPath, ['--import', 'tsx', 'server/index.ts'], { cwd: root, env, stdio: ['ignore', 'pipe', 'pipe'] }));
  await child.waitFor('Railcall is running');
  return child;
}

export async function startRedis(port: number): Promise<Child> {
  const child = new Child('redis', spawn('redis-server', ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--daemonize', 'no'], { stdio: ['ignore', 'pipe', 'pipe'] }));
  await child.waitFor('Ready to accept connections');
  return child;
}

/**
 * nginx with the repository's config (scripts/deploy/nginx/railcall.conf), made fit for loopback:
 * the test's upstream ports, plain http on `port` instead of TLS, and a header naming the upstream
 * that answered (so the test can place phones on chosen processes).
 */
export async function startNginx(dir: string, port: number, upstreamPorts: number[]): Promise<Child> {
  mkdirSync(join(dir, 'tmp'), { recursive: true });
  let site = readFileSync(join(root, 'scripts/deploy/nginx/railcall.conf'), 'utf8');
  site = site.replace(/^\s*server 127\.0\.0\.1:\d+[^\n]*\n/gm, '');
  site = site.replace('ip_hash;', `ip_hash;\n${upstreamPorts.map((p) => `    server 127.0.0.1:${p} max_fails=1 fail_timeout=10s;`).join('\n')}`);
  site = site.replace(/server \{\n\s*listen 80;[\s\S]*?\n\}\n/, '');
  site = site.replace('listen 443 ssl;', `listen 127.0.0.1:${port};`).replace(/^\s*(http2|ssl_)[^\n]*\n/gm, '');
  site = site.replace('location / {', 'location / {\n        add_header X-Railcall-Upstream $upstream_addr always;');
  writeFileSync(join(dir, 'railcall.conf'), site);
  writeFileSync(join(dir, 'nginx.conf'), `user root;
worker_processes 1;
pid ${dir}/nginx.pid;
error_log ${dir}/error.log warn;
events { worker_connections 1024; }
http {
  access_log off;
  client_body_temp_path ${dir}/tmp/body;
  proxy_temp_path ${dir}/tmp/proxy;
  fastcgi_temp_path ${dir}/tmp/fastcgi;
  uwsgi_temp_path ${dir}/tmp/uwsgi;
  scgi_temp_path ${dir}/tmp/scgi;
  include ${dir}/railcall.conf;
}
`);
  const child = new Child('nginx', spawn('nginx', ['-p', dir, '-c', join(dir, 'nginx.conf'), '-g', 'daemon off;'], { stdio: ['ignore', 'pipe', 'pipe'] }));
  for (let i = 0; i < 100; i++) {
    if (await upstreamFor(port, '127.0.0.1').then(() => true, () => false)) return child;
    if (!child.running) break;
    await sleep(100);
  }
  throw new Error(`nginx did not start:\n${child.output}`);
}

/** Which upstream nginx sends a client at this loopback address to (ip_hash looks at the first three octets). */
export function upstreamFor(port: number, localAddress: string): Promise<string> {
  return new Promise((resolvePromise, reject) => {
    const req = httpRequest({ host: '127.0.0.1', port, path: '/api/no-such-route', localAddress }, (res) => {
      res.resume();
      resolvePromise(String(res.headers['x-railcall-upstream'] ?? ''));
    });
    req.on('error', reject);
    req.end();
  });
}

type PhoneSocket = Socket<ServerToClientEvents, ClientToServerEvents>;
export type Answer = Ack<{ seq: number; state: SessionState }>;

/**
 * A phone as the real client behaves: reconnects by itself, watches again from the last entry it
 * holds, fills gaps over HTTP, and sends an unanswered tap again with the same key until it gets an
 * answer (a 503 "unavailable" answer counts as none). It keeps every answer it was given.
 */
export class RoamingPhone {
  readonly entries = new Map<number, LogEntry>();
  readonly answers: Array<{ key: string; action: SessionAction; answer: Answer }> = [];
  /** How often each entry arrived, by broadcast, watch or catch-up (more than once is fine; the log keeps one). */
  outOfOrder = 0;
  sends = 0;
  unavailable = 0;
  sessionId: number | null = null;
  socket!: PhoneSocket;
  private filling: Promise<void> | null = null;

  private constructor(readonly url: string, readonly email: string, readonly cookie: string, readonly localAddress?: string) {}

  static async signIn(url: string, email: string, localAddress?: string): Promise<RoamingPhone> {
    const res = await fetch(`${url}/api/auth/sign-in`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: DEMO_PASSWORD }) });
    if (res.status !== 200) throw new Error(`sign-in failed for ${email}: ${res.status}`);
    const cookie = res.headers.getSetCookie()[0].split(';')[0];
    const phone = new RoamingPhone(url, email, cookie, localAddress);
    phone.open();
    await phone.connected(15_000);
    return phone;
  }

  private open(): void {
    this.socket = connect(this.url, {
      transports: ['websocket'], forceNew: true, extraHeaders: { Cookie: this.cookie },
      reconnectionDelay: 100, reconnectionDelayMax: 500, randomizationFactor: 0,
      ...(this.localAddress ? { localAddress: this.localAddress } : {}),
    } as never);
    this.socket.on('connect', () => { if (this.sessionId !== null) void this.watch().catch(() => {}); });
    this.socket.on('session:entries', ({ sessionId, entries }) => {
      if (sessionId !== this.sessionId) return;
      const top = this.lastSeq;
      if (entries.length && entries[0].seq < top) this.outOfOrder += 1;
      this.take(entries);
      if (this.contiguous() < Math.max(...entries.map((e) => e.seq))) void this.fill();
    });
  }

  connected(timeoutMs: number): Promise<void> {
    if (this.socket.connected) return Promise.resolve();
    return new Promise((resolvePromise, reject) => {
      const timer = setTimeout(() => reject(new Error(`${this.email} did not connect`)), timeoutMs);
      this.socket.once('connect', () => { clearTimeout(timer); resolvePromise(); });
    });
  }

  private take(entries: LogEntry[]): void {
    for (const e of entries) this.entries.set(e.seq, e);
  }

  get lastSeq(): number {
    return Math.max(0, ...this.entries.keys());
  }

  /** The last sequence number held without a gap from 1. */
  contiguous(): number {
    let n = 0;
    while (this.entries.has(n + 1)) n += 1;
    return n;
  }

  async watch(sessionId = this.sessionId!): Promise<Ack<{ state: SessionState; lastSeq: number; entries: LogEntry[]; presence: unknown[] }>> {
    this.sessionId = sessionId;
    const res = await this.socket.timeout(5000).emitWithAck('session:watch', { sessionId, afterSeq: this.contiguous() });
    if (res.ok) {
      this.take(res.entries);
      if (this.contiguous() < res.lastSeq) await this.fill();
    }
    return res as never;
  }

  /** What the live connection missed, over plain HTTP (page by page if the server pages it). */
  fill(): Promise<void> {
    this.filling ??= (async () => {
      try {
        for (;;) {
          const res = await fetch(`${this.url}/api/sessions/${this.sessionId}/events?after=${this.contiguous()}`, { headers: { Cookie: this.cookie } });
          if (res.status !== 200) return;
          const body = await res.json() as { entries: LogEntry[]; lastSeq: number };
          this.take(body.entries);
          if (!body.entries.length || this.contiguous() >= body.lastSeq) return;
        }
      } catch {
        // The next broadcast or reconnect tries again.
      } finally {
        this.filling = null;
      }
    })();
    return this.filling;
  }

  /** Sends until answered: the same key each time, so the server counts it once. */
  async act(action: SessionAction, { key = randomUUID(), timeoutMs = 180_000 } = {}): Promise<Answer> {
    const envelope = { key, clientTimeMs: Date.now(), action };
    const start = Date.now();
    let last = 'nothing sent';
    for (;;) {
      if (Date.now() - start > timeoutMs) throw new Error(`${this.email}: ${action.type} got no answer in ${timeoutMs} ms (last: ${last})`);
      try {
        await this.connected(10_000);
        this.sends += 1;
        const answer = await this.socket.timeout(10_000).emitWithAck('session:act', { sessionId: this.sessionId!, envelope }) as Answer;
        if (!answer.ok && answer.error.code === 'unavailable') {
          last = 'unavailable';
          this.unavailable += 1;
          await sleep(200);
          continue;
        }
        this.answers.push({ key, action, answer });
        return answer;
      } catch (error) {
        last = String(error);
        await sleep(100);
      }
    }
  }

  async must(action: SessionAction): Promise<number> {
    const answer = await this.act(action);
    if (!answer.ok) throw new Error(`${this.email}: ${action.type} was refused: ${answer.error.message}`);
    return answer.seq;
  }

  /** Waits until this phone holds every entry up to seq, without a gap; returns how long it took. */
  async caughtUpTo(seq: number, timeoutMs = 5000): Promise<number> {
    const start = Date.now();
    while (this.contiguous() < seq) {
      if (Date.now() - start > timeoutMs) throw new Error(`${this.email} holds entries up to ${this.contiguous()}, not ${seq}, after ${timeoutMs} ms`);
      if (this.socket.connected && Date.now() - start > 1000) void this.fill();
      await sleep(20);
    }
    return Date.now() - start;
  }

  close(): void {
    this.socket.close();
  }
}

export const CREW_EMAILS = ['rail', 'loader1', 'loader2', 'deck', 'sm'].map((w) => `${w}@larkspur.example`);

/** The walk of the demo drape unload on line set 7 (as tests/server/sessions/full-unload.test.ts runs it). */
export function drapeUnloadWalk(): Array<[number, SessionAction]> {
  const [rail, loader1, loader2, deck, sm] = [0, 1, 2, 3, 4];
  return [
    [loader1, { type: 'join', role: 'loader' }], [loader2, { type: 'join', role: 'loader' }],
    [deck, { type: 'join', role: 'deck' }], [sm, { type: 'join', role: 'stage-manager' }], [rail, { type: 'begin' }],
    [rail, { type: 'call-move' }], [deck, { type: 'answer-clear' }], [loader1, { type: 'answer-clear' }], [loader2, { type: 'answer-clear' }],
    [rail, { type: 'confirm-locked' }], [loader1, { type: 'call-clear-rail' }], [rail, { type: 'confirm-rail-clear' }],
    [loader1, { type: 'confirm-step', stepIndex: 0 }], [deck, { type: 'confirm-step', stepIndex: 1 }],
    [loader2, { type: 'confirm-step', stepIndex: 2 }], [deck, { type: 'confirm-step', stepIndex: 3 }],
    [loader1, { type: 'call-loading-complete' }], [rail, { type: 'record-test', result: 'balanced' }],
  ];
}

/** Opens the demo drape unload over HTTP as the rail operator (a cookie of theirs). */
export async function openDrapeUnloadAt(url: string, railCookie: string, lineSetNumber = 7): Promise<number> {
  const schedule = await (await fetch(`${url}/api/schedule`, { headers: { Cookie: railCookie } })).json() as { lineSets: Array<{ id: number; number: number; pieces: Array<{ id: number }> }> };
  const ls = schedule.lineSets.find((l) => l.number === lineSetNumber)!;
  const res = await fetch(`${url}/api/sessions`, {
    method: 'POST', headers: { 'content-type': 'application/json', Cookie: railCookie },
    body: JSON.stringify({ title: 'Strike the sea-mist drapes', lineSets: [{ lineSetId: ls.id, remove: ls.pieces.map((p) => p.id), add: [] }] }),
  });
  if (res.status !== 201) throw new Error(`opening the session failed: ${res.status} ${await res.text()}`);
  return ((await res.json()) as { session: { id: number } }).session.id;
}
