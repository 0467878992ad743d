import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { io as connect, type Socket } from 'socket.io-client';
import { CLIENT_EVENTS } from '@shared/protocol/events';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '@shared/protocol/http';
import type { Role } from '@shared/protocol/roles';
import { startTestApp, type TestApp } from '../support/app';
import { addVenueWithPeople, cookieOf } from '../support/people';
import { openDrapeUnload } from '../support/crew';
import { ROLES } from '../support/access-table';
import { SOCKET_TABLE } from '../support/socket-table';

function open(url: string, cookie?: string, transport: 'websocket' | 'polling' = 'websocket'): Socket {
  return connect(url, { transports: [transport], reconnection: false, forceNew: true, extraHeaders: cookie ? { Cookie: cookie } : {} });
}
const connected = (s: Socket) => new Promise<void>((resolve, reject) => {
  if (s.connected) return resolve();
  s.once('connect', () => resolve());
  s.once('connect_error', reject);
});
const signIn = async (url: string, email: string) =>
  cookieOf(await request(url).post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }));

describe('socket events by role and venue', () => {
  let t: TestApp;
  let sessionId: number;
  const home = {} as Record<Role, Socket>;
  const away = {} as Record<Role, Socket>;

  beforeAll(async () => {
    t = await startTestApp();
    for (const account of DEMO_ACCOUNTS) {
      const role = account.roles[0] as Role;
      if (!home[role]) home[role] = open(t.url, await signIn(t.url, account.email));
    }
    const { emails } = await addVenueWithPeople(t.database.owner, 'Quillfield Hall', ROLES);
    for (const role of ROLES) away[role] = open(t.url, await signIn(t.url, emails[role]));
    await Promise.all([...Object.values(home), ...Object.values(away)].map(connected));
    ({ sessionId } = await openDrapeUnload(t.url, await signIn(t.url, 'rail@larkspur.example')));
  });
  afterAll(async () => {
    for (const s of [...Object.values(home), ...Object.values(away)]) s.close();
    await t.close();
  });

  it('has a row for every event a phone may send', () => {
    expect(Object.keys(SOCKET_TABLE).sort()).toEqual([...CLIENT_EVENTS].sort());
  });

  for (const [event, c] of Object.entries(SOCKET_TABLE)) {
    for (const role of ROLES) {
      it(`${event} as ${role} -> ${c.own[role]}`, async () => {
        expect(await c.send(home[role], { sessionId, role })).toBe(c.own[role]);
        expect(home[role].connected).toBe(true);
      });
      it(`${event} as ${role} of another venue -> ${c.otherVenue}`, async () => {
        expect(await c.send(away[role], { sessionId, role })).toBe(c.otherVenue);
        expect(away[role].connected).toBe(true);
      });
    }
  }

  it('sends another venue no broadcast of the home venue\'s session', async () => {
    const heard: unknown[] = [];
    for (const s of Object.values(away)) s.on('session:entries', (p) => heard.push(p));
    const res = await home.loader.emitWithAck('session:act', {
      sessionId, envelope: { key: `bc-${Date.now()}`, clientTimeMs: Date.now(), action: { type: 'answer-clear' } },
    });
    expect(res.ok === true || res.ok === false).toBe(true);
    await new Promise((r) => setTimeout(r, 200));
    expect(heard).toEqual([]);
  });

  for (const transport of ['websocket', 'polling'] as const) {
    it(`refuses a ${transport} handshake from nobody signed in, for every event alike`, async () => {
      const s = open(t.url, undefined, transport);
      await expect(connected(s)).rejects.toBeTruthy();
      s.close();
    });
  }

  it('refuses an unknown event with an answer and keeps the connection', async () => {
    const res = await home.deck.emitWithAck('session:delete' as never, { sessionId } as never);
    expect(res).toMatchObject({ ok: false, error: { code: 'not-found' } });
    expect(home.deck.connected).toBe(true);
    expect((await home.deck.emitWithAck('session:watch', { sessionId })).ok).toBe(true);
  });
});

describe('a person whose roles change while watching', () => {
  let t: TestApp;
  let sessionId: number;
  let admin: string;
  let deckId: number;
  let deck: Socket;
  beforeAll(async () => {
    t = await startTestApp();
    admin = await signIn(t.url, 'td@larkspur.example');
    ({ sessionId } = await openDrapeUnload(t.url, await signIn(t.url, 'rail@larkspur.example')));
    deck = open(t.url, await signIn(t.url, 'deck@larkspur.example'));
    await connected(deck);
    deckId = (await t.database.owner.query("SELECT id FROM person WHERE email = 'deck@larkspur.example'"))[0].id;
    expect((await deck.emitWithAck('session:watch', { sessionId })).ok).toBe(true);
  });
  afterAll(async () => { deck.close(); await t.close(); });

  const dropped = () => new Promise<{ sessionId: number; reason: string }>((resolve) => deck.once('session:dropped', resolve));

  it('is told the socket left the session, and can watch again with the new roles', async () => {
    const told = dropped();
    expect((await request(t.url).put(`/api/people/${deckId}/roles`).set('Cookie', admin).send({ roles: ['loader'] })).status).toBe(200);
    const event = await told;
    expect(event.sessionId).toBe(sessionId);
    expect(event.reason).toMatch(/roles at this venue changed/);
    expect((await deck.emitWithAck('session:watch', { sessionId })).ok).toBe(true);
  });

  it('is told why when no role is left, and watching again is refused with a sentence', async () => {
    const told = dropped();
    expect((await request(t.url).put(`/api/people/${deckId}/roles`).set('Cookie', admin).send({ roles: [] })).status).toBe(200);
    expect((await told).reason).toMatch(/no longer hold a role/);
    const again = await deck.emitWithAck('session:watch', { sessionId });
    expect(again).toMatchObject({ ok: false, error: { code: 'forbidden' } });
  });
});

describe('per-socket event rate limit', () => {
  let t: TestApp;
  let cookie: string;
  let sessionId: number;
  beforeAll(async () => {
    t = await startTestApp({ config: (c) => ({ ...c, socketEventsPerSecond: 5 }) });
    cookie = await signIn(t.url, 'deck@larkspur.example');
    ({ sessionId } = await openDrapeUnload(t.url, await signIn(t.url, 'rail@larkspur.example')));
  });
  afterAll(async () => { await t.close(); });

  it('answers a burst past the limit with "slow down", keeps the connection, and takes the retry', async () => {
    const s = open(t.url, cookie);
    await connected(s);
    const answers = await Promise.all(Array.from({ length: 12 }, () => s.emitWithAck('session:watch', { sessionId })));
    const slowed = answers.filter((a) => !a.ok && a.error.code === 'too-many-requests');
    expect(answers.filter((a) => a.ok)).toHaveLength(5);
    expect(slowed).toHaveLength(7);
    expect(!slowed[0].ok && slowed[0].error.message).toMatch(/slow down/i);
    expect(s.connected).toBe(true);
    await new Promise((r) => setTimeout(r, 1100));
    expect((await s.emitWithAck('session:watch', { sessionId })).ok).toBe(true);
    s.close();
  });

  it('counts each socket on its own', async () => {
    const [a, b] = [open(t.url, cookie), open(t.url, cookie)];
    await Promise.all([connected(a), connected(b)]);
    await Promise.all(Array.from({ length: 8 }, () => a.emitWithAck('session:watch', { sessionId })));
    expect((await b.emitWithAck('session:watch', { sessionId })).ok).toBe(true);
    a.close();
    b.close();
  });
});
