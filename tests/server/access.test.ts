import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import sharp from 'sharp';
import type { Express } from 'express';
import { DEMO_ACCOUNTS } from '@shared/protocol/http';
import { LINE_SET_FIELDS } from '../../server/features/schedule/schedule-edit.service';
import type { Role } from '@shared/protocol/roles';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { startTestApp, type TestApp } from '../support/app';
import { addVenueWithPeople, signedIn, type Agent } from '../support/people';
import { ACCESS_TABLE, expectedStatus, ROLES, WHO, type AccessCtx, type Who } from '../support/access-table';

let counter = 0;
const TABLE = ACCESS_TABLE;

/**
 * Every route Express itself would answer under /api, as "method /path" (the path below /api), walked
 * from the app's own router: a route added beside the route specs is caught too.
 */
function expressRoutes(app: Express): string[] {
  const found: string[] = [];
  type Layer = { rawPath?: unknown; route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: Layer[] } };
  const walk = (stack: Layer[], prefix: string) => {
    for (const layer of stack) {
      if (layer.route) {
        const path = `${prefix}${layer.route.path}`;
        for (const [method, on] of Object.entries(layer.route.methods)) if (on && method !== '_all') found.push(`${method} ${path}`);
      } else if (layer.handle?.stack) {
        walk(layer.handle.stack, `${prefix}${typeof layer.rawPath === 'string' && layer.rawPath !== '/' ? layer.rawPath : ''}`);
      }
    }
  };
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, '');
  return found.filter((r) => r.split(' ')[1].startsWith('/api/')).map((r) => r.replace(' /api/', ' /'));
}

describe('API access by role and venue', () => {
  let t: TestApp;
  const agents = {} as Record<Who, Agent>;
  let deckPersonId: number;
  let sessionId: number;
  let freeLineSets: number[];
  let brickTypeId: number;
  let watchedLineSet: number;
  let larkspurId: number;
  let anyLineSet: number;
  let invitedId: number;
  let spareId: number;
  // The development-only mailbox routes exist when a fake mail server's folder is set.
  const mailboxDir = mkdtempSync(join(tmpdir(), 'railcall-access-mail-'));

  beforeAll(async () => {
    // Every row sends its failed sign-ins, unknown tokens and wrong codes from one address, as each role of
    // two venues: more than the per-address throttle lets through (the throttle is tested in auth.test.ts).
    t = await startTestApp({ config: (c) => ({ ...c, mail: { ...c.mail, mailboxDir }, signInThrottle: { ...c.signInThrottle, perAddress: 10_000 } }) });
    agents.nobody = request.agent(t.url);
    for (const account of DEMO_ACCOUNTS) {
      const role = account.roles[0] as Role;
      agents[role] ??= await signedIn(t.url, account.email);
    }
    const [deck] = await t.database.owner.query("SELECT id FROM person WHERE email = 'deck@larkspur.example'");
    const [larkspur] = await t.database.owner.query("SELECT id FROM venue WHERE name = 'Larkspur Playhouse'");
    larkspurId = larkspur.id;
    deckPersonId = deck.id;
    const sets = await t.database.owner.query('SELECT id FROM line_set ORDER BY number');
    freeLineSets = sets.map((r: { id: number }) => r.id);
    anyLineSet = freeLineSets[0];
    watchedLineSet = freeLineSets.pop()!;
    const opened = await agents.rail.post('/api/sessions').send({ title: 'Watched', lineSets: [{ lineSetId: watchedLineSet, remove: [], add: [] }] });
    sessionId = opened.body.session.id;
    const [venue] = await t.database.owner.query('SELECT id FROM venue ORDER BY id LIMIT 1');
    const brick = await t.database.owner.query("INSERT INTO brick_type (venue_id, code, name, mass_kg) VALUES (?, 'access', 'Access brick', 4)", [venue.id]);
    brickTypeId = brick.insertId;
    invitedId = (await agents.admin.post('/api/people').send({ name: 'Invited Hand', email: 'invited@larkspur.example', roles: ['deck'] })).body.person.id;
    spareId = (await agents.admin.post('/api/people').send({ name: 'Spare Hand', email: 'spare@larkspur.example', roles: ['loader'] })).body.person.id;
  });
  const lineSet: AccessCtx['lineSet'] = async (number) => {
    const res = await agents.admin.get('/api/schedule');
    const ls = res.body.lineSets.find((l: { number: number }) => l.number === number);
    return { id: ls.id, version: ls.version, fields: Object.fromEntries(LINE_SET_FIELDS.map((f) => [f, ls[f]])), pieceIds: ls.pieces.map((p: { id: number }) => p.id) };
  };
  const scratch: AccessCtx['scratch'] = async (kind) => {
    const owner = t.database.owner;
    const [venue] = await owner.query('SELECT id FROM venue ORDER BY id LIMIT 1');
    if (kind === 'brick-type') return (await owner.query('INSERT INTO brick_type (venue_id, code, name, mass_kg) VALUES (?, ?, ?, 1)', [venue.id, `x${++counter}`, 'Scratch'])).insertId;
    if (kind === 'photo') {
      const added = await agents.admin.post(`/api/line-sets/${watchedLineSet}/photos`).attach('photo', await sharp({ create: { width: 8, height: 8, channels: 3, background: '#336699' } }).png().toBuffer(), 'gone.png');
      return added.body.photo.id as number;
    }
    if (kind === 'piece') {
      const [ls] = await owner.query('SELECT id FROM line_set WHERE number = 30');
      return (await owner.query("INSERT INTO piece (line_set_id, name, mass_kg) VALUES (?, 'Scratch', 1)", [ls.id])).insertId;
    }
    return (await owner.query(`INSERT INTO line_set (venue_id, number, name, purchase, pipe_size, pipe_length_m, pipe_kg_per_m, pipe_kg, lift_lines_m,
      lift_line_rating_kg, batten_rating_kg_per_m, arbor_kg, arbor_capacity_kg, bricks) VALUES (?, ?, 'Scratch', 1, '', 10, 4, 40, '[1, 9]', 200, 30, 30, 500, '{}')`,
    [venue.id, 500 + ++counter])).insertId;
  };
  const ctx = (who: Who): AccessCtx => ({ personId: deckPersonId, invitedId, spareId, sessionId, lineSetId: watchedLineSet, who, venueId: larkspurId, freeLineSet: () => freeLineSets.pop()!, lineSet, scratch, brickTypeId });
  afterAll(async () => {
    await t.close();
    rmSync(mailboxDir, { recursive: true, force: true });
  });

  it('lists every route of the app in the table, from the route specs and from Express itself', () => {
    const fromSpecs = t.railcall.routes.map((r) => `${r.method} ${r.path}`).sort();
    const fromExpress = [...new Set(expressRoutes(t.railcall.app))].sort();
    expect(fromSpecs).toEqual(Object.keys(TABLE).sort());
    expect(fromExpress).toEqual(Object.keys(TABLE).sort());
  });

  /** One request as one person: the status the table expects, and a refusal with its code. */
  const check = async (key: string, agent: Agent, who: Who, venue: 'own' | 'other', c = TABLE[key]) => {
    const expected = expectedStatus(c, who, venue);
    // From another venue any Larkspur line set will do: none of them may be planned there.
    const res = await c.send(agent, venue === 'own' ? ctx(who) : { ...ctx(who), freeLineSet: () => anyLineSet });
    expect(res.status, `${key} as ${who} (${venue} venue): ${JSON.stringify(res.body)}`).toBe(expected);
    if (expected === 401 || expected === 403) expect(res.body.error.code).toBe(expected === 401 ? 'unauthenticated' : 'forbidden');
  };

  for (const [key, c] of Object.entries(TABLE)) {
    for (const who of WHO) {
      // Sign-out would end the shared agents' sign-ins: it is checked with fresh ones below.
      if (key === 'post /auth/sign-out') continue;
      it(`${key} as ${who === 'nobody' ? 'nobody signed in' : `${who} of Larkspur`} -> ${expectedStatus(c, who, 'own')}`, () => check(key, agents[who], who, 'own'));
    }
  }

  it('post /auth/sign-out -> 204 for anyone', async () => {
    for (const who of WHO) {
      const agent = who === 'nobody' ? request.agent(t.url) : await signedIn(t.url, DEMO_ACCOUNTS.find((a) => a.roles[0] === who)!.email);
      expect((await TABLE['post /auth/sign-out'].send(agent, ctx(who))).status).toBe(204);
    }
  });

  it('answers an unknown API route with a JSON 404', async () => {
    const res = await agents.admin.get('/api/nothing-here');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not-found');
  });

  describe('another venue', () => {
    /** One person per role at Quillfield Hall, each sending every route with Larkspur's ids. */
    const others = {} as Record<Role, Agent>;
    let otherEmails: Record<Role, string>;
    let other: Agent;
    let otherAdminId: number;
    let otherVenueId: number;
    beforeAll(async () => {
      const { emails, venueId } = await addVenueWithPeople(t.database.owner, 'Quillfield Hall', ROLES);
      otherEmails = emails;
      otherVenueId = venueId;
      for (const role of ROLES) others[role] = await signedIn(t.url, emails[role]);
      other = others.admin;
      const [row] = await t.database.owner.query('SELECT id FROM person WHERE email = ?', [emails.admin]);
      otherAdminId = row.id;
    });

    it('sees only its own people, venue and schedule', async () => {
      const people = await other.get('/api/people');
      expect(people.body.people.map((p: { email: string }) => p.email).sort()).toEqual(ROLES.map((r) => otherEmails[r]).sort());
      expect((await other.get('/api/venue')).body.venue.name).toBe('Quillfield Hall');
      expect((await other.get('/api/schedule')).body.lineSets).toEqual([]);
    });

    for (const [key, c] of Object.entries(TABLE)) {
      // First-run setup knows no venue; sign-out is checked below with fresh sign-ins.
      if (c.noVenue || key === 'post /auth/sign-out') continue;
      for (const role of ROLES) {
        it(`${key} as ${role} of another venue, with Larkspur ids -> ${expectedStatus(c, role, 'other')}`, () => check(key, others[role], role, 'other'));
      }
    }

    it('post /auth/sign-out -> 204 for every role of another venue', async () => {
      for (const role of ROLES) {
        const agent = await signedIn(t.url, otherEmails[role]);
        expect((await TABLE['post /auth/sign-out'].send(agent, ctx(role))).status).toBe(204);
        expect((await agent.get('/api/me')).status).toBe(401);
      }
    });

    it('cannot change roles of a person at another venue, either way', async () => {
      expect((await other.put(`/api/people/${deckPersonId}/roles`).send({ roles: ['admin'] })).status).toBe(404);
      expect((await agents.admin.put(`/api/people/${otherAdminId}/roles`).send({ roles: [] })).status).toBe(404);
      // Their role at Quillfield Hall is untouched (the venues they opened from the table's POST /venues row aside).
      const [row] = await t.database.owner.query('SELECT COUNT(*) AS n FROM venue_role WHERE person_id = ? AND venue_id = ?', [otherAdminId, otherVenueId]);
      expect(Number(row.n)).toBe(1);
    });

    it("cannot read another venue's record: its sessions, reports, checks and line sets are not found", async () => {
      expect((await other.get('/api/record/sessions')).body.sessions).toEqual([]);
      for (const path of [`/report`, `/report.pdf`, `/report.csv`, `/check`]) {
        expect((await other.get(`/api/record/sessions/${sessionId}${path}`)).status).toBe(404);
      }
      expect((await other.get(`/api/record/line-sets/${watchedLineSet}`)).status).toBe(404);
    });

    describe('a person at both venues who chose the other one', () => {
      let both: Agent;
      beforeAll(async () => {
        // The Larkspur rail operator also works the deck at Quillfield Hall and switches there.
        const [quill] = await t.database.owner.query("SELECT id FROM venue WHERE name = 'Quillfield Hall'");
        const [rail] = await t.database.owner.query("SELECT id FROM person WHERE email = 'rail@larkspur.example'");
        await t.database.owner.query("INSERT INTO venue_role (venue_id, person_id, role) VALUES (?, ?, 'admin')", [quill.id, rail.id]);
        both = await signedIn(t.url, 'rail@larkspur.example');
        const chosen = await both.put('/api/me/venue').send({ venueId: quill.id });
        expect(chosen.status, JSON.stringify(chosen.body)).toBe(200);
      });

      it('acts on the chosen venue on the routes without an id', async () => {
        expect((await both.get('/api/me')).body.venue.name).toBe('Quillfield Hall');
        expect((await both.get('/api/venue')).body.venue.name).toBe('Quillfield Hall');
        expect((await both.get('/api/schedule')).body.lineSets).toEqual([]);
        expect((await both.get('/api/sessions')).body.sessions).toEqual([]);
        expect((await both.get('/api/people')).body.people.map((p: { email: string }) => p.email)).not.toContain('deck@larkspur.example');
      });

      // Choosing Larkspur back is allowed for this person (tests/server/venues.test.ts): the one route not refused.
      for (const [key, c] of Object.entries(TABLE)) {
        if (c.noVenue || key === 'post /auth/sign-out' || key === 'put /me/venue') continue;
        it(`${key} with Larkspur ids, as a person of both venues acting on the other -> ${expectedStatus(c, 'admin', 'other')}`, () => check(key, both, 'admin', 'other'));
      }
    });

    it('cannot edit, deactivate or invite a person at another venue, nor mail its session report', async () => {
      expect((await other.put(`/api/people/${deckPersonId}`).send({ name: 'Taken Over', email: 'taken@venue2.example' })).status).toBe(404);
      expect((await other.post(`/api/people/${deckPersonId}/deactivate`)).status).toBe(404);
      expect((await other.post(`/api/people/${invitedId}/invitation`)).status).toBe(404);
      expect((await other.delete(`/api/people/${invitedId}/invitation`)).status).toBe(404);
      expect((await other.post(`/api/sessions/${sessionId}/report-mail`).send({ addresses: ['x@venue2.example'] })).status).toBe(404);
      const recipients = (await other.get('/api/mail/recipients')).body.people.map((p: { email: string }) => p.email);
      expect(recipients).not.toContain('deck@larkspur.example');
      expect((await other.get('/api/mail/outbox')).body.messages.every((x: { to: string }) => !x.to.endsWith('@larkspur.example'))).toBe(true);
      const [deck] = await t.database.owner.query('SELECT name, deactivated_at FROM person WHERE id = ?', [deckPersonId]);
      expect(deck).toEqual({ name: 'Robin Ashby', deactivated_at: null });
    });
  });
});
