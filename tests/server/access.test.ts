import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import sharp from 'sharp';
import { DEMO_ACCOUNTS } from '@shared/protocol/http';
import { DEFAULT_SETTINGS } from '@shared/protocol/schedule';
import { csvHeaders } from '@shared/protocol/schedule-csv';
import { LINE_SET_FIELDS } from '../../server/features/schedule/schedule-edit.service';
import type { Role } from '@shared/protocol/roles';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { startTestApp, type TestApp } from '../support/app';
import { addVenueWithPeople, signedIn, type Agent } from '../support/people';

type Who = 'nobody' | Role;
const WHO: Who[] = ['nobody', 'admin', 'rail', 'loader', 'deck', 'stage-manager'];
const EVERYONE: Who[] = ['admin', 'rail', 'loader', 'deck', 'stage-manager'];

let counter = 0;
/** A real 8 x 8 PNG for the upload routes. */
const SMALL_PNG = await sharp({ create: { width: 8, height: 8, channels: 3, background: '#336699' } }).png().toBuffer();
interface Ctx {
  personId: number;
  /** Invited, not signed up: for invitation routes. */
  invitedId: number;
  /** Invited too: deactivated and reactivated here. */
  spareId: number;
  sessionId: number;
  /** A line set no session holds yet, for each session opened here. */
  freeLineSet(): number;
  /** A line set of the venue (the one the watched session holds). */
  lineSetId: number;
  who: Who;
  /** A line set as it is now: its id, version and editable fields (read fresh for each request). */
  lineSet(number: number): Promise<{ id: number; version: number; fields: Record<string, unknown>; pieceIds: number[] }>;
  /** A throwaway row made for a delete: a line set, a piece on line set 30, or a brick type. */
  scratch(kind: 'line-set' | 'piece' | 'brick-type'): Promise<number>;
  brickTypeId: number;
  /** The Larkspur Playhouse, where every signed-in agent of the table works. */
  venueId: number;
}
interface Case {
  /** Who gets through; everyone else gets 401 (nobody) or 403. */
  allowed: Who[];
  okStatus: number;
  /** Where the route lets someone in but the session's own rules answer otherwise. */
  otherwise?: Partial<Record<Who, number>>;
  /** A request that is valid when allowed. */
  send(agent: Agent, ctx: Ctx): request.Test | Promise<request.Response>;
  /**
   * Sent with this venue's ids by someone acting on another venue: the status expected, or 'own' when
   * the route carries no id of this venue and answers about the caller's own venue (checked apart).
   * Default: 404 for a path with an id, 'own' otherwise.
   */
  otherVenue?: number | 'own';
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
  'get /setup': { allowed: WHO, okStatus: 200, send: (a) => a.get('/api/setup') },
  'post /setup': {
    allowed: WHO, okStatus: 404, // public; on an install with a venue, first-run setup is gone (tests/server/setup.test.ts)
    send: (a) => a.post('/api/setup').send({ code: 'ABCD-EFGH-JKLM', venueName: 'Claimed', units: 'metric', name: 'Intruder', email: `x${++counter}@example.org`, password: 'a long enough password' }),
  },
  'get /me': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/me') },
  'put /me/venue': {
    // Choosing the venue one already acts on; another venue's id is answered 404 (below).
    allowed: EVERYONE, okStatus: 200, otherVenue: 404,
    send: (a, c) => a.put('/api/me/venue').send({ venueId: c.venueId }),
  },
  'get /people': { allowed: ['admin'], okStatus: 200, send: (a) => a.get('/api/people') },
  'post /people': {
    allowed: ['admin'], okStatus: 201,
    send: (a) => a.post('/api/people').send({ name: 'New Hand', email: `new${++counter}@larkspur.example`, roles: ['deck'] }),
  },
  'put /people/:id/roles': {
    allowed: ['admin'], okStatus: 200,
    send: (a, { personId }) => a.put(`/api/people/${personId}/roles`).send({ roles: ['deck'] }),
  },
  'put /people/:id': {
    allowed: ['admin'], okStatus: 200,
    send: (a, { personId }) => a.put(`/api/people/${personId}`).send({ name: 'Robin Ashby', email: 'deck@larkspur.example' }),
  },
  'post /people/:id/invitation': { allowed: ['admin'], okStatus: 200, send: (a, { invitedId }) => a.post(`/api/people/${invitedId}/invitation`) },
  'delete /people/:id/invitation': { allowed: ['admin'], okStatus: 200, send: (a, { invitedId }) => a.delete(`/api/people/${invitedId}/invitation`) },
  'post /people/:id/deactivate': { allowed: ['admin'], okStatus: 200, send: (a, { spareId }) => a.post(`/api/people/${spareId}/deactivate`) },
  'post /people/:id/reactivate': { allowed: ['admin'], okStatus: 200, send: (a, { spareId }) => a.post(`/api/people/${spareId}/reactivate`) },
  'post /auth/password-reset': {
    allowed: WHO, okStatus: 202, // public; the same answer whether or not the address has an account
    send: (a) => a.post('/api/auth/password-reset').send({ email: `nobody${++counter}@larkspur.example` }),
  },
  'post /auth/reset-password': {
    allowed: WHO, okStatus: 404, // public; an unknown token is simply not found
    send: (a) => a.post('/api/auth/reset-password').send({ token: 'y'.repeat(43), password: 'a long enough password' }),
  },
  'get /mail/outbox': { allowed: ['admin'], okStatus: 200, send: (a) => a.get('/api/mail/outbox') },
  'post /mail/:id/send-again': {
    allowed: ['admin'], okStatus: 404, // no message of this venue has failed
    send: (a) => a.post('/api/mail/999999/send-again'),
  },
  'get /mail/recipients': { allowed: ['admin', 'rail', 'stage-manager'], okStatus: 200, send: (a) => a.get('/api/mail/recipients') },
  'post /sessions/:id/report-mail': {
    allowed: ['admin', 'rail', 'stage-manager'], okStatus: 202,
    send: (a, c) => a.post(`/api/sessions/${c.sessionId}/report-mail`).send({ addresses: [`office${++counter}@larkspur.example`] }),
  },
  'get /dev/mailbox': { allowed: ['admin'], okStatus: 200, send: (a) => a.get('/api/dev/mailbox') },
  'get /dev/mailbox/:id/attachments/:index': {
    allowed: ['admin'], okStatus: 404, // the fake mail server holds no such message
    send: (a) => a.get('/api/dev/mailbox/000000000000001-00000000/attachments/0'),
  },
  'get /venue': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/venue') },
  'get /schedule': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/schedule') },
  'put /venue': {
    allowed: ['admin'], okStatus: 200,
    send: (a) => a.put('/api/venue').send({ name: 'Larkspur Playhouse', units: 'imperial', settings: DEFAULT_SETTINGS }),
  },
  'get /venue/history': { allowed: ['admin'], okStatus: 200, send: (a) => a.get('/api/venue/history') },
  // Line sets: the director; a rail operator only when the director grants it (not in the demo).
  'get /schedule/csv': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/schedule/csv') },
  'post /schedule/csv/preview': {
    allowed: ['admin', 'rail'], okStatus: 200, otherwise: { rail: 403 },
    send: (a) => a.post('/api/schedule/csv/preview').set('Content-Type', 'text/csv').send(`${csvHeaders('imperial').join(',')}\n`),
  },
  'post /schedule/csv/import': {
    allowed: ['admin', 'rail'], okStatus: 200, otherwise: { rail: 403 },
    send: async (a) => {
      const empty = `${csvHeaders('imperial').join(',')}\n`;
      const preview = await a.post('/api/schedule/csv/preview').set('Content-Type', 'text/csv').send(empty);
      return a.post(`/api/schedule/csv/import?token=${preview.body.token ?? '0'.repeat(64)}`).set('Content-Type', 'text/csv').send(empty);
    },
  },
  'post /line-sets': {
    allowed: ['admin', 'rail'], okStatus: 201, otherwise: { rail: 403 },
    send: async (a, c) => a.post('/api/line-sets').send({ lineSet: { ...(await c.lineSet(29)).fields, number: 100 + ++counter } }),
  },
  'put /line-sets/:id': {
    allowed: ['admin', 'rail'], okStatus: 200, otherwise: { rail: 403 },
    send: async (a, c) => {
      const ls = await c.lineSet(29);
      return a.put(`/api/line-sets/${ls.id}`).send({ lineSet: { ...ls.fields, notes: `Checked by ${c.who}` }, version: ls.version });
    },
  },
  'delete /line-sets/:id': {
    allowed: ['admin', 'rail'], okStatus: 204, otherwise: { rail: 403 },
    send: async (a, c) => a.delete(`/api/line-sets/${await c.scratch('line-set')}`).send({ version: 1 }),
  },
  'put /line-sets/:id/service': {
    allowed: ['admin', 'rail'], okStatus: 200, otherwise: { rail: 403 },
    send: async (a, c) => {
      const ls = await c.lineSet(29);
      return a.put(`/api/line-sets/${ls.id}/service`).send({ version: ls.version, inService: true });
    },
  },
  'get /line-sets/:id/history': { allowed: EVERYONE, okStatus: 200, send: async (a, c) => a.get(`/api/line-sets/${(await c.lineSet(29)).id}/history`) },
  // Pieces and their weights: the director and rail operators.
  'post /line-sets/:id/pieces': {
    allowed: ['admin', 'rail'], okStatus: 201,
    send: async (a, c) => {
      const ls = await c.lineSet(30);
      return a.post(`/api/line-sets/${ls.id}/pieces`).send({
        version: ls.version,
        piece: { name: `Tag ${++counter}`, massKg: 1, positionM: 1, spreadFromM: null, spreadToM: null, department: '', notes: '' },
      });
    },
  },
  'put /pieces/:id': {
    allowed: ['admin', 'rail'], okStatus: 200,
    send: async (a, c) => {
      const ls = await c.lineSet(30);
      return a.put(`/api/pieces/${ls.pieceIds[0]}`).send({
        version: ls.version,
        piece: { name: 'Sharkstooth scrim', massKg: 38 * 0.45359237, positionM: null, spreadFromM: null, spreadToM: null, department: 'Soft goods', notes: `Seen by ${c.who}` },
      });
    },
  },
  'delete /pieces/:id': {
    allowed: ['admin', 'rail'], okStatus: 200,
    send: async (a, c) => {
      const pieceId = await c.scratch('piece');
      return a.delete(`/api/pieces/${pieceId}`).send({ version: (await c.lineSet(30)).version });
    },
  },
  'post /brick-types': {
    allowed: ['admin'], okStatus: 201,
    send: (a) => a.post('/api/brick-types').send({ brickType: { code: `t${++counter}`, name: 'Test brick', massKg: 5, heightM: null, widthM: null, depthM: null } }),
  },
  'put /brick-types/:id': {
    allowed: ['admin'], okStatus: 200,
    send: (a, c) => a.put(`/api/brick-types/${c.brickTypeId}`).send({ brickType: { code: 'access', name: `Access brick ${++counter}`, massKg: 4, heightM: null, widthM: null, depthM: null } }),
  },
  'delete /brick-types/:id': {
    allowed: ['admin'], okStatus: 204,
    send: async (a, c) => a.delete(`/api/brick-types/${await c.scratch('brick-type')}`).send({}),
  },
  'put /brick-types/:id/stock': {
    allowed: ['admin'], okStatus: 200,
    send: (a, c) => a.put(`/api/brick-types/${c.brickTypeId}/stock`).send({ bridgeCount: ++counter, reason: 'Counted on the bridge' }),
  },
  'post /sessions': {
    // Whoever starts a session leads it from the rail: a technical director without the rail role is told so (403),
    // and so is another venue's admin (a rail operator of another venue naming these line sets: tests/server/sessions/create.test.ts).
    allowed: ['admin', 'rail'], okStatus: 201, otherwise: { admin: 403 }, otherVenue: 403,
    send: (a, c) => a.post('/api/sessions').send({ title: 'Access check', lineSets: [{ lineSetId: c.freeLineSet(), remove: [], add: [] }] }),
  },
  'get /sessions': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/sessions?active=1') },
  'get /sessions/:id': { allowed: EVERYONE, okStatus: 200, send: (a, c) => a.get(`/api/sessions/${c.sessionId}`) },
  'post /sessions/:id/actions': {
    // Joining in one's own role; the admin holds no session role, so the session itself refuses (403);
    // the rail operator opened the session and was joined as its lead then (409: already joined).
    allowed: EVERYONE, okStatus: 200, otherwise: { admin: 403, rail: 409 },
    send: (a, c) => a.post(`/api/sessions/${c.sessionId}/actions`)
      .send({ key: `access-${c.who}-${++counter}`, clientTimeMs: Date.now(), action: { type: 'join', role: c.who === 'admin' ? 'rail' : c.who } }),
  },
  'get /sessions/:id/events': { allowed: EVERYONE, okStatus: 200, send: (a, c) => a.get(`/api/sessions/${c.sessionId}/events?after=0`) },
  'get /sessions/:id/record': { allowed: EVERYONE, okStatus: 200, send: (a, c) => a.get(`/api/sessions/${c.sessionId}/record`) },
  'post /practice-runs': {
    allowed: EVERYONE, okStatus: 201,
    send: (a) => a.post('/api/practice-runs').send({ role: 'loader', source: { kind: 'invented' } }),
  },
  'put /practice-runs/:id/result': {
    allowed: EVERYONE, okStatus: 404, // nobody's practice has this id
    send: (a) => a.put('/api/practice-runs/999999/result').send({ taps: [{ atMs: Date.now(), personId: 1, action: { type: 'answer-clear' } }], endedAtMs: Date.now() }),
  },
  'get /practice-runs': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/practice-runs') },
  'get /practice-runs/:id': { allowed: EVERYONE, okStatus: 404, send: (a) => a.get('/api/practice-runs/999999') },
  'get /line-sets/:id/photos': { allowed: EVERYONE, okStatus: 200, send: (a, c) => a.get(`/api/line-sets/${c.lineSetId}/photos`) },
  'post /line-sets/:id/photos': {
    allowed: ['admin', 'rail'], okStatus: 201,
    send: (a, c) => a.post(`/api/line-sets/${c.lineSetId}/photos`).attach('photo', SMALL_PNG, 'hang.png'),
  },
  // Photo 1 is the demo's drawing of line set 7.
  'get /photos/:id/image': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/photos/1/image') },
  'get /photos/:id/thumb': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/photos/1/thumb') },
  'delete /photos/:id': {
    allowed: ['admin', 'rail'], okStatus: 204,
    // A photo of its own to remove where the person may add one; otherwise the demo's (refused before anything happens).
    async send(a, c) {
      const added = c.who === 'admin' || c.who === 'rail' ? await a.post(`/api/line-sets/${c.lineSetId}/photos`).attach('photo', SMALL_PNG, 'gone.png') : null;
      return a.delete(`/api/photos/${added?.body?.photo?.id ?? 1}`);
    },
  },
  'get /record/sessions': { allowed: EVERYONE, okStatus: 200, send: (a) => a.get('/api/record/sessions?from=2026-01-01') },
  'get /record/sessions/:id/report': { allowed: EVERYONE, okStatus: 200, send: (a, c) => a.get(`/api/record/sessions/${c.sessionId}/report`) },
  'get /record/sessions/:id/report.pdf': { allowed: EVERYONE, okStatus: 200, send: (a, c) => a.get(`/api/record/sessions/${c.sessionId}/report.pdf`) },
  'get /record/sessions/:id/report.csv': { allowed: EVERYONE, okStatus: 200, send: (a, c) => a.get(`/api/record/sessions/${c.sessionId}/report.csv`) },
  'get /record/sessions/:id/check': { allowed: EVERYONE, okStatus: 200, send: (a, c) => a.get(`/api/record/sessions/${c.sessionId}/check`) },
  'post /record/verify': {
    allowed: EVERYONE, okStatus: 400, // a file that is not a record: a field error for everyone let in
    send: (a) => a.post('/api/record/verify').send({ text: 'not a record' }),
  },
  'get /record/line-sets/:id': { allowed: EVERYONE, okStatus: 200, send: (a, c) => a.get(`/api/record/line-sets/${c.lineSetId}`) },
};

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
    t = await startTestApp({ config: (c) => ({ ...c, mail: { ...c.mail, mailboxDir } }) });
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
  const lineSet: Ctx['lineSet'] = async (number) => {
    const res = await agents.admin.get('/api/schedule');
    const ls = res.body.lineSets.find((l: { number: number }) => l.number === number);
    return { id: ls.id, version: ls.version, fields: Object.fromEntries(LINE_SET_FIELDS.map((f) => [f, ls[f]])), pieceIds: ls.pieces.map((p: { id: number }) => p.id) };
  };
  const scratch: Ctx['scratch'] = async (kind) => {
    const owner = t.database.owner;
    const [venue] = await owner.query('SELECT id FROM venue ORDER BY id LIMIT 1');
    if (kind === 'brick-type') return (await owner.query('INSERT INTO brick_type (venue_id, code, name, mass_kg) VALUES (?, ?, ?, 1)', [venue.id, `x${++counter}`, 'Scratch'])).insertId;
    if (kind === 'piece') {
      const [ls] = await owner.query('SELECT id FROM line_set WHERE number = 30');
      return (await owner.query("INSERT INTO piece (line_set_id, name, mass_kg) VALUES (?, 'Scratch', 1)", [ls.id])).insertId;
    }
    return (await owner.query(`INSERT INTO line_set (venue_id, number, name, purchase, pipe_size, pipe_length_m, pipe_kg_per_m, pipe_kg, lift_lines_m,
      lift_line_rating_kg, batten_rating_kg_per_m, arbor_kg, arbor_capacity_kg, bricks) VALUES (?, ?, 'Scratch', 1, '', 10, 4, 40, '[1, 9]', 200, 30, 30, 500, '{}')`,
    [venue.id, 500 + ++counter])).insertId;
  };
  const ctx = (who: Who): Ctx => ({ personId: deckPersonId, invitedId, spareId, sessionId, lineSetId: watchedLineSet, who, venueId: larkspurId, freeLineSet: () => freeLineSets.pop()!, lineSet, scratch, brickTypeId });
  afterAll(async () => {
    await t.close();
    rmSync(mailboxDir, { recursive: true, force: true });
  });

  it('lists every route of the app in the table', () => {
    const routes = t.railcall.routes.map((r) => `${r.method} ${r.path}`).sort();
    expect(routes).toEqual(Object.keys(TABLE).sort());
  });

  for (const [key, c] of Object.entries(TABLE)) {
    for (const who of WHO) {
      // Sign-out would end the shared agents' sign-ins: it is checked with fresh ones below.
      if (key === 'post /auth/sign-out') continue;
      const expected = c.allowed.includes(who) ? (c.otherwise?.[who] ?? c.okStatus) : who === 'nobody' ? 401 : 403;
      it(`${key} as ${who} -> ${expected}`, async () => {
        const res = await c.send(agents[who], ctx(who));
        expect(res.status, JSON.stringify(res.body)).toBe(expected);
        if (expected === 401 || expected === 403) expect(res.body.error.code).toBe(expected === 401 ? 'unauthenticated' : 'forbidden');
      });
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

    /** What someone acting on another venue gets from every route when sent this venue's ids. */
    const refusals = (agent: () => Agent, label: string, skip: string[] = []) => {
      for (const [key, c] of Object.entries(TABLE)) {
        const expected = c.otherVenue ?? (key.includes(':') ? 404 : 'own');
        if (expected === 'own' || key === 'post /auth/sign-out' || skip.includes(key)) continue;
        it(`${key} with a Larkspur id, ${label} -> ${expected}`, async () => {
          // Any Larkspur line set will do: none of them may be planned from another venue.
          const res = await c.send(agent(), { ...ctx('admin'), freeLineSet: () => anyLineSet });
          expect(res.status, JSON.stringify(res.body)).toBe(expected);
        });
      }
    };
    refusals(() => other, 'as the admin of another venue');

    it('cannot change roles of a person at another venue, either way', async () => {
      expect((await other.put(`/api/people/${deckPersonId}/roles`).send({ roles: ['admin'] })).status).toBe(404);
      expect((await agents.admin.put(`/api/people/${otherAdminId}/roles`).send({ roles: [] })).status).toBe(404);
      const [row] = await t.database.owner.query('SELECT COUNT(*) AS n FROM venue_role WHERE person_id = ?', [otherAdminId]);
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
      refusals(() => both, 'as a person of both venues acting on the other', ['put /me/venue']);
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
