import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import type { PersonRow } from '@shared/protocol/people';
import { startTestApp, type TestApp } from '../support/app';
import { Phone, openDrapeUnload } from '../support/crew';
import { signedIn, type Agent } from '../support/people';

describe('crew administration', () => {
  let t: TestApp;
  let admin: Agent;
  const idOf = async (email: string): Promise<number> =>
    (await t.database.owner.query('SELECT id FROM person WHERE email = ?', [email]))[0].id;
  beforeAll(async () => {
    t = await startTestApp();
    admin = await signedIn(t.url, 'td@larkspur.example');
  });
  afterAll(async () => { await t.close(); });

  it("edits a person's name and e-mail; they sign in with the new address", async () => {
    const id = await idOf('loader1@larkspur.example');
    const res = await admin.put(`/api/people/${id}`).send({ name: 'Sam Brightwater-Hale', email: 'Sam.Hale@larkspur.example' });
    expect(res.status).toBe(200);
    expect(res.body.person).toMatchObject({ id, name: 'Sam Brightwater-Hale', email: 'sam.hale@larkspur.example', status: 'active' });
    expect((await request(t.url).post('/api/auth/sign-in').send({ email: 'sam.hale@larkspur.example', password: DEMO_PASSWORD })).status).toBe(200);
    expect((await request(t.url).post('/api/auth/sign-in').send({ email: 'loader1@larkspur.example', password: DEMO_PASSWORD })).status).toBe(401);
  });

  it('refuses an e-mail address someone else has, with a field error', async () => {
    const id = await idOf('deck@larkspur.example');
    const res = await admin.put(`/api/people/${id}`).send({ name: 'Robin Ashby', email: 'rail@larkspur.example' });
    expect(res.status).toBe(409);
    expect(res.body.error.fields.email).toEqual(['Already in use']);
    expect((await t.database.owner.query('SELECT email FROM person WHERE id = ?', [id]))[0].email).toBe('deck@larkspur.example');
  });

  it('deactivates a person: signed out everywhere at once, their log entries kept under their name', async () => {
    const rail = await Phone.signIn(t.url, 'rail@larkspur.example');
    const { sessionId } = await openDrapeUnload(t.url, rail.cookie);
    const deck = await Phone.signIn(t.url, 'deck@larkspur.example');
    const deckHttp = await signedIn(t.url, 'deck@larkspur.example');
    await deck.watch(sessionId, 0);
    await deck.must(sessionId, { type: 'join', role: 'deck' });
    const deckId = await idOf('deck@larkspur.example');
    const stored = async () => Number((await t.database.owner.query("SELECT COUNT(*) AS n FROM http_session WHERE JSON_VALUE(data, '$.passport.user') = ?", [String(deckId)]))[0].n);
    expect(await stored()).toBe(2);

    const told = new Promise<void>((resolve) => deck.socket.once('auth:signed-out', () => resolve()));
    const closed = new Promise<void>((resolve) => deck.socket.once('disconnect', () => resolve()));
    const res = await admin.post(`/api/people/${deckId}/deactivate`);
    expect(res.status).toBe(200);
    expect(res.body.person.status).toBe('deactivated');
    await told;
    await closed;
    expect(await stored()).toBe(0);
    expect((await deckHttp.get('/api/me')).status).toBe(401);
    // Told so, with the right password only (tests/server/sign-in-edges.test.ts): nothing signs in.
    const refused = await request(t.url).post('/api/auth/sign-in').send({ email: 'deck@larkspur.example', password: DEMO_PASSWORD });
    expect(refused.status).toBe(403);
    expect(refused.body.error.message).toMatch(/deactivated/);
    // A stale cookie cannot open a socket either.
    await expect(deck.reconnect()).rejects.toBeTruthy();
    // Their entry stays in the log under their name.
    const events = await request(t.url).get(`/api/sessions/${sessionId}/events?after=0`).set('Cookie', rail.cookie);
    expect(events.body.entries.some((e: { personId: number; personName: string }) => e.personId === deckId && e.personName === 'Robin Ashby')).toBe(true);
    // And they stay on the people list, marked.
    const listed = ((await admin.get('/api/people')).body.people as PersonRow[]).find((p) => p.id === deckId)!;
    expect(listed.status).toBe('deactivated');
    rail.close();

    const back = await admin.post(`/api/people/${deckId}/reactivate`);
    expect(back.body.person.status).toBe('active');
    expect((await request(t.url).post('/api/auth/sign-in').send({ email: 'deck@larkspur.example', password: DEMO_PASSWORD })).status).toBe(200);
  });

  it('refuses to deactivate yourself or the last active technical director', async () => {
    const tdId = await idOf('td@larkspur.example');
    expect((await admin.post(`/api/people/${tdId}/deactivate`)).status).toBe(409);
    // A second admin may not switch off the only other one and leave none active... but may while another stays.
    const smId = await idOf('sm@larkspur.example');
    await admin.put(`/api/people/${smId}/roles`).send({ roles: ['stage-manager', 'admin'] });
    const sm = await signedIn(t.url, 'sm@larkspur.example');
    expect((await sm.post(`/api/people/${tdId}/deactivate`)).status).toBe(200);
    // Now sm is the only active admin: taking their admin role away is refused.
    const railId = await idOf('rail@larkspur.example');
    await sm.put(`/api/people/${railId}/roles`).send({ roles: ['rail', 'admin'] });
    await sm.post(`/api/people/${railId}/deactivate`);
    expect((await sm.put(`/api/people/${smId}/roles`).send({ roles: ['stage-manager'] })).status).toBe(409);
    await sm.post(`/api/people/${tdId}/reactivate`);
    await sm.post(`/api/people/${railId}/reactivate`);
    // Deactivation signed the technical director out; back in for what follows.
    expect((await admin.get('/api/me')).status).toBe(401);
    admin = await signedIn(t.url, 'td@larkspur.example');
  });

  it('cannot touch a person of another venue', async () => {
    expect((await admin.put('/api/people/999999').send({ name: 'X', email: 'x@larkspur.example' })).status).toBe(404);
    expect((await admin.post('/api/people/999999/deactivate')).status).toBe(404);
  });
});
