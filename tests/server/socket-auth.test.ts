import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { io as connect, type Socket } from 'socket.io-client';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import { startTestApp, type TestApp } from '../support/app';
import { cookieOf, signedIn } from '../support/people';

function open(url: string, cookie?: string): Socket {
  return connect(url, { transports: ['websocket'], reconnection: false, forceNew: true, extraHeaders: cookie ? { Cookie: cookie } : {} });
}

const once = <T = unknown>(socket: Socket, event: string) => new Promise<T>((resolve) => socket.once(event, resolve as never));

describe('Socket.IO sign-in', () => {
  let t: TestApp;
  beforeAll(async () => { t = await startTestApp(); });
  afterAll(async () => { await t.close(); });

  const signIn = async (email: string) => cookieOf(await request(t.url).post('/api/auth/sign-in').send({ email, password: DEMO_PASSWORD }));

  it('refuses a socket without a signed-in person', async () => {
    const socket = open(t.url);
    const error = await once<Error>(socket, 'connect_error');
    expect(error.message).toMatch(/websocket error|401|unauthorized/i);
    expect(socket.connected).toBe(false);
    socket.close();
  });

  it('accepts a socket that carries the sign-in cookie', async () => {
    const socket = open(t.url, await signIn('deck@larkspur.example'));
    await once(socket, 'connect');
    expect(socket.connected).toBe(true);
    socket.close();
  });

  it('tells and disconnects the sockets of a sign-in when it signs out, and only those', async () => {
    const cookie = await signIn('rail@larkspur.example');
    const other = await signIn('rail@larkspur.example');
    const socket = open(t.url, cookie);
    const bystander = open(t.url, other);
    await Promise.all([once(socket, 'connect'), once(bystander, 'connect')]);
    const told = once(socket, 'auth:signed-out');
    const closed = once<string>(socket, 'disconnect');
    expect((await request(t.url).post('/api/auth/sign-out').set('Cookie', cookie)).status).toBe(204);
    await told;
    expect(await closed).toBe('io server disconnect');
    expect(bystander.connected).toBe(true);
    // The ended sign-in cannot open a new socket.
    const again = open(t.url, cookie);
    await once(again, 'connect_error');
    again.close();
    bystander.close();
  });

  it('refuses an action from a socket whose sign-in ended where this server did not hear of it, writes nothing, and closes the socket', async () => {
    // As after a sign-out on another server process while the broadcast between them was down, or an idle
    // expiry: the store no longer holds the sign-in, and this process's sockets were never told.
    const rail = await signedIn(t.url, 'rail@larkspur.example');
    const [set] = await t.database.owner.query("SELECT l.id FROM line_set l JOIN venue v ON v.id = l.venue_id WHERE v.name = 'Larkspur Playhouse' ORDER BY l.number LIMIT 1");
    const sessionId = (await rail.post('/api/sessions').send({ title: 'Ended sign-in', lineSets: [{ lineSetId: set.id, remove: [], add: [] }] })).body.session.id as number;
    const cookie = await signIn('sm@larkspur.example');
    const socket = open(t.url, cookie);
    await once(socket, 'connect');
    const join = (key: string) => socket.emitWithAck('session:act', { sessionId, envelope: { key, clientTimeMs: Date.now(), action: { type: 'join', role: 'stage-manager' } } });
    const [{ n: before }] = await t.database.owner.query('SELECT COUNT(*) AS n FROM session_event WHERE session_id = ?', [sessionId]);

    const sid = decodeURIComponent(cookie.split('=')[1].split(';')[0]).slice(2).split('.')[0];
    const expired = await t.database.owner.query('UPDATE http_session SET expires = ? WHERE session_id = ?', [Math.round(Date.now() / 1000) - 5, sid]);
    expect(expired.affectedRows).toBe(1);
    const told = once(socket, 'auth:signed-out');
    const closed = once<string>(socket, 'disconnect');
    const refused = await join('ended-sign-in-1');
    expect(refused, JSON.stringify(refused)).toMatchObject({ ok: false, error: { code: 'unauthenticated' } });
    await told;
    expect(await closed).toBe('io server disconnect');
    const [{ n: after }] = await t.database.owner.query('SELECT COUNT(*) AS n FROM session_event WHERE session_id = ?', [sessionId]);
    expect(Number(after)).toBe(Number(before));
    expect(await t.database.owner.query('SELECT 1 FROM session_action_key WHERE session_id = ?', [sessionId])).toHaveLength(0);
  });

  it('takes an action from a live sign-in, its sign-in read in the same round trip', async () => {
    const rail = await signedIn(t.url, 'rail@larkspur.example');
    const [set] = await t.database.owner.query("SELECT l.id FROM line_set l JOIN venue v ON v.id = l.venue_id WHERE v.name = 'Larkspur Playhouse' ORDER BY l.number LIMIT 1 OFFSET 1");
    const sessionId = (await rail.post('/api/sessions').send({ title: 'Live sign-in', lineSets: [{ lineSetId: set.id, remove: [], add: [] }] })).body.session.id as number;
    const socket = open(t.url, await signIn('sm@larkspur.example'));
    await once(socket, 'connect');
    const answer = await socket.emitWithAck('session:act', { sessionId, envelope: { key: 'live-sign-in-1', clientTimeMs: Date.now(), action: { type: 'join', role: 'stage-manager' } } });
    expect(answer).toMatchObject({ ok: true });
    expect(socket.connected).toBe(true);
    socket.close();
  });
});
