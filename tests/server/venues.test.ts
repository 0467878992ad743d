import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { io as connect, type Socket } from 'socket.io-client';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import { DEFAULT_SETTINGS } from '@shared/protocol/schedule';
import { startTestApp, type TestApp } from '../support/app';
import { addVenueWithPeople, cookieOf, signedIn } from '../support/people';

function open(url: string, cookie: string): Socket {
  return connect(url, { transports: ['websocket'], reconnection: false, forceNew: true, extraHeaders: { Cookie: cookie } });
}
const once = <T = unknown>(socket: Socket, event: string) => new Promise<T>((resolve) => socket.once(event, resolve as never));

describe('a person with roles at more than one venue', () => {
  let t: TestApp;
  let larkspurId: number;
  let quillId: number;
  let railId: number;
  let larkspurSessionId: number;

  beforeAll(async () => {
    t = await startTestApp();
    [{ id: larkspurId }] = await t.database.owner.query("SELECT id FROM venue WHERE name = 'Larkspur Playhouse'");
    ({ venueId: quillId } = await addVenueWithPeople(t.database.owner, 'Quillfield Hall', ['admin']));
    [{ id: railId }] = await t.database.owner.query("SELECT id FROM person WHERE email = 'rail@larkspur.example'");
    // Jo Castellan runs the rail at Larkspur and works the deck at Quillfield Hall.
    await t.database.owner.query("INSERT INTO venue_role (venue_id, person_id, role) VALUES (?, ?, 'deck')", [quillId, railId]);
    const rail = await signedIn(t.url, 'rail@larkspur.example');
    const [set] = await t.database.owner.query('SELECT id FROM line_set WHERE venue_id = ? ORDER BY number LIMIT 1', [larkspurId]);
    const opened = await rail.post('/api/sessions').send({ title: 'Larkspur change', lineSets: [{ lineSetId: set.id, remove: [], add: [] }] });
    larkspurSessionId = opened.body.session.id;
  });
  afterAll(async () => { await t.close(); });

  it('lists every venue with the roles held there, and starts at the first', async () => {
    const me = (await (await signedIn(t.url, 'rail@larkspur.example')).get('/api/me')).body;
    expect(me.venue.id).toBe(larkspurId);
    expect(me.roles).toEqual(['rail']);
    expect(me.venues).toEqual([
      { id: larkspurId, name: 'Larkspur Playhouse', units: 'imperial', timeZone: 'UTC', roles: ['rail'] },
      { id: quillId, name: 'Quillfield Hall', units: 'metric', timeZone: 'UTC', roles: ['deck'] },
    ]);
  });

  it('switches venue: roles, routes and role checks follow the chosen venue', async () => {
    const agent = await signedIn(t.url, 'rail@larkspur.example');
    const res = await agent.put('/api/me/venue').send({ venueId: quillId });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ venue: { id: quillId, name: 'Quillfield Hall' }, roles: ['deck'] });
    expect((await agent.get('/api/venue')).body.venue.name).toBe('Quillfield Hall');
    // A deck hand may not plan a session, though the same person may at Larkspur.
    expect((await agent.post('/api/sessions').send({ title: 'x', lineSets: [] })).status).toBe(403);
    expect((await agent.get(`/api/sessions/${larkspurSessionId}`)).status).toBe(404);
    // Back to Larkspur: the rail operator's own session is there again.
    expect((await agent.put('/api/me/venue').send({ venueId: larkspurId })).body.roles).toEqual(['rail']);
    expect((await agent.get(`/api/sessions/${larkspurSessionId}`)).status).toBe(200);
  });

  it('refuses a venue where the person holds no role, and bad input, with field errors', async () => {
    const agent = await signedIn(t.url, 'deck@larkspur.example');
    const refused = await agent.put('/api/me/venue').send({ venueId: quillId });
    expect(refused.status).toBe(404);
    expect(refused.body.error.fields.venueId).toBeDefined();
    const bad = await agent.put('/api/me/venue').send({ venueId: 'somewhere' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields.venueId).toBeDefined();
    expect((await agent.get('/api/me')).body.venue.id).toBe(larkspurId);
  });

  it('keeps the choice to one sign-in: another device stays where it was', async () => {
    const phone = await signedIn(t.url, 'rail@larkspur.example');
    const laptop = await signedIn(t.url, 'rail@larkspur.example');
    await phone.put('/api/me/venue').send({ venueId: quillId });
    expect((await laptop.get('/api/me')).body.venue.id).toBe(larkspurId);
  });

  it('falls back to a venue still held when the chosen venue takes the roles away', async () => {
    const [{ id: sid }] = await t.database.owner.query("SELECT id FROM person WHERE email = 'sm@larkspur.example'");
    await t.database.owner.query("INSERT INTO venue_role (venue_id, person_id, role) VALUES (?, ?, 'loader')", [quillId, sid]);
    const agent = await signedIn(t.url, 'sm@larkspur.example');
    await agent.put('/api/me/venue').send({ venueId: quillId });
    await t.database.owner.query('DELETE FROM venue_role WHERE venue_id = ? AND person_id = ?', [quillId, sid]);
    const me = (await agent.get('/api/me')).body;
    expect(me.venue.id).toBe(larkspurId);
    expect(me.roles).toEqual(['stage-manager']);
  });

  describe('live connections', () => {
    it("tells the sign-in's other tabs, and their next socket event acts on the chosen venue", async () => {
      const signIn = await request(t.url).post('/api/auth/sign-in').send({ email: 'rail@larkspur.example', password: DEMO_PASSWORD });
      const cookie = cookieOf(signIn);
      const otherCookie = cookieOf(await request(t.url).post('/api/auth/sign-in').send({ email: 'rail@larkspur.example', password: DEMO_PASSWORD }));
      const tab = open(t.url, cookie);
      const elsewhere = open(t.url, otherCookie);
      await Promise.all([once(tab, 'connect'), once(elsewhere, 'connect')]);
      const watched = await tab.emitWithAck('session:watch', { sessionId: larkspurSessionId });
      expect(watched.ok).toBe(true);

      let elsewhereTold = false;
      elsewhere.on('me:venue-changed', () => { elsewhereTold = true; });
      const told = once<{ venue: { id: number } }>(tab, 'me:venue-changed');
      const res = await request(t.url).put('/api/me/venue').set('Cookie', cookie).send({ venueId: quillId });
      expect(res.status).toBe(200);
      expect((await told).venue.id).toBe(quillId);

      // The tab opened before the switch may no longer watch the Larkspur session.
      const again = await tab.emitWithAck('session:watch', { sessionId: larkspurSessionId });
      expect(again).toMatchObject({ ok: false, error: { code: 'not-found' } });
      const acted = await tab.emitWithAck('session:act', {
        sessionId: larkspurSessionId,
        envelope: { key: 'venue-switch-1', clientTimeMs: Date.now(), action: { type: 'join', role: 'rail' } },
      });
      expect(acted).toMatchObject({ ok: false, error: { code: 'not-found' } });
      // The other sign-in was not told and still acts on Larkspur.
      expect(elsewhereTold).toBe(false);
      expect((await elsewhere.emitWithAck('session:watch', { sessionId: larkspurSessionId })).ok).toBe(true);
      tab.close();
      elsewhere.close();
    });
  });

  describe('an action sent first after a venue is chosen elsewhere', () => {
    it('acts on the venue the sign-in chose, even before any other event from this socket', async () => {
      const cookie = cookieOf(await request(t.url).post('/api/auth/sign-in').send({ email: 'rail@larkspur.example', password: DEMO_PASSWORD }));
      expect((await request(t.url).put('/api/me/venue').set('Cookie', cookie).send({ venueId: quillId })).status).toBe(200);
      const tab = open(t.url, cookie);
      await once(tab, 'connect');
      const note = (key: string) => tab.emitWithAck('session:act', {
        sessionId: larkspurSessionId,
        envelope: { key, clientTimeMs: Date.now(), action: { type: 'note', text: 'Checking the venue' } },
      });
      // Opened at Quillfield Hall: the Larkspur session is not this sign-in's.
      expect(await note('venue-first-1')).toMatchObject({ ok: false, error: { code: 'not-found' } });
      // Larkspur chosen in another tab; the first thing this socket sends is the action, and it acts on Larkspur.
      expect((await request(t.url).put('/api/me/venue').set('Cookie', cookie).send({ venueId: larkspurId })).status).toBe(200);
      const back = await note('venue-first-2');
      expect(back, JSON.stringify(back)).toMatchObject({ ok: true });
      // And back to Quillfield Hall: refused again, on the first event.
      expect((await request(t.url).put('/api/me/venue').set('Cookie', cookie).send({ venueId: quillId })).status).toBe(200);
      expect(await note('venue-first-3')).toMatchObject({ ok: false, error: { code: 'not-found' } });
      expect(tab.connected).toBe(true);
      tab.close();
    });
  });

  describe('a technical director opening another venue', () => {
    it('creates it with the default settings, makes them its technical director, and acts on it at once', async () => {
      const td = await signedIn(t.url, 'td@larkspur.example');
      const res = await td.post('/api/venues').send({ name: '  Larkspur Studio ', units: 'metric' });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      const studioId = res.body.venue.id as number;
      expect(res.body).toMatchObject({ venue: { id: studioId, name: 'Larkspur Studio', units: 'metric' }, roles: ['admin'] });
      expect(res.body.venues.map((v: { name: string; roles: string[] }) => `${v.name}: ${v.roles.join(',')}`)).toEqual(['Larkspur Playhouse: admin', 'Larkspur Studio: admin']);
      // The new venue is empty and acted on: settings from the defaults, no schedule, only its director.
      const venue = (await td.get('/api/venue')).body.venue;
      expect(venue).toMatchObject({ id: studioId, name: 'Larkspur Studio', units: 'metric', settings: { ...DEFAULT_SETTINGS, timeZone: expect.any(String) } });
      expect((await td.get('/api/schedule')).body.lineSets).toEqual([]);
      expect((await td.get('/api/people')).body.people.map((p: { email: string }) => p.email)).toEqual(['td@larkspur.example']);
      const history = (await td.get('/api/venue/history')).body.entries;
      expect(history).toHaveLength(1);
      expect(history[0]).toMatchObject({ subject: 'venue', action: 'create', subjectId: studioId, personName: 'Morgan Vale', changes: { name: [null, 'Larkspur Studio'] } });
      // Back to the Playhouse through the menu's switch: its data again, untouched.
      expect((await td.put('/api/me/venue').send({ venueId: larkspurId })).body.venue.id).toBe(larkspurId);
      expect((await td.get('/api/schedule')).body.lineSets.length).toBeGreaterThan(0);
      // The sign-in on another device stays at the Playhouse; the new role is there after its next request.
      const phone = await signedIn(t.url, 'td@larkspur.example');
      expect((await phone.get('/api/me')).body.venues).toHaveLength(2);
    });

    it('is for technical directors only, and refuses bad input with field errors, writing nothing', async () => {
      const count = async () => Number((await t.database.owner.query('SELECT COUNT(*) AS n FROM venue'))[0].n);
      const venues = await count();
      const rail = await signedIn(t.url, 'rail@larkspur.example');
      expect((await rail.post('/api/venues').send({ name: 'Rail Annexe', units: 'imperial' })).status).toBe(403);
      expect((await request(t.url).post('/api/venues').send({ name: 'Nobody Hall', units: 'imperial' })).status).toBe(401);
      const td = await signedIn(t.url, 'td@larkspur.example');
      const bad = await td.post('/api/venues').send({ name: ' ', units: 'cubits' });
      expect(bad.status).toBe(400);
      expect(Object.keys(bad.body.error.fields).sort()).toEqual(['name', 'units']);
      expect(bad.body.error.fields.name).toEqual(['Enter the venue name']);
      expect(await count()).toBe(venues);
      expect((await td.get('/api/me')).body.venue.id).toBe(larkspurId);
    });
  });
});
