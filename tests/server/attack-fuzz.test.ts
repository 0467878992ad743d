import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import fc from 'fast-check';
import { z } from 'zod';
import { io as connect, type Socket } from 'socket.io-client';
import { CLIENT_EVENTS } from '@shared/protocol/events';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import type { RouteSpec } from '../../server/middleware/routes';
import { EVENT_PAYLOAD_LIMIT } from '../../server/realtime/io';
import { startTestApp, type TestApp } from '../support/app';
import { cookieOf } from '../support/people';
import { openDrapeUnload } from '../support/crew';

/**
 * Routes where a generated value can be valid by chance and changes nothing but the sign-in itself
 * (choosing, with a small number, the venue one already acts on). Everything else must refuse.
 */
const MAY_ACCEPT = new Set(['put /me/venue']);

/** Runs per route part and per event; the totals are printed for the attack counts. */
const HTTP_RUNS = 30;
const SOCKET_RUNS = 150;
const counts = { httpRoutes: 0, httpCases: 0, socketEvents: 0, socketCases: 0, oversize: 0 };

const EMAIL_BY_ROLE: Record<string, string> = {
  admin: 'td@larkspur.example', rail: 'rail@larkspur.example', loader: 'loader1@larkspur.example',
  deck: 'deck@larkspur.example', 'stage-manager': 'sm@larkspur.example',
};

/** Keys the schema knows at the top level, so generated objects reach past "not an object". */
function keysOf(schema: z.ZodType | undefined): string[] {
  return schema instanceof z.ZodObject ? Object.keys(schema.shape) : [];
}

/** Any JSON, or an object with the schema's own keys holding any JSON. */
function inputFor(schema: z.ZodType | undefined): fc.Arbitrary<unknown> {
  const keys = keysOf(schema);
  const shaped = keys.length
    ? fc.dictionary(fc.constantFrom(...keys), fc.jsonValue(), { maxKeys: keys.length })
    : fc.object();
  return fc.oneof(fc.jsonValue(), shaped, fc.object());
}

/** A path with every `:param` filled: an id no row has, so an accidentally valid request writes nothing. */
const fill = (path: string, value = '999999') => `/api${path.replace(/:[A-Za-z]+/g, value)}`;

describe('attack: every route and event refuses bad and oversized input, writes nothing, keeps serving', () => {
  let t: TestApp;
  const cookies: Record<string, string> = {};
  let sessionId: number;
  let phone: Socket;

  /**
   * Checksums of every table but the sign-in store (whose expiry moves on every request) and presence
   * (a valid watch of the real session, which the socket fuzz may hit, notes when the person was seen).
   */
  async function fingerprint(): Promise<string> {
    const tables: { name: string }[] = await t.database.owner.query(
      "SELECT TABLE_NAME AS name FROM information_schema.TABLES WHERE TABLE_SCHEMA = DATABASE() AND TABLE_NAME NOT IN ('http_session', 'session_presence') ORDER BY TABLE_NAME",
    );
    const rows: { Table: string; Checksum: string }[] = await t.database.owner.query(`CHECKSUM TABLE ${tables.map((x) => `\`${x.name}\``).join(', ')}`);
    return rows.map((r) => `${r.Table}=${r.Checksum}`).join(';');
  }

  const cookieFor = (spec: RouteSpec) =>
    'public' in spec.access ? undefined : cookies[spec.access.roles === 'any' ? 'rail' : spec.access.roles[0]];

  function send(spec: RouteSpec, path: string, body?: unknown, query?: Record<string, string>) {
    let req = request(t.url)[spec.method](path);
    const cookie = cookieFor(spec);
    if (cookie) req = req.set('Cookie', cookie);
    if (query) req = req.query(query);
    // Raw JSON text: any JSON value, top-level numbers, strings and booleans included.
    return body === undefined ? req : req.set('Content-Type', 'application/json').send(JSON.stringify(body));
  }

  beforeAll(async () => {
    t = await startTestApp({
      config: (c) => ({ ...c, socketEventsPerSecond: 100_000, signInThrottle: { windowMs: 60_000, perAccount: 100_000, perAddress: 100_000 } }),
    });
    for (const [role, email] of Object.entries(EMAIL_BY_ROLE)) {
      cookies[role] = cookieOf(await request(t.url).post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }));
    }
    ({ sessionId } = await openDrapeUnload(t.url, cookies.rail));
    phone = connect(t.url, { transports: ['websocket'], reconnection: false, forceNew: true, extraHeaders: { Cookie: cookies.loader } });
    await new Promise<void>((resolve) => phone.once('connect', () => resolve()));
  });
  afterAll(async () => {
    phone?.close();
    console.log(`[attack] fuzz: ${counts.httpRoutes} route parts x ${HTTP_RUNS} = ${counts.httpCases} HTTP cases; ` +
      `${counts.socketEvents} events x ${SOCKET_RUNS} = ${counts.socketCases} socket cases; ${counts.oversize} oversized payloads`);
    await t.close();
  });

  it('refuses schema-breaking bodies, queries and addresses on every route that takes them', async () => {
    const before = await fingerprint();
    for (const spec of t.railcall.routes) {
      const { params, query, body } = spec.schemas;
      const parts: Array<[string, fc.Arbitrary<() => ReturnType<typeof send>>]> = [];
      if (body) parts.push(['body', inputFor(body).map((b) => () => send(spec, fill(spec.path), b))]);
      if (query && keysOf(query).length) {
        // Values no number or flag parses from (a query of words where numbers are expected).
        const word = fc.string({ minLength: 1 }).filter((v) => !Number.isFinite(Number(v)));
        const bad = fc.dictionary(fc.constantFrom(...keysOf(query)), word, { minKeys: 1 });
        parts.push(['query', bad.map((q) => () => send(spec, fill(spec.path), undefined, q))]);
      }
      if (params) {
        // Anything but a positive whole number (which would be a valid id).
        const notAnId = (v: string) => !(Number.isInteger(Number(v)) && Number(v) > 0);
        const badId = fc.oneof(fc.string({ minLength: 1 }).filter(notAnId), fc.constantFrom('0', '-1', '1.5', '1e3x', '0x', 'NaN'));
        parts.push(['address', badId.map((id) => () => send(spec, fill(spec.path, encodeURIComponent(id)), {}))]);
      }
      for (const [part, arb] of parts) {
        counts.httpRoutes += 1;
        await fc.assert(fc.asyncProperty(arb, async (go) => {
          counts.httpCases += 1;
          const res = await go();
          const label = `${spec.method} ${spec.path} (${part}) -> ${res.status} ${JSON.stringify(res.body).slice(0, 200)}`;
          if (res.status === 200 && MAY_ACCEPT.has(`${spec.method} ${spec.path}`)) return;
          // 400 bad input; 404 for an id nobody has or a path the address turned into; 401 a wrong sign-in;
          // 429 a throttle of wrong codes (first-run setup) that keeps its own fixed limit.
          expect([400, 401, 404, 429], label).toContain(res.status);
          expect(typeof res.body.error?.message, label).toBe('string');
          if (res.status === 400 && part !== 'address') expect(res.body.error.code, label).toBe('bad-input');
        }), { numRuns: HTTP_RUNS });
      }
    }
    expect(await fingerprint()).toBe(before);
    expect((await request(t.url).get('/api/me').set('Cookie', cookies.rail)).status).toBe(200);
  }, 180_000);

  it('refuses a body over the size limit on every route, and writes nothing', async () => {
    const before = await fingerprint();
    const big = { title: 'x'.repeat(40 * 1024) };
    for (const spec of t.railcall.routes) {
      counts.oversize += 1;
      const res = await send(spec, fill(spec.path, '1'), big);
      expect(res.status, `${spec.method} ${spec.path}`).toBe(400);
      expect(res.body.error.code).toBe('bad-input');
      // A route with a larger limit of its own (an exported record to check) refuses it by its schema.
      if (!spec.path.startsWith('/record/verify')) expect(res.body.error.message).toMatch(/too large/);
    }
    expect(await fingerprint()).toBe(before);
    // The sign-in survived the oversized sign-out: the body was refused before the route ran.
    expect((await request(t.url).get('/api/me').set('Cookie', cookies.rail)).status).toBe(200);
  });

  it('refuses schema-breaking payloads on every socket event, keeping the connection', async () => {
    const before = await fingerprint();
    // Session ids include the real one, so a payload that only gets the id right still meets the rest of the schema.
    const id = fc.oneof(fc.constant(sessionId), fc.jsonValue());
    const payloads = fc.oneof(
      fc.jsonValue(),
      fc.record({ sessionId: id, afterSeq: fc.jsonValue() }, { requiredKeys: [] }),
      fc.record({ sessionId: id, envelope: fc.oneof(fc.jsonValue(), fc.record({ key: fc.jsonValue(), clientTimeMs: fc.jsonValue(), action: fc.jsonValue() }, { requiredKeys: [] })) }, { requiredKeys: [] }),
    );
    for (const event of CLIENT_EVENTS) {
      counts.socketEvents += 1;
      await fc.assert(fc.asyncProperty(payloads, async (payload) => {
        counts.socketCases += 1;
        if (event === 'session:unwatch') {
          phone.emit(event, payload as never);
          return;
        }
        const res = await phone.timeout(5000).emitWithAck(event as 'session:act', payload as never);
        // A watch that only names the real session is a valid read; anything else must be refused.
        if (res.ok) expect(event).toBe('session:watch');
        else expect(['bad-input', 'not-found', 'forbidden']).toContain(res.error.code);
      }), { numRuns: SOCKET_RUNS });
      expect(phone.connected).toBe(true);
    }
    expect(await fingerprint()).toBe(before);
  }, 120_000);

  it('refuses an oversized event with an answer; past the transport limit it closes only that connection', async () => {
    const before = await fingerprint();
    for (const event of ['session:watch', 'session:act'] as const) {
      counts.oversize += 1;
      const res = await phone.emitWithAck(event, { sessionId, padding: 'x'.repeat(EVENT_PAYLOAD_LIMIT) } as never);
      expect(res).toMatchObject({ ok: false, error: { code: 'bad-input' } });
      expect(!res.ok && res.error.message).toMatch(/too large/);
    }
    const victim = connect(t.url, { transports: ['websocket'], reconnection: false, forceNew: true, extraHeaders: { Cookie: cookies.deck } });
    await new Promise<void>((resolve) => victim.once('connect', () => resolve()));
    const closed = new Promise((resolve) => victim.once('disconnect', resolve));
    counts.oversize += 1;
    victim.emit('session:act', { sessionId, padding: 'x'.repeat(70 * 1024) } as never);
    await closed;
    expect(await fingerprint()).toBe(before);
    // The server still serves: the other phone watches, and HTTP answers.
    expect((await phone.emitWithAck('session:watch', { sessionId })).ok).toBe(true);
    expect((await request(t.url).get(`/api/sessions/${sessionId}`).set('Cookie', cookies['stage-manager'])).status).toBe(200);
  });

  it('keeps the log out of reach of the application\'s own database account', async () => {
    const before = await fingerprint();
    // t.db is connected as the application account, exactly as the running server is.
    for (const sql of [
      'UPDATE session_event SET kind = \'forged\' WHERE session_id = ?',
      'DELETE FROM session_event WHERE session_id = ?',
      'TRUNCATE TABLE session_event',
      'ALTER TABLE session_event ADD COLUMN forged INT',
      'DROP TABLE session_event',
      'REPLACE INTO session_event SELECT * FROM session_event WHERE session_id = ?',
      'GRANT UPDATE ON session_event TO CURRENT_USER',
    ]) {
      await expect(t.db.query(sql, [sessionId]), sql).rejects.toThrow(/denied|command denied|access/i);
    }
    expect(await fingerprint()).toBe(before);
  });
});
