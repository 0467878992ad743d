import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { io as connect, type Socket } from 'socket.io-client';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import { loadConfig } from '../../server/config';
import { startTestApp, type TestApp } from '../support/app';
import { cookieOf } from '../support/people';

const FOREIGN = 'https://prop-shop.example';

function open(url: string, transport: 'websocket' | 'polling', headers: Record<string, string>): Socket {
  return connect(url, { transports: [transport], reconnection: false, forceNew: true, extraHeaders: headers });
}

/** Resolves 'connected' or the handshake's error text. */
function outcome(socket: Socket): Promise<string> {
  return new Promise((resolve) => {
    socket.once('connect', () => resolve('connected'));
    socket.once('connect_error', (e: Error & { context?: { status?: number; responseText?: string } }) => {
      resolve(`refused ${e.context?.status ?? ''} ${e.context?.responseText ?? e.message}`);
    });
  });
}

describe('requests from other sites', () => {
  let t: TestApp;
  let cookie: string;
  beforeAll(async () => {
    t = await startTestApp();
    cookie = cookieOf(await request(t.url).post('/api/auth/sign-in').send({ email: 'rail@larkspur.example', password: DEMO_PASSWORD }));
  });
  afterAll(async () => { await t.close(); });

  for (const transport of ['websocket', 'polling'] as const) {
    it(`refuses a ${transport} handshake with a foreign Origin, even with a valid sign-in cookie`, async () => {
      const socket = open(t.url, transport, { Cookie: cookie, Origin: FOREIGN });
      const result = await outcome(socket);
      socket.close();
      expect(result).toMatch(/^refused/);
      if (transport === 'polling') expect(result).toMatch(/403.*another site/);
    });

    it(`accepts a ${transport} handshake from the app's own origin`, async () => {
      const socket = open(t.url, transport, { Cookie: cookie, Origin: t.url });
      expect(await outcome(socket)).toBe('connected');
      socket.close();
    });
  }

  it('refuses a foreign Origin on HTTP reads and changes alike, with a sentence', async () => {
    const read = await request(t.url).get('/api/me').set('Cookie', cookie).set('Origin', FOREIGN);
    expect(read.status).toBe(403);
    expect(read.body.error.message).toMatch(/another site/);
    const change = await request(t.url).post('/api/people').set('Cookie', cookie).set('Origin', FOREIGN)
      .send({ name: 'Forged', email: 'forged@larkspur.example', roles: ['admin'] });
    expect(change.status).toBe(403);
    const [row] = await t.database.owner.query("SELECT COUNT(*) AS n FROM person WHERE email = 'forged@larkspur.example'");
    expect(Number(row.n)).toBe(0);
  });

  it('refuses the opaque Origin "null" (sandboxed frames, some redirects)', async () => {
    expect((await request(t.url).get('/api/me').set('Cookie', cookie).set('Origin', 'null')).status).toBe(403);
  });

  it('refuses a change a browser marks cross-site or same-site (Fetch Metadata) when it names no origin', async () => {
    for (const site of ['cross-site', 'same-site']) {
      const res = await request(t.url).post('/api/auth/sign-out').set('Cookie', cookie).set('Sec-Fetch-Site', site);
      expect(res.status, site).toBe(403);
    }
    // A cross-site read without credentials' effect is allowed (a link to the app).
    expect((await request(t.url).get('/api/me').set('Cookie', cookie).set('Sec-Fetch-Site', 'cross-site')).status).toBe(200);
    // Still signed in: the refused sign-out did nothing.
    expect((await request(t.url).get('/api/me').set('Cookie', cookie)).status).toBe(200);
  });

  it('lets the app\'s own pages through (same-origin Fetch Metadata, own Origin)', async () => {
    const res = await request(t.url).get('/api/me').set('Cookie', cookie).set('Sec-Fetch-Site', 'same-origin').set('Origin', t.url);
    expect(res.status).toBe(200);
  });

  it('refuses a change sent as a form or plain text (what a foreign page can send without a preflight)', async () => {
    for (const type of ['application/x-www-form-urlencoded', 'text/plain']) {
      const res = await request(t.url).post('/api/people').set('Cookie', cookie).set('Content-Type', type).send('name=Forged&email=f@x.example');
      expect(res.status, type).toBe(400);
      expect(res.body.error.message).toMatch(/not as a form or plain text/);
    }
  });
});

describe('public origins from the environment', () => {
  it('reads RAILCALL_PUBLIC_URL as a comma list of origins and defaults to the local start address', () => {
    const base = { RAILCALL_SESSION_SECRET: 'x'.repeat(16) };
    expect(loadConfig({ ...base, RAILCALL_PUBLIC_URL: 'https://rail.example.org/app, http://10.0.0.5:8080' }).publicOrigins)
      .toEqual(['https://rail.example.org', 'http://10.0.0.5:8080']);
    expect(loadConfig({ ...base, RAILCALL_PORT: '3100' }).publicOrigins).toEqual(['http://localhost:3100', 'http://127.0.0.1:3100']);
    expect(() => loadConfig({ ...base, RAILCALL_PUBLIC_URL: 'ftp://x' })).toThrow(/not an http/);
    expect(loadConfig({ ...base, RAILCALL_TRUST_PROXY: '1' }).trustProxy).toBe(1);
    expect(loadConfig({ ...base, RAILCALL_TRUST_PROXY: 'loopback, 10.0.0.0/8' }).trustProxy).toEqual(['loopback', '10.0.0.0/8']);
    expect(loadConfig(base).trustProxy).toBe(false);
  });
});

describe('in production behind a proxy', () => {
  let t: TestApp;
  const PUBLIC = 'https://rail.larkspur.example';
  beforeAll(async () => {
    t = await startTestApp({
      config: (c) => ({ ...c, production: true, trustProxy: 1, publicOrigins: [PUBLIC], signInThrottle: { windowMs: 60_000, perAccount: 100, perAddress: 2 } }),
    });
  });
  afterAll(async () => { await t.close(); });

  const signIn = () => request(t.url).post('/api/auth/sign-in').set('X-Forwarded-Proto', 'https').set('Origin', PUBLIC)
    .send({ email: 'deck@larkspur.example', password: DEMO_PASSWORD });

  it('sets the sign-in cookie HttpOnly, SameSite=Lax and Secure when the proxy forwarded https', async () => {
    const res = await signIn();
    expect(res.status).toBe(200);
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('railcall.sid='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).toMatch(/; Secure/i);
  });

  it('sets no cookie over plain http (a Secure cookie would be dropped anyway)', async () => {
    const res = await request(t.url).post('/api/auth/sign-in').set('Origin', PUBLIC).send({ email: 'deck@larkspur.example', password: DEMO_PASSWORD });
    expect(res.headers['set-cookie']).toBeUndefined();
  });

  it('accepts only the configured public origin, not its own address', async () => {
    expect((await signIn()).status).toBe(200);
    const own = await request(t.url).post('/api/auth/sign-in').set('X-Forwarded-Proto', 'https').set('Origin', t.url)
      .send({ email: 'deck@larkspur.example', password: DEMO_PASSWORD });
    expect(own.status).toBe(403);
  });

  it('counts sign-in failures by the phone\'s address as forwarded, not the proxy\'s', async () => {
    const fail = (address: string) => request(t.url).post('/api/auth/sign-in').set('X-Forwarded-Proto', 'https').set('Origin', PUBLIC)
      .set('X-Forwarded-For', address).send({ email: 'sm@larkspur.example', password: 'guess' });
    expect((await fail('203.0.113.9')).status).toBe(401);
    expect((await fail('203.0.113.9')).status).toBe(401);
    expect((await fail('203.0.113.9')).status).toBe(429);
    // Another phone behind the same proxy is not blocked by the first one's failures.
    expect((await fail('198.51.100.7')).status).toBe(401);
  });
});
