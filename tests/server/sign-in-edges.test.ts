import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import { startTestApp, type TestApp } from '../support/app';
import { signedIn, type Agent } from '../support/people';
import { Phone } from '../support/crew';

const WRONG = 'E-mail or password is wrong.';

describe('sign-in edges', () => {
  let t: TestApp;
  let admin: Agent;
  const signIn = (email: string, password: string) => request(t.url).post('/api/auth/sign-in').send({ email, password });
  const idOf = async (email: string) => ((await t.database.owner.query('SELECT id FROM person WHERE email = ?', [email])) as { id: number }[])[0].id;

  beforeAll(async () => {
    t = await startTestApp();
    admin = await signedIn(t.url, 'td@larkspur.example');
  });
  afterAll(async () => { await t.close(); });

  it('answers every API request with Cache-Control: no-store, so Back after a sign-out cannot show a kept answer', async () => {
    const deck = await signedIn(t.url, 'rail@larkspur.example');
    for (const path of ['/api/me', '/api/schedule', '/api/sessions']) expect((await deck.get(path)).headers['cache-control'], path).toBe('no-store');
    expect((await request(t.url).get('/api/me')).headers['cache-control']).toBe('no-store');
  });

  describe('a person whose roles were all removed', () => {
    it('is signed out on their next request, and told at sign-in that they hold no role at this venue', async () => {
      const deck = await signedIn(t.url, 'deck@larkspur.example');
      const phone = await Phone.signIn(t.url, 'deck@larkspur.example');
      const told = new Promise<string>((resolve) => phone.socket.once('me:roles-changed', ({ reason }) => resolve(reason)));
      expect((await admin.put(`/api/people/${await idOf('deck@larkspur.example')}/roles`).send({ roles: [] })).status).toBe(200);
      // The open phone is told at once, in words it can show on the sign-in page.
      expect(await told).toMatch(/you hold no role at this venue any more/);
      phone.close();
      expect((await deck.get('/api/me')).status).toBe(401);

      const res = await signIn('deck@larkspur.example', DEMO_PASSWORD);
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
      expect(res.body.error.message).toMatch(/you hold no role at this venue/);
      expect(res.headers['set-cookie'] ?? []).not.toEqual(expect.arrayContaining([expect.stringMatching(/railcall/i)]));
    });

    it('with a wrong password reads exactly as an unknown e-mail: nothing tells whether the account exists', async () => {
      const wrong = await signIn('deck@larkspur.example', 'not the password');
      const unknown = await signIn('nobody-here@larkspur.example', 'not the password');
      expect([wrong.status, unknown.status]).toEqual([401, 401]);
      expect(wrong.body).toEqual(unknown.body);
      expect(wrong.body.error.message).toBe(WRONG);
    });

    it('signs in again once a role is given back', async () => {
      // Written as the owner: a person with no role here is no longer on the venue's people page.
      const [venue] = await t.database.owner.query('SELECT id FROM venue LIMIT 1') as { id: number }[];
      await t.database.owner.query("INSERT INTO venue_role (venue_id, person_id, role) VALUES (?, ?, 'deck')", [venue.id, await idOf('deck@larkspur.example')]);
      expect((await signIn('deck@larkspur.example', DEMO_PASSWORD)).status).toBe(200);
    });
  });

  it('tells a deactivated person so only after the right password', async () => {
    expect((await admin.post(`/api/people/${await idOf('loader2@larkspur.example')}/deactivate`)).status).toBe(200);
    const right = await signIn('loader2@larkspur.example', DEMO_PASSWORD);
    expect(right.status).toBe(403);
    expect(right.body.error.message).toMatch(/deactivated/);
    const wrong = await signIn('loader2@larkspur.example', 'not the password');
    expect(wrong.status).toBe(401);
    expect(wrong.body.error.message).toBe(WRONG);
  });

  describe('a short or garbled link', () => {
    let token: string;
    beforeAll(async () => {
      const added = await admin.post('/api/people').send({ name: 'Lee Ostrander', email: 'lee@larkspur.example', roles: ['loader'] });
      token = added.body.inviteUrl.replace('/welcome/', '');
    });

    it('is refused with a field error on the token before anything is looked up, and the real link still works', async () => {
      const garbled = [token.slice(0, 20), token.slice(0, -1), `${token.slice(0, -1)}!`, `${token}x`, ''];
      for (const bad of garbled) {
        const res = await request(t.url).post('/api/auth/accept-invite').send({ token: bad, password: 'arbor locked and tied' });
        expect(res.status, bad).toBe(400);
        expect(res.body.error.fields.token).toEqual(['This link is cut short or garbled']);
        expect(res.body.error.message).toMatch(/token/);
      }
      const [row] = await t.database.owner.query("SELECT password_hash AS hash, invite_token_hash AS invite FROM person WHERE email = 'lee@larkspur.example'") as { hash: string | null; invite: string | null }[];
      expect(row.hash).toBeNull();
      expect(row.invite).not.toBeNull();
      expect((await request(t.url).post('/api/auth/accept-invite').send({ token, password: 'arbor locked and tied' })).status).toBe(200);
    });

    it('of a password reset is refused the same way', async () => {
      const res = await request(t.url).post('/api/auth/reset-password').send({ token: 'abc', password: 'arbor locked and tied' });
      expect(res.status).toBe(400);
      expect(res.body.error.fields.token).toEqual(['This link is cut short or garbled']);
    });
  });
});
