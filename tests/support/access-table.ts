import type request from 'supertest';
import sharp from 'sharp';
import type { Role } from '@shared/protocol/roles';
import { DEFAULT_SETTINGS } from '@shared/protocol/schedule';
import { csvHeaders } from '@shared/protocol/schedule-csv';
import type { Agent } from './people';

/** Who sends a request: nobody signed in, or a person holding one role. */
export type Who = 'nobody' | Role;
export const ROLES: Role[] = ['admin', 'rail', 'loader', 'deck', 'stage-manager'];
export const WHO: Who[] = ['nobody', ...ROLES];
const EVERYONE: Who[] = ROLES;

let counter = 0;
const unique = () => ++counter;
/** A real 8 x 8 PNG for the upload routes, made once. */
let png: Promise<Buffer> | null = null;
const smallPng = () => (png ??= sharp({ create: { width: 8, height: 8, channels: 3, background: '#336699' } }).png().toBuffer());

export interface AccessCtx {
  /** A person of the home venue (Larkspur's deck hand). */
  personId: number;
  /** Invited, not signed up: for invitation routes. */
  invitedId: number;
  /** Invited too: deactivated and reactivated here. */
  spareId: number;
  /** A loading session of the home venue. */
  sessionId: number;
  /** A home-venue line set no session holds yet. */
  freeLineSet(): number;
  /** A home-venue line set (the one the watched session holds). */
  lineSetId: number;
  who: Who;
  /** A home-venue line set as it is now: its id, version and editable fields (read fresh for each request). */
  lineSet(number: number): Promise<{ id: number; version: number; fields: Record<string, unknown>; pieceIds: number[] }>;
  /** A throwaway home-venue row made for a delete: a line set, a piece on line set 30, a brick type or a photo. */
  scratch(kind: 'line-set' | 'piece' | 'brick-type' | 'photo'): Promise<number>;
  brickTypeId: number;
  /** The home venue (the Larkspur Playhouse), where every signed-in agent of the home rows works. */
  venueId: number;
}

export interface AccessCase {
  /** Who gets through; everyone else gets 401 (nobody) or 403. */
  allowed: Who[];
  /** The status when allowed, acting on the home venue's data. */
  okStatus: number;
  /** Where the route lets someone in but the session's own rules answer otherwise. */
  otherwise?: Partial<Record<Who, number>>;
  /**
   * The status for an allowed person of ANOTHER venue sending the same request (the ids in it are the
   * home venue's): 404 where it names the home venue's data, as if it did not exist.
   */
  otherVenue: number;
  /** The route knows no venue at all (first-run setup): checked signed in and out only, not from another venue. */
  noVenue?: true;
  /** Where a role check at the person's own venue answers before the ids are looked up. */
  otherVenueOtherwise?: Partial<Record<Who, number>>;
  /** A request that is valid when allowed. */
  send(agent: Agent, ctx: AccessCtx): request.Test | Promise<request.Response>;
}

/**
 * Every API route, one row each: the access test fails when a route exists that this table does not
 * list (from the route specs and from Express's own router), and the attack tests fuzz each one.
 * Adding a route: add its row here (see DEVELOPERS.md, "Access and attack tests").
 */
export const ACCESS_TABLE: Record<string, AccessCase> = {
  'post /auth/sign-in': {
    allowed: WHO, okStatus: 401, otherVenue: 401, // public; a wrong password answers 401 for everyone alike
    send: (a) => a.post('/api/auth/sign-in').send({ email: `nobody${unique()}@larkspur.example`, password: 'x' }),
  },
  'post /auth/sign-out': { allowed: WHO, okStatus: 204, otherVenue: 204, send: (a) => a.post('/api/auth/sign-out') },
  'post /auth/accept-invite': {
    allowed: WHO, okStatus: 404, otherVenue: 404, // public; an unknown token is simply not found
    send: (a) => a.post('/api/auth/accept-invite').send({ token: 'x'.repeat(43), password: 'a long enough password' }),
  },
  'get /setup': { allowed: WHO, okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/setup') },
  'post /setup': {
    // Wrong codes are throttled to 10 per address: the rows from another venue would only meet the throttle.
    noVenue: true,
    allowed: WHO, okStatus: 404, otherVenue: 404, // public; on an install with a venue, first-run setup is gone (tests/server/setup.test.ts)
    send: (a) => a.post('/api/setup').send({ code: 'ABCD-EFGH-JKLM', venueName: 'Claimed', units: 'metric', name: 'Intruder', email: `x${unique()}@example.org`, password: 'a long enough password' }),
  },  'get /me': { allowed: EVERYONE, okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/me') },
  'put /me/venue': {
    // Choosing the venue one already acts on; another venue's person naming the home venue: not found.
    allowed: EVERYONE, okStatus: 200, otherVenue: 404,
    send: (a, c) => a.put('/api/me/venue').send({ venueId: c.venueId }),
  },
  'post /venues': {
    // A new venue of one's own, from any venue; the agent then goes back to where it was, for the next rows.
    allowed: ['admin'], okStatus: 201, otherVenue: 201,
    async send(a) {
      const was = (await a.get('/api/me')).body?.venue?.id as number | undefined;
      const res = await a.post('/api/venues').send({ name: `Second stage ${unique()}`, units: 'metric' });
      if (res.status === 201 && was) await a.put('/api/me/venue').send({ venueId: was });
      return res;
    },
  },
  'get /people': { allowed: ['admin'], okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/people') },
  'post /people': {
    allowed: ['admin'], okStatus: 201, otherVenue: 201,
    send: (a) => a.post('/api/people').send({ name: 'New Hand', email: `new${unique()}@hands.example`, roles: ['deck'] }),
  },
  'put /people/:id/roles': {
    allowed: ['admin'], okStatus: 200, otherVenue: 404,
    send: (a, { personId }) => a.put(`/api/people/${personId}/roles`).send({ roles: ['deck'] }),
  },
  'put /people/:id': {
    allowed: ['admin'], okStatus: 200, otherVenue: 404,
    send: (a, { personId }) => a.put(`/api/people/${personId}`).send({ name: 'Robin Ashby', email: 'deck@larkspur.example' }),
  },
  'post /people/:id/invitation': { allowed: ['admin'], okStatus: 200, otherVenue: 404, send: (a, { invitedId }) => a.post(`/api/people/${invitedId}/invitation`) },
  'delete /people/:id/invitation': { allowed: ['admin'], okStatus: 200, otherVenue: 404, send: (a, { invitedId }) => a.delete(`/api/people/${invitedId}/invitation`) },
  'post /people/:id/deactivate': { allowed: ['admin'], okStatus: 200, otherVenue: 404, send: (a, { spareId }) => a.post(`/api/people/${spareId}/deactivate`) },
  'post /people/:id/reactivate': { allowed: ['admin'], okStatus: 200, otherVenue: 404, send: (a, { spareId }) => a.post(`/api/people/${spareId}/reactivate`) },
  'post /auth/password-reset': {
    allowed: WHO, okStatus: 202, otherVenue: 202, // public; the same answer whether or not the address has an account
    send: (a) => a.post('/api/auth/password-reset').send({ email: `nobody${unique()}@larkspur.example` }),
  },
  'post /auth/reset-password': {
    allowed: WHO, okStatus: 404, otherVenue: 404, // public; an unknown token is simply not found
    send: (a) => a.post('/api/auth/reset-password').send({ token: 'y'.repeat(43), password: 'a long enough password' }),
  },
  'get /mail/outbox': { allowed: ['admin'], okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/mail/outbox') },
  'post /mail/:id/send-again': {
    allowed: ['admin'], okStatus: 404, otherVenue: 404, // no message of this venue has failed
    send: (a) => a.post('/api/mail/999999/send-again'),
  },
  'get /mail/recipients': { allowed: ['admin', 'rail', 'stage-manager'], okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/mail/recipients') },
  'post /sessions/:id/report-mail': {
    allowed: ['admin', 'rail', 'stage-manager'], okStatus: 202, otherVenue: 404,
    send: (a, c) => a.post(`/api/sessions/${c.sessionId}/report-mail`).send({ addresses: [`office${unique()}@larkspur.example`] }),
  },
  'get /dev/mailbox': { allowed: ['admin'], okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/dev/mailbox') },
  'get /dev/mailbox/:id/attachments/:index': {
    allowed: ['admin'], okStatus: 404, otherVenue: 404, // the fake mail server holds no such message
    send: (a) => a.get('/api/dev/mailbox/000000000000001-00000000/attachments/0'),
  },
  'get /venue': { allowed: EVERYONE, okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/venue') },
  'get /schedule': { allowed: EVERYONE, okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/schedule') },
  'put /venue': {
    // Another venue's director edits their own venue (keeping its name).
    allowed: ['admin'], okStatus: 200, otherVenue: 200,
    send: async (a) => {
      const { venue } = (await a.get('/api/venue')).body;
      return a.put('/api/venue').send({ name: venue?.name ?? 'Larkspur Playhouse', units: venue?.units ?? 'imperial', settings: DEFAULT_SETTINGS });
    },
  },
  'get /venue/history': { allowed: ['admin'], okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/venue/history') },
  // The schedule as CSV: an empty file previews and imports as "no change" at the caller's own venue.
  'get /schedule/csv': { allowed: EVERYONE, okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/schedule/csv') },
  'post /schedule/csv/preview': {
    allowed: ['admin', 'rail'], okStatus: 200, otherwise: { rail: 403 }, otherVenue: 200, otherVenueOtherwise: { rail: 403 },
    send: (a) => a.post('/api/schedule/csv/preview').set('Content-Type', 'text/csv').send(`${csvHeaders('imperial').join(',')}\n`),
  },
  'post /schedule/csv/import': {
    allowed: ['admin', 'rail'], okStatus: 200, otherwise: { rail: 403 }, otherVenue: 200, otherVenueOtherwise: { rail: 403 },
    send: async (a) => {
      const empty = `${csvHeaders('imperial').join(',')}\n`;
      const preview = await a.post('/api/schedule/csv/preview').set('Content-Type', 'text/csv').send(empty);
      return a.post(`/api/schedule/csv/import?token=${preview.body.token ?? '0'.repeat(64)}`).set('Content-Type', 'text/csv').send(empty);
    },
  },
  // Line sets: the director; a rail operator only when the director grants it (not in the demo).
  'post /line-sets': {
    // Another venue sending the home venue's line set: its brick types are not theirs (a field error).
    allowed: ['admin', 'rail'], okStatus: 201, otherwise: { rail: 403 }, otherVenue: 400, otherVenueOtherwise: { rail: 403 },
    send: async (a, c) => a.post('/api/line-sets').send({ lineSet: { ...(await c.lineSet(29)).fields, number: 100 + unique() } }),
  },
  'put /line-sets/:id': {
    allowed: ['admin', 'rail'], okStatus: 200, otherwise: { rail: 403 }, otherVenue: 404, otherVenueOtherwise: { rail: 403 },
    send: async (a, c) => {
      const ls = await c.lineSet(29);
      return a.put(`/api/line-sets/${ls.id}`).send({ lineSet: { ...ls.fields, notes: `Checked by ${c.who}` }, version: ls.version });
    },
  },
  'delete /line-sets/:id': {
    allowed: ['admin', 'rail'], okStatus: 204, otherwise: { rail: 403 }, otherVenue: 404, otherVenueOtherwise: { rail: 403 },
    send: async (a, c) => a.delete(`/api/line-sets/${await c.scratch('line-set')}`).send({ version: 1 }),
  },
  'put /line-sets/:id/service': {
    allowed: ['admin', 'rail'], okStatus: 200, otherwise: { rail: 403 }, otherVenue: 404, otherVenueOtherwise: { rail: 403 },
    send: async (a, c) => {
      const ls = await c.lineSet(29);
      return a.put(`/api/line-sets/${ls.id}/service`).send({ version: ls.version, inService: true });
    },
  },
  'get /line-sets/:id/history': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: async (a, c) => a.get(`/api/line-sets/${(await c.lineSet(29)).id}/history`) },
  // Pieces and their weights: the director and rail operators.
  'post /line-sets/:id/pieces': {
    allowed: ['admin', 'rail'], okStatus: 201, otherVenue: 404,
    send: async (a, c) => {
      const ls = await c.lineSet(30);
      return a.post(`/api/line-sets/${ls.id}/pieces`).send({
        version: ls.version,
        piece: { name: `Tag ${unique()}`, massKg: 1, positionM: 1, spreadFromM: null, spreadToM: null, department: '', notes: '' },
      });
    },
  },
  'put /pieces/:id': {
    allowed: ['admin', 'rail'], okStatus: 200, otherVenue: 404,
    send: async (a, c) => {
      const ls = await c.lineSet(30);
      return a.put(`/api/pieces/${ls.pieceIds[0]}`).send({
        version: ls.version,
        piece: { name: 'Sharkstooth scrim', massKg: 38 * 0.45359237, positionM: null, spreadFromM: null, spreadToM: null, department: 'Soft goods', notes: `Seen by ${c.who}` },
      });
    },
  },
  'delete /pieces/:id': {
    allowed: ['admin', 'rail'], okStatus: 200, otherVenue: 404,
    send: async (a, c) => {
      const pieceId = await c.scratch('piece');
      return a.delete(`/api/pieces/${pieceId}`).send({ version: (await c.lineSet(30)).version });
    },
  },
  'post /brick-types': {
    allowed: ['admin'], okStatus: 201, otherVenue: 201,
    send: (a) => a.post('/api/brick-types').send({ brickType: { code: `t${unique()}`, name: 'Test brick', massKg: 5, heightM: null, widthM: null, depthM: null } }),
  },
  'put /brick-types/:id': {
    allowed: ['admin'], okStatus: 200, otherVenue: 404,
    send: (a, c) => a.put(`/api/brick-types/${c.brickTypeId}`).send({ brickType: { code: 'access', name: `Access brick ${unique()}`, massKg: 4, heightM: null, widthM: null, depthM: null } }),
  },
  'delete /brick-types/:id': {
    allowed: ['admin'], okStatus: 204, otherVenue: 404,
    send: async (a, c) => a.delete(`/api/brick-types/${await c.scratch('brick-type')}`).send({}),
  },
  'put /brick-types/:id/stock': {
    allowed: ['admin'], okStatus: 200, otherVenue: 404,
    send: (a, c) => a.put(`/api/brick-types/${c.brickTypeId}/stock`).send({ bridgeCount: unique(), reason: 'Counted on the bridge' }),
  },
  'post /sessions': {
    // Whoever starts a session leads it from the rail: a technical director without the rail role is told so (403),
    // and so is another venue's admin; a rail operator of another venue naming these line sets: no such line set there (400,
    // tests/server/sessions/create.test.ts).
    allowed: ['admin', 'rail'], okStatus: 201, otherwise: { admin: 403 }, otherVenue: 403, otherVenueOtherwise: { rail: 400 },
    send: (a, c) => a.post('/api/sessions').send({ title: 'Access check', lineSets: [{ lineSetId: c.freeLineSet(), remove: [], add: [] }] }),
  },
  'get /sessions': { allowed: EVERYONE, okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/sessions?active=1') },
  'get /sessions/:id': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: (a, c) => a.get(`/api/sessions/${c.sessionId}`) },
  'post /sessions/:id/actions': {
    // Joining in one's own role; the admin holds no session role, so the session itself refuses (403).
    // The rail operator opened the session and was joined as its lead then (409: already joined).
    allowed: EVERYONE, okStatus: 200, otherwise: { admin: 403, rail: 409 }, otherVenue: 404,
    send: (a, c) => a.post(`/api/sessions/${c.sessionId}/actions`)
      .send({ key: `access-${c.who}-${unique()}`, clientTimeMs: Date.now(), action: { type: 'join', role: c.who === 'admin' ? 'rail' : c.who } }),
  },
  'get /sessions/:id/events': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: (a, c) => a.get(`/api/sessions/${c.sessionId}/events?after=0`) },
  'get /sessions/:id/record': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: (a, c) => a.get(`/api/sessions/${c.sessionId}/record`) },
  'post /practice-runs': {
    allowed: EVERYONE, okStatus: 201, otherVenue: 201,
    send: (a) => a.post('/api/practice-runs').send({ role: 'loader', source: { kind: 'invented' } }),
  },
  'put /practice-runs/:id/result': {
    allowed: EVERYONE, okStatus: 404, otherVenue: 404, // nobody's practice has this id
    send: (a) => a.put('/api/practice-runs/999999/result').send({ taps: [{ atMs: Date.now(), personId: 1, action: { type: 'answer-clear' } }], endedAtMs: Date.now() }),
  },
  'get /practice-runs': { allowed: EVERYONE, okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/practice-runs') },
  'get /practice-runs/:id': { allowed: EVERYONE, okStatus: 404, otherVenue: 404, send: (a) => a.get('/api/practice-runs/999999') },
  'get /record/sessions': { allowed: EVERYONE, okStatus: 200, otherVenue: 200, send: (a) => a.get('/api/record/sessions?from=2026-01-01') },
  'get /record/sessions/:id/report': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: (a, c) => a.get(`/api/record/sessions/${c.sessionId}/report`) },
  'get /record/sessions/:id/report.pdf': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: (a, c) => a.get(`/api/record/sessions/${c.sessionId}/report.pdf`) },
  'get /record/sessions/:id/report.csv': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: (a, c) => a.get(`/api/record/sessions/${c.sessionId}/report.csv`) },
  'get /record/sessions/:id/check': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: (a, c) => a.get(`/api/record/sessions/${c.sessionId}/check`) },
  'post /record/verify': {
    allowed: EVERYONE, okStatus: 400, otherVenue: 400, // a file that is not a record: a field error for everyone let in
    send: (a) => a.post('/api/record/verify').send({ text: 'not a record' }),
  },
  'get /record/line-sets/:id': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: (a, c) => a.get(`/api/record/line-sets/${c.lineSetId}`) },
  // Photos of a hang: everyone at the venue sees them; the director and rail operators add and remove them.
  'get /line-sets/:id/photos': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: (a, c) => a.get(`/api/line-sets/${c.lineSetId}/photos`) },
  'post /line-sets/:id/photos': {
    allowed: ['admin', 'rail'], okStatus: 201, otherVenue: 404,
    send: async (a, c) => a.post(`/api/line-sets/${c.lineSetId}/photos`).attach('photo', await smallPng(), 'hang.png'),
  },
  // Photo 1 is the demo's drawing of line set 7.
  'get /photos/:id/image': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: (a) => a.get('/api/photos/1/image') },
  'get /photos/:id/thumb': { allowed: EVERYONE, okStatus: 200, otherVenue: 404, send: (a) => a.get('/api/photos/1/thumb') },
  'delete /photos/:id': {
    allowed: ['admin', 'rail'], okStatus: 204, otherVenue: 404,
    // A home-venue photo of its own to remove (added as the owner); the demo's for those refused before anything happens.
    async send(a, c) {
      const id = c.who === 'admin' || c.who === 'rail' ? await c.scratch('photo') : 1;
      return a.delete(`/api/photos/${id}`);
    },
  },
};

/** The status a row expects for one person: allowed or not, home venue or another. */
export function expectedStatus(c: AccessCase, who: Who, venue: 'own' | 'other'): number {
  if (!c.allowed.includes(who)) return who === 'nobody' ? 401 : 403;
  if (venue === 'other' && who !== 'nobody') return c.otherVenueOtherwise?.[who] ?? c.otherVenue;
  return c.otherwise?.[who] ?? c.okStatus;
}
