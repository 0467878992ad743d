import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import type { VenueSessionsChanged } from '@shared/protocol/events';
import { startTestApp, type TestApp } from '../../support/app';
import { demoCrew, openDrapeUnload, Phone } from '../../support/crew';
import { addVenueWithPeople } from '../../support/people';

const settle = () => new Promise((r) => setTimeout(r, 300));

/** Home screens hear at once when a session opens, begins or ends: everyone signed in at that venue, nobody else. */
describe('venue:sessions-changed', () => {
  let t: TestApp;
  let crew: Awaited<ReturnType<typeof demoCrew>>;
  let outsider: Phone;
  const heard = new Map<string, VenueSessionsChanged[]>();
  const listen = (name: string, phone: Phone) => {
    heard.set(name, []);
    phone.socket.on('venue:sessions-changed', (news) => heard.get(name)!.push(news));
  };
  async function waitFor(name: string, count: number): Promise<VenueSessionsChanged[]> {
    const deadline = Date.now() + 3000;
    while (heard.get(name)!.length < count && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
    return heard.get(name)!;
  }

  beforeAll(async () => {
    t = await startTestApp();
    crew = await demoCrew(t.url);
    const { emails } = await addVenueWithPeople(t.database.owner, 'Quillfield Hall', ['rail']);
    outsider = await Phone.signIn(t.url, emails.rail);
    listen('loader', crew.loader1);
    listen('deck', crew.deck);
    listen('rail', crew.rail);
    listen('outsider', outsider);
  });
  afterAll(async () => {
    [...crew.all, outsider].forEach((p) => p.close());
    await t.close();
  });

  it('reaches a second phone of the venue that watches no session when one opens, and not a person of another venue', async () => {
    const { sessionId } = await openDrapeUnload(t.url, crew.rail.cookie);
    expect(await waitFor('loader', 1)).toEqual([{ sessionId, change: 'opened' }]);
    expect(await waitFor('rail', 1)).toEqual([{ sessionId, change: 'opened' }]);
    await settle();
    expect(heard.get('outsider')).toEqual([]);
  });

  it('says when it begins and when it ends, and stops reaching a person whose roles at the venue were removed', async () => {
    const sessionId = heard.get('loader')![0].sessionId;
    for (const [phone, role] of [[crew.loader1, 'loader'], [crew.loader2, 'loader'], [crew.deck, 'deck']] as const) await phone.must(sessionId, { type: 'join', role });
    await crew.rail.must(sessionId, { type: 'begin' });
    expect((await waitFor('loader', 2))[1]).toEqual({ sessionId, change: 'began' });
    expect((await waitFor('deck', 2))[1]).toEqual({ sessionId, change: 'began' });

    const [deck] = await t.database.owner.query("SELECT id FROM person WHERE email = 'deck@larkspur.example'");
    const td = request.agent(t.url);
    await td.post('/api/auth/sign-in').send({ email: 'td@larkspur.example', password: 'larkspur-demo' });
    expect((await td.put(`/api/people/${deck.id}/roles`).send({ roles: [] })).status).toBe(200);
    await settle();

    await crew.rail.must(sessionId, { type: 'note', text: 'Calling it off' });
    await crew.rail.must(sessionId, { type: 'end', reason: 'Rehearsal called off' });
    expect((await waitFor('loader', 3))[2]).toEqual({ sessionId, change: 'ended' });
    await settle();
    expect(heard.get('deck')).toHaveLength(2);
    expect(heard.get('outsider')).toEqual([]);
    // Notes and other taps change no list: nothing more was said.
    expect(heard.get('loader')).toHaveLength(3);
  });
});
