import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestApp, type TestApp } from '../support/app';
import { signedIn, type Agent } from '../support/people';

describe('people at a venue', () => {
  let t: TestApp;
  let admin: Agent;
  beforeAll(async () => {
    t = await startTestApp();
    admin = await signedIn(t.url, 'td@larkspur.example');
  });
  afterAll(async () => { await t.close(); });

  it('adds a person with a one-time invitation that lets them set a password and sign in', async () => {
    const added = await admin.post('/api/people').send({ name: 'Dee Farrow', email: 'Dee@Larkspur.example', roles: ['loader', 'deck'] });
    expect(added.status).toBe(201);
    expect(added.body.person).toMatchObject({ email: 'dee@larkspur.example', roles: ['loader', 'deck'], active: false });
    const token = added.body.inviteUrl.replace('/welcome/', '');

    const newcomer = request.agent(t.url);
    const accepted = await newcomer.post('/api/auth/accept-invite').send({ token, password: 'rope lock tested' });
    expect(accepted.status).toBe(200);
    expect(accepted.body.roles).toEqual(['loader', 'deck']);
    expect((await newcomer.get('/api/me')).body.name).toBe('Dee Farrow');
    // The link works once.
    expect((await request(t.url).post('/api/auth/accept-invite').send({ token, password: 'another password' })).status).toBe(404);
    expect((await request(t.url).post('/api/auth/sign-in').send({ email: 'dee@larkspur.example', password: 'rope lock tested' })).status).toBe(200);
  });

  it("refuses an e-mail already in this venue's crew (no second account); see people-join.test.ts for other venues' crew", async () => {
    const res = await admin.post('/api/people').send({ name: 'Someone', email: 'rail@larkspur.example', roles: ['deck'] });
    expect(res.status).toBe(409);
    expect(res.body.error.fields.email).toBeDefined();
    expect(Number((await t.database.owner.query("SELECT COUNT(*) AS n FROM person WHERE email = 'rail@larkspur.example'"))[0].n)).toBe(1);
  });

  it('changes roles, and a person who loses a role loses its routes at once', async () => {
    const [row] = await t.database.owner.query("SELECT id FROM person WHERE email = 'sm@larkspur.example'");
    const sm = await signedIn(t.url, 'sm@larkspur.example');
    expect((await sm.get('/api/people')).status).toBe(403);
    expect((await admin.put(`/api/people/${row.id}/roles`).send({ roles: ['stage-manager', 'admin'] })).body.person.roles).toEqual(['admin', 'stage-manager']);
    expect((await sm.get('/api/people')).status).toBe(200);
    await admin.put(`/api/people/${row.id}/roles`).send({ roles: ['stage-manager'] });
    expect((await sm.get('/api/people')).status).toBe(403);
  });

  it('keeps at least one admin at the venue', async () => {
    const [row] = await t.database.owner.query("SELECT id FROM person WHERE email = 'td@larkspur.example'");
    const res = await admin.put(`/api/people/${row.id}/roles`).send({ roles: ['rail'] });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/at least one technical director/);
    expect((await admin.get('/api/me')).body.roles).toEqual(['admin']);
  });
});
