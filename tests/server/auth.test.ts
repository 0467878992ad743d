import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import { startTestApp, type TestApp } from '../support/app';
import { cookieOf } from '../support/people';
import { io as connect } from 'socket.io-client';

describe('sign-in', () => {
  let t: TestApp;
  beforeAll(async () => { t = await startTestApp(); });
  afterAll(async () => { await t.close(); });

  it('signs in a demo person and answers /api/me with their venue and roles', async () => {
    const agent = request.agent(t.url);
    const res = await agent.post('/api/auth/sign-in').send({ email: 'RAIL@larkspur.example', password: DEMO_PASSWORD });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ email: 'rail@larkspur.example', roles: ['rail'], venue: { name: 'Larkspur Playhouse', units: 'imperial' } });
    const me = await agent.get('/api/me');
    expect(me.status).toBe(200);
    expect(me.body.name).toBe('Jo Castellan');
  });

  it('sets an HttpOnly, SameSite cookie (not Secure outside production)', async () => {
    const res = await request(t.url).post('/api/auth/sign-in').send({ email: 'deck@larkspur.example', password: DEMO_PASSWORD });
    const cookie = (res.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('railcall.sid='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).toMatch(/Expires=/i);
    expect(cookie).not.toMatch(/Secure/i);
  });

  it('gives a new session id at sign-in, and the old one stops working', async () => {
    const first = await request(t.url).post('/api/auth/sign-in').send({ email: 'loader1@larkspur.example', password: DEMO_PASSWORD });
    const oldCookie = cookieOf(first);
    // Signing in again while holding the old cookie must not keep it.
    const second = await request(t.url).post('/api/auth/sign-in').set('Cookie', oldCookie)
      .send({ email: 'loader2@larkspur.example', password: DEMO_PASSWORD });
    const newCookie = cookieOf(second);
    expect(newCookie).not.toBe(oldCookie);
    expect((await request(t.url).get('/api/me').set('Cookie', oldCookie)).status).toBe(401);
    const me = await request(t.url).get('/api/me').set('Cookie', newCookie);
    expect(me.body.email).toBe('loader2@larkspur.example');
  });

  it('signs out: the cookie no longer works', async () => {
    const res = await request(t.url).post('/api/auth/sign-in').send({ email: 'sm@larkspur.example', password: DEMO_PASSWORD });
    const cookie = cookieOf(res);
    expect((await request(t.url).post('/api/auth/sign-out').set('Cookie', cookie)).status).toBe(204);
    const me = await request(t.url).get('/api/me').set('Cookie', cookie);
    expect(me.status).toBe(401);
    expect(me.body.error.code).toBe('unauthenticated');
  });

  it('refuses a wrong password and an unknown account with the same words', async () => {
    const wrong = await request(t.url).post('/api/auth/sign-in').send({ email: 'td@larkspur.example', password: 'not it' });
    const unknown = await request(t.url).post('/api/auth/sign-in').send({ email: 'nobody@larkspur.example', password: 'not it' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body.error.message).toBe(unknown.body.error.message);
  });

  it('stores passwords as Argon2id hashes', async () => {
    const [row] = await t.database.owner.query("SELECT password_hash AS h FROM person WHERE email = 'td@larkspur.example'");
    expect(row.h).toMatch(/^\$argon2id\$/);
  });

  it('sends security headers', async () => {
    const res = await request(t.url).get('/api/me');
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});

describe('sign-in throttling', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp({ config: (c) => ({ ...c, signInThrottle: { windowMs: 60_000, perAccount: 3, perAddress: 6 } }) });
  });
  afterAll(async () => { await t.close(); });

  it('blocks an account after its failed sign-ins, even with the right password', async () => {
    for (let i = 0; i < 3; i++) {
      expect((await request(t.url).post('/api/auth/sign-in').send({ email: 'deck@larkspur.example', password: 'guess' })).status).toBe(401);
    }
    const blocked = await request(t.url).post('/api/auth/sign-in').send({ email: 'deck@larkspur.example', password: DEMO_PASSWORD });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.message).toMatch(/too many failed sign-ins for this account/i);
    // Another account from the same address still gets in: the per-account count is its own.
    expect((await request(t.url).post('/api/auth/sign-in').send({ email: 'rail@larkspur.example', password: DEMO_PASSWORD })).status).toBe(200);
  });

  it('blocks an address after failed sign-ins across accounts', async () => {
    const emails = ['a', 'b', 'c'].map((x) => `${x}@elsewhere.example`);
    for (const email of emails) await request(t.url).post('/api/auth/sign-in').send({ email, password: 'guess' });
    // Three from the test above plus three here: the address has used its six.
    const blocked = await request(t.url).post('/api/auth/sign-in').send({ email: 'sm@larkspur.example', password: DEMO_PASSWORD });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.message).toMatch(/from this device/i);
  });
});

describe('sign-in lifetime', () => {
  let t: TestApp;
  beforeAll(async () => { t = await startTestApp({ config: (c) => ({ ...c, sessionAbsoluteMs: 300 }) }); });
  afterAll(async () => { await t.close(); });

  it('closes a socket when its sign-in reaches the absolute lifetime', async () => {
    const res = await request(t.url).post('/api/auth/sign-in').send({ email: 'deck@larkspur.example', password: DEMO_PASSWORD });
    const socket = connect(t.url, { transports: ['websocket'], reconnection: false, forceNew: true, extraHeaders: { Cookie: cookieOf(res) } });
    const told = new Promise((resolve) => socket.once('auth:signed-out', () => resolve(true)));
    const closed = new Promise((resolve) => socket.once('disconnect', resolve));
    await Promise.race([told, closed]);
    expect(await told).toBe(true);
    await closed;
    socket.close();
  });

  it('ends a sign-in after its absolute lifetime, however active', async () => {
    const res = await request(t.url).post('/api/auth/sign-in').send({ email: 'rail@larkspur.example', password: DEMO_PASSWORD });
    const cookie = cookieOf(res);
    await new Promise((r) => setTimeout(r, 350));
    const me = await request(t.url).get('/api/me').set('Cookie', cookie);
    expect(me.status).toBe(401);
    expect(me.body.error.message).toMatch(/expired/);
  });
});

describe('sign-in idle expiry', () => {
  let t: TestApp;
  // The sign-in store keeps expiry times in whole seconds: a lifetime of 1 s, checked after 2.6 s idle.
  beforeAll(async () => { t = await startTestApp({ config: (c) => ({ ...c, sessionIdleMs: 1000 }) }); });
  afterAll(async () => { await t.close(); });

  it('keeps a sign-in that is used, and ends one left idle past its idle lifetime', async () => {
    const res = await request(t.url).post('/api/auth/sign-in').send({ email: 'loader2@larkspur.example', password: DEMO_PASSWORD });
    const cookie = cookieOf(res);
    // Used every 0.4 s for 2 s (longer than the idle lifetime): each request moves the end out again.
    for (let i = 0; i < 5; i++) {
      await new Promise((r) => setTimeout(r, 400));
      expect((await request(t.url).get('/api/me').set('Cookie', cookie)).status).toBe(200);
    }
    await new Promise((r) => setTimeout(r, 2600));
    const me = await request(t.url).get('/api/me').set('Cookie', cookie);
    expect(me.status).toBe(401);
  });
});
