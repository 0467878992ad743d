import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { DEMO_ACCOUNTS } from '@shared/protocol/http';
import type { Role } from '@shared/protocol/roles';
import { startTestApp, type TestApp } from '../support/app';
import { addVenueWithPeople, signedIn, type Agent } from '../support/people';

type Who = 'nobody' | Role;
const WHO: Who[] = ['nobody', 'admin', 'rail', 'loader', 'deck', 'stage-manager'];
const EVERYONE: Who[] = ['admin', 'rail', 'loader', 'deck', 'stage-manager'];

let counter = 0;
interface Case {
  /** Who gets through; everyone else gets 401 (nobody) or 403. */
  allowed: Who[];
  okStatus: number;
  /** A request that is valid when allowed. */
  send(agent: Agent, ctx: { personId: number }): request.Test;
}

/** Every API route: the test fails when a route exists that this table does not list. */
const TABLE: Record<string, Case> = {
  'post /auth/sign-in': {
    allowed: WHO, okStatus: 401, // public; a wrong password answers 401 for everyone alike
    send: (a) => a.post('/api/auth/sign-in').send({ email: `nobody${++counter}@larkspur.example`, password: 'x' }),
  },
  'post /auth/sign-out': { allowed: WHO, okStatus: 204, send: (a) => a.post('/api/auth/sign-out') },
  'post /auth/accept-invite': {
    allowed: WHO, okStatus: 404, // public; an unknown token is simply not found
    send: (a) => a.post('/api/auth/accept-invite').send({ token: 'x'.repeat(43), password: 'a long enough password' }),
  },
  'get /me': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/me') },
  'get /people': { allowed: ['admin'], okStatus: 200, send: (a) => a.get('/api/people') },
  'post /people': {
    allowed: ['admin'], okStatus: 201,
    send: (a) => a.post('/api/people').send({ name: 'New Hand', email: `new${++counter}@larkspur.example`, roles: ['deck'] }),
  },
  'put /people/:id/roles': {
    allowed: ['admin'], okStatus: 200,
    send: (a, { personId }) => a.put(`/api/people/${personId}/roles`).send({ roles: ['deck'] }),
  },
  'get /venue': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/venue') },
  'get /schedule': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/schedule') },
};

describe('API access by role and venue', () => {
  let t: TestApp;
  const agents = {} as Record<Who, Agent>;
  let deckPersonId: number;

  beforeAll(async () => {
    t = await startTestApp();
    agents.nobody = request.agent(t.url);
    for (const account of DEMO_ACCOUNTS) {
      const role = account.roles[0] as Role;
      agents[role] ??= await signedIn(t.url, account.email);
    }
    const [deck] = await t.database.owner.query("SELECT id FROM person WHERE email = 'deck@larkspur.example'");
    deckPersonId = deck.id;
  });
  afterAll(async () => { await t.close(); });

  it('lists every route of the app in the table', () => {
    const routes = t.railcall.routes.map((r) => `${r.method} ${r.path}`).sort();
    expect(routes).toEqual(Object.keys(TABLE).sort());
  });

  for (const [key, c] of Object.entries(TABLE)) {
    for (const who of WHO) {
      // Sign-out would end the shared agents' sign-ins: it is checked with fresh ones below.
      if (key === 'post /auth/sign-out') continue;
      const expected = c.allowed.includes(who) ? c.okStatus : who === 'nobody' ? 401 : 403;
      it(`${key} as ${who} -> ${expected}`, async () => {
        const res = await c.send(agents[who], { personId: deckPersonId });
        expect(res.status, JSON.stringify(res.body)).toBe(expected);
        if (expected === 401 || expected === 403) expect(res.body.error.code).toBe(expected === 401 ? 'unauthenticated' : 'forbidden');
      });
    }
  }

  it('post /auth/sign-out -> 204 for anyone', async () => {
    for (const who of WHO) {
      const agent = who === 'nobody' ? request.agent(t.url) : await signedIn(t.url, DEMO_ACCOUNTS.find((a) => a.roles[0] === who)!.email);
      expect((await TABLE['post /auth/sign-out'].send(agent, { personId: 0 })).status).toBe(204);
    }
  });

  it('answers an unknown API route with a JSON 404', async () => {
    const res = await agents.admin.get('/api/nothing-here');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not-found');
  });

  describe('another venue', () => {
    let other: Agent;
    let otherAdminId: number;
    beforeAll(async () => {
      const { emails } = await addVenueWithPeople(t.database.owner, 'Quillfield Hall', ['admin', 'rail']);
      other = await signedIn(t.url, emails.admin);
      const [row] = await t.database.owner.query('SELECT id FROM person WHERE email = ?', [emails.admin]);
      otherAdminId = row.id;
    });

    it('sees only its own people, venue and schedule', async () => {
      const people = await other.get('/api/people');
      expect(people.body.people.map((p: { email: string }) => p.email)).toEqual(['admin@venue2.example', 'rail@venue2.example'].sort());
      expect((await other.get('/api/venue')).body.venue.name).toBe('Quillfield Hall');
      expect((await other.get('/api/schedule')).body.lineSets).toEqual([]);
    });

    it('cannot change roles of a person at another venue, either way', async () => {
      expect((await other.put(`/api/people/${deckPersonId}/roles`).send({ roles: ['admin'] })).status).toBe(404);
      expect((await agents.admin.put(`/api/people/${otherAdminId}/roles`).send({ roles: [] })).status).toBe(404);
      const [row] = await t.database.owner.query('SELECT COUNT(*) AS n FROM venue_role WHERE person_id = ?', [otherAdminId]);
      expect(Number(row.n)).toBe(1);
    });
  });
});
