import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import type { PersonRow } from '@shared/protocol/people';
import { addVenueWithPeople, signedIn, type Agent } from '../support/people';
import { startMailTestApp, tokenIn, waitForMail } from '../support/mail';

type MailApp = Awaited<ReturnType<typeof startMailTestApp>>;

/** Adding an e-mail that already has an account: freelance crew of two venues, or someone once of this one. */
describe('adding someone who already has an account', () => {
  let m: MailApp;
  let larkspur: Agent;
  let quill: Agent;
  let quillId: number;
  const personBy = async (email: string): Promise<{ id: number; name: string }> =>
    (await m.t.database.owner.query('SELECT id, name FROM person WHERE email = ?', [email]))[0];
  const rolesAt = async (venueId: number, personId: number): Promise<string[]> =>
    (await m.t.database.owner.query('SELECT role FROM venue_role WHERE venue_id = ? AND person_id = ? ORDER BY role', [venueId, personId])).map((r: { role: string }) => r.role);
  const listed = async (agent: Agent, id: number): Promise<PersonRow | undefined> =>
    ((await agent.get('/api/people')).body.people as PersonRow[]).find((p) => p.id === id);

  beforeAll(async () => {
    m = await startMailTestApp();
    larkspur = await signedIn(m.t.url, 'td@larkspur.example');
    const second = await addVenueWithPeople(m.t.database.owner, 'Quillfield Hall', ['admin']);
    quillId = second.venueId;
    quill = await signedIn(m.t.url, second.emails.admin);
  });
  afterAll(async () => { await m.close(); });

  it("gives a Larkspur loader roles at a second venue: both venues list them, a notice is mailed, they switch venue", async () => {
    const loader = await personBy('loader1@larkspur.example');
    const res = await quill.post('/api/people').send({ name: 'A Name Typed Here', email: 'Loader1@Larkspur.example', roles: ['deck', 'loader'] });
    expect(res.status).toBe(201);
    expect(res.body.joinedExisting).toBe(true);
    expect(res.body.inviteUrl).toBeNull();
    // The account keeps its own name; only this venue's roles are answered, nothing of Larkspur.
    expect(res.body.person).toMatchObject({ id: loader.id, name: loader.name, roles: ['loader', 'deck'], status: 'active', invitationMail: null });
    expect(JSON.stringify(res.body)).not.toContain('Larkspur Playhouse');
    expect(res.body.mail).toMatchObject({ kind: 'venue-added', to: 'loader1@larkspur.example' });
    expect((await personBy('loader1@larkspur.example')).name).toBe(loader.name);

    expect((await listed(quill, loader.id))?.roles).toEqual(['loader', 'deck']);
    expect((await listed(larkspur, loader.id))?.roles).toEqual(['loader']);

    const mail = await waitForMail(m.mailbox, (x) => x.to.includes('loader1@larkspur.example'));
    expect(mail.subject).toContain('Quillfield Hall');
    expect(mail.text).toContain('You now hold the roles Loader, Deck crew at Quillfield Hall.');
    expect(mail.text).toContain('pick the venue from the menu');
    expect(mail.text).not.toMatch(/welcome\//);

    const them = await signedIn(m.t.url, 'loader1@larkspur.example');
    expect(((await them.get('/api/me')).body.venues as { name: string }[]).map((v) => v.name)).toEqual(['Larkspur Playhouse', 'Quillfield Hall']);
    const switched = await them.put('/api/me/venue').send({ venueId: quillId });
    expect(switched.status).toBe(200);
    expect(switched.body).toMatchObject({ venue: { name: 'Quillfield Hall' }, roles: ['loader', 'deck'] });
  });

  it('adds back a person whose roles here were all taken away', async () => {
    const deck = await personBy('deck@larkspur.example');
    expect((await larkspur.put(`/api/people/${deck.id}/roles`).send({ roles: [] })).status).toBe(200);
    expect(await listed(larkspur, deck.id)).toBeUndefined();

    const res = await larkspur.post('/api/people').send({ name: 'Robin', email: 'deck@larkspur.example', roles: ['deck', 'rail'] });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ joinedExisting: true, inviteUrl: null, person: { id: deck.id, name: deck.name, roles: ['rail', 'deck'] } });
    const [{ id: larkspurId }] = await m.t.database.owner.query("SELECT id FROM venue WHERE name = 'Larkspur Playhouse'");
    expect(await rolesAt(larkspurId, deck.id)).toEqual(['deck', 'rail']);
    expect((await listed(larkspur, deck.id))?.status).toBe('active');
    const mail = await waitForMail(m.mailbox, (x) => x.to.includes('deck@larkspur.example'));
    expect(mail.text).toContain('You now hold the roles Rail operator, Deck crew at Larkspur Playhouse.');
    // Their password is untouched: they sign in as before.
    expect((await request(m.t.url).post('/api/auth/sign-in').send({ email: 'deck@larkspur.example', password: DEMO_PASSWORD })).status).toBe(200);
  });

  it("refuses someone already in this venue's crew, with the field error on the e-mail", async () => {
    const before = await rolesAt(quillId, (await personBy('loader1@larkspur.example')).id);
    const res = await quill.post('/api/people').send({ name: 'Again', email: 'loader1@larkspur.example', roles: ['admin'] });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/already in this venue's crew/);
    expect(res.body.error.fields.email).toEqual(["Already in this venue's crew"]);
    expect(await rolesAt(quillId, (await personBy('loader1@larkspur.example')).id)).toEqual(before);
  });

  it('refuses a deactivated account and says who can reactivate it', async () => {
    const sm = await personBy('sm@larkspur.example');
    expect((await larkspur.post(`/api/people/${sm.id}/deactivate`)).status).toBe(200);
    const res = await quill.post('/api/people').send({ name: 'Stage manager', email: 'sm@larkspur.example', roles: ['stage-manager'] });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/deactivated/);
    expect(res.body.error.message).toMatch(/Only a technical director of the venue that deactivated it can reactivate it/);
    expect(res.body.error.fields.email).toBeDefined();
    expect(JSON.stringify(res.body)).not.toContain('Larkspur Playhouse');
    expect(await rolesAt(quillId, sm.id)).toEqual([]);
    await larkspur.post(`/api/people/${sm.id}/reactivate`);
  });

  it('gives someone who never signed up a fresh invitation: the old link stops working, the new one works', async () => {
    const email = 'pat.sheave@larkspur.example';
    const first = await larkspur.post('/api/people').send({ name: 'Pat Sheave', email, roles: ['loader'] });
    expect(first.body.joinedExisting).toBe(false);
    const oldToken = first.body.inviteUrl.replace('/welcome/', '');

    const res = await quill.post('/api/people').send({ name: 'Patricia S.', email, roles: ['rail'] });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ joinedExisting: true, person: { name: 'Pat Sheave', roles: ['rail'], status: 'invited' }, mail: { kind: 'invitation' } });
    const newToken = res.body.inviteUrl.replace('/welcome/', '');
    expect(newToken).not.toBe(oldToken);
    const mailed = await waitForMail(m.mailbox, (x) => x.to.includes(email) && x.subject.includes('Quillfield Hall'));
    expect(tokenIn(mailed.text, 'welcome')).toBe(newToken);
    // Each venue's list shows its own invitation mail, never the other venue's.
    expect((await listed(quill, res.body.person.id))?.invitationMail?.subject).toBe('Your Railcall invitation to Quillfield Hall');
    expect((await listed(larkspur, res.body.person.id))?.invitationMail?.subject).toBe('Your Railcall invitation to Larkspur Playhouse');

    expect((await request(m.t.url).post('/api/auth/accept-invite').send({ token: oldToken, password: 'rope lock tested' })).status).toBe(404);
    const agent = request.agent(m.t.url);
    expect((await agent.post('/api/auth/accept-invite').send({ token: newToken, password: 'rope lock tested' })).status).toBe(200);
    const me = (await agent.get('/api/me')).body;
    expect(me.name).toBe('Pat Sheave');
    expect(me.venues.map((v: { name: string; roles: string[] }) => [v.name, v.roles])).toEqual([['Larkspur Playhouse', ['loader']], ['Quillfield Hall', ['rail']]]);
  });
});
