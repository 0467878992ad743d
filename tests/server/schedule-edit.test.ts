import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEFAULT_SETTINGS, type LineSetView } from '@shared/protocol/schedule';
import { startTestApp, type TestApp } from '../support/app';
import { addVenueWithPeople, signedIn, type Agent } from '../support/people';
import { LINE_SET_FIELDS } from '../../server/features/schedule/schedule-edit.service';

// Exact definitions (1959 international yard and pound agreement; NIST SP 811).
const LB = 0.45359237;
const FT = 0.3048;

const fieldsOf = (ls: LineSetView) => Object.fromEntries(LINE_SET_FIELDS.map((f) => [f, ls[f]]));
const newLineSet = (number: number) => ({
  number, name: 'Gauze', distanceM: 5 * FT, purchase: 1, pipeSize: '1-1/2 in Schedule 40', pipeKgPerM: 2.72 * LB / FT,
  pipeLengthM: 40 * FT, liftLinesM: [2, 11, 20, 29, 38].map((ft) => ft * FT), liftLineRatingKg: 500 * LB, battenRatingKgPerM: 25 * LB / FT,
  arborKg: 90 * LB, arborCapacityKg: 1200 * LB, highTrimM: 30 * FT, lowTrimM: 0, notes: '', bricks: { full: 1 },
});
const piece = (over: Record<string, unknown> = {}) => ({ name: 'Gauze panel', massKg: 30 * LB, positionM: null, spreadFromM: 4 * FT, spreadToM: 16 * FT, department: 'Soft goods', notes: '', ...over });

describe('editing the schedule', () => {
  let t: TestApp;
  let td: Agent;
  let rail: Agent;
  let deck: Agent;
  const lineSet = async (number: number): Promise<LineSetView> =>
    (await td.get('/api/schedule')).body.lineSets.find((l: LineSetView) => l.number === number);
  const count = async (table: string) => Number((await t.database.owner.query(`SELECT COUNT(*) AS n FROM ${table}`))[0].n);

  beforeAll(async () => {
    t = await startTestApp();
    td = await signedIn(t.url, 'td@larkspur.example');
    rail = await signedIn(t.url, 'rail@larkspur.example');
    deck = await signedIn(t.url, 'deck@larkspur.example');
  });
  afterAll(async () => { await t.close(); });

  describe('the demo venue', () => {
    it('has at least 30 line sets, electrics on double purchase, spares, one out of service and two brick types', async () => {
      const { body } = await deck.get('/api/schedule');
      expect(body.lineSets.length).toBeGreaterThanOrEqual(30);
      expect(body.lineSets.filter((l: LineSetView) => l.purchase === 2 && /electric/i.test(l.name)).length).toBeGreaterThanOrEqual(2);
      expect(body.lineSets.filter((l: LineSetView) => l.name === 'Spare pipe').length).toBeGreaterThanOrEqual(2);
      expect(body.lineSets.filter((l: LineSetView) => l.outOfService)).toHaveLength(1);
      expect(body.brickTypes).toHaveLength(2);
      const pieces = body.lineSets.flatMap((l: LineSetView) => l.pieces);
      expect(pieces.some((p: { positionM: number | null }) => p.positionM !== null)).toBe(true);
      expect(pieces.some((p: { spreadFromM: number | null }) => p.spreadFromM !== null)).toBe(true);
    });

    it('computes balance and warnings for every set: seeded sets balance within a brick', async () => {
      const ls7 = await lineSet(7);
      // Arbor side ÷ purchase balances the batten side to within the lightest brick (10 lb).
      expect(ls7.computed.imbalanceKg).toBeCloseTo(ls7.computed.battenSideKg - ls7.computed.arborSideKg / ls7.purchase, 9);
      expect(Math.abs(ls7.computed.imbalanceKg)).toBeLessThan(10 * LB);
      expect(ls7.computed.outOfBalance).toBe(false);
      // Pipe weight = weight per length × length.
      expect(ls7.pipeKg).toBeCloseTo(ls7.pipeKgPerM * ls7.pipeLengthM, 9);
    });
  });

  describe('line sets', () => {
    it('creates a line set with every field, and keeps its history', async () => {
      const res = await td.post('/api/line-sets').send({ lineSet: newLineSet(40), reason: 'New gauze pipe' });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      expect(res.body.lineSet).toMatchObject({ number: 40, version: 1, outOfService: null, pieces: [] });
      expect(res.body.lineSet.pipeKg).toBeCloseTo(2.72 * LB / FT * 40 * FT, 9);
      const history = await deck.get(`/api/line-sets/${res.body.lineSet.id}/history`);
      expect(history.body.entries).toEqual([expect.objectContaining({ action: 'create', personName: 'Morgan Vale', reason: 'New gauze pipe', subject: 'line-set' })]);
      expect(history.body.entries[0].changes.number).toEqual([null, 40]);
    });

    it('answers every bad field at once, and writes nothing', async () => {
      const before = await count('line_set');
      const res = await td.post('/api/line-sets').send({
        lineSet: { ...newLineSet(41), name: '', purchase: 3, liftLinesM: [1, 99], bricks: { full: -1 }, lowTrimM: 40, highTrimM: 10 },
      });
      expect(res.status).toBe(400);
      expect(Object.keys(res.body.error.fields).sort()).toEqual(expect.arrayContaining(['lineSet.name', 'lineSet.purchase', 'lineSet.bricks.full']));
      expect(await count('line_set')).toBe(before);
      const taken = await td.post('/api/line-sets').send({ lineSet: { ...newLineSet(7), bricks: { lead: 2 } } });
      expect(taken.status).toBe(400);
      expect(taken.body.error.fields).toMatchObject({ number: ['Line set 7 already exists'], 'bricks.lead': [expect.any(String)] });
    });

    it('edits with the version it started from; the second of two saves is refused naming who saved first', async () => {
      const ls = await lineSet(40);
      const first = await td.put(`/api/line-sets/${ls.id}`).send({ lineSet: { ...fieldsOf(ls), name: 'Gauze, revised' }, version: ls.version, reason: 'Renamed' });
      expect(first.status).toBe(200);
      expect(first.body.lineSet).toMatchObject({ name: 'Gauze, revised', version: ls.version + 1 });
      const second = await td.put(`/api/line-sets/${ls.id}`).send({ lineSet: { ...fieldsOf(ls), notes: 'Stale edit' }, version: ls.version });
      expect(second.status).toBe(409);
      expect(second.body.error.message).toMatch(/changed by Morgan Vale at \d\d:\d\d UTC/);
      expect((await lineSet(40)).notes).toBe('');
      const history = await deck.get(`/api/line-sets/${ls.id}/history`);
      expect(history.body.entries[0]).toMatchObject({ action: 'update', changes: { name: ['Gauze', 'Gauze, revised'] }, reason: 'Renamed' });
    });

    it('keeps the rail operator to pieces unless the director grants line set edits', async () => {
      const ls = await lineSet(40);
      expect((await rail.put(`/api/line-sets/${ls.id}`).send({ lineSet: fieldsOf(ls), version: ls.version })).status).toBe(403);
      const venue = (await td.get('/api/venue')).body.venue;
      expect((await td.put('/api/venue').send({ ...venue, settings: { ...venue.settings, railEditsLineSets: true } })).status).toBe(200);
      const granted = await rail.put(`/api/line-sets/${ls.id}`).send({ lineSet: { ...fieldsOf(ls), notes: 'Rail was here' }, version: ls.version });
      expect(granted.status).toBe(200);
      expect((await td.put('/api/venue').send({ ...venue, settings: { ...venue.settings, railEditsLineSets: false } })).status).toBe(200);
      expect((await rail.post('/api/line-sets').send({ lineSet: newLineSet(42) })).status).toBe(403);
      expect((await deck.post(`/api/line-sets/${ls.id}/pieces`).send({ piece: piece(), version: ls.version + 1 })).status).toBe(403);
    });

    it('deletes a line set and its pieces, keeping both in the history', async () => {
      const created = (await td.post('/api/line-sets').send({ lineSet: newLineSet(43) })).body.lineSet;
      const hung = (await td.post(`/api/line-sets/${created.id}/pieces`).send({ piece: piece(), version: created.version })).body.lineSet;
      const stale = await td.delete(`/api/line-sets/${created.id}`).send({ version: created.version });
      expect(stale.status).toBe(409);
      expect((await td.delete(`/api/line-sets/${created.id}`).send({ version: hung.version, reason: 'Pipe struck' })).status).toBe(204);
      expect(await lineSet(43)).toBeUndefined();
      const history = await td.get(`/api/line-sets/${created.id}/history`);
      expect(history.body.entries.map((e: { subject: string; action: string }) => `${e.subject} ${e.action}`))
        .toEqual(['line-set delete', 'piece delete', 'piece create', 'line-set create']);
    });
  });

  describe('pieces', () => {
    it('the rail operator hangs, re-weighs and removes a piece; balance and warnings follow', async () => {
      const ls = await lineSet(40);
      const hung = await rail.post(`/api/line-sets/${ls.id}/pieces`).send({ piece: piece(), version: ls.version, reason: 'Added for act 2' });
      expect(hung.status, JSON.stringify(hung.body)).toBe(201);
      const after: LineSetView = hung.body.lineSet;
      expect(after.pieces).toEqual([expect.objectContaining({ name: 'Gauze panel', spreadFromM: 4 * FT, spreadToM: 16 * FT, department: 'Soft goods' })]);
      expect(after.computed.battenSideKg - ls.computed.battenSideKg).toBeCloseTo(30 * LB, 9);
      expect(after.computed.imbalanceKg - ls.computed.imbalanceKg).toBeCloseTo(30 * LB, 9);

      // 900 lb on 12 ft is far over 25 lb per foot: the capacity checks of shared/rigging speak.
      const heavy = await rail.put(`/api/pieces/${after.pieces[0].id}`).send({ piece: piece({ massKg: 900 * LB }), version: after.version, reason: 'Weighed at the dock' });
      expect(heavy.status).toBe(200);
      const codes = heavy.body.lineSet.computed.warnings.map((w: { code: string }) => w.code);
      expect(codes).toContain('batten-concentrated');
      expect(heavy.body.lineSet.computed.outOfBalance).toBe(true);

      const removed = await rail.delete(`/api/pieces/${after.pieces[0].id}`).send({ version: heavy.body.lineSet.version });
      expect(removed.status).toBe(200);
      expect(removed.body.lineSet.pieces).toEqual([]);
      const history = await deck.get(`/api/line-sets/${ls.id}/history`);
      const pieceRows = history.body.entries.filter((e: { subject: string }) => e.subject === 'piece');
      expect(pieceRows.map((e: { action: string }) => e.action)).toEqual(['delete', 'update', 'create']);
      expect(pieceRows[1]).toMatchObject({ personName: 'Jo Castellan', reason: 'Weighed at the dock', changes: { massKg: [30 * LB, 900 * LB] } });
    });

    it('refuses a piece at a point and spread at once, half a spread, or past the batten end', async () => {
      const ls = await lineSet(40);
      const both = await rail.post(`/api/line-sets/${ls.id}/pieces`).send({ piece: piece({ positionM: 1 }), version: ls.version });
      expect(both.status).toBe(400);
      expect(both.body.error.fields['piece.positionM']).toBeDefined();
      const half = await rail.post(`/api/line-sets/${ls.id}/pieces`).send({ piece: piece({ spreadToM: null }), version: ls.version });
      expect(half.body.error.fields['piece.spreadToM']).toBeDefined();
      const past = await rail.post(`/api/line-sets/${ls.id}/pieces`).send({ piece: piece({ spreadFromM: null, spreadToM: null, positionM: 50 * FT }), version: ls.version });
      expect(past.status).toBe(400);
      expect(past.body.error.fields.positionM).toEqual(['Past the end of the batten']);
    });
  });

  describe('out of service', () => {
    it('needs a reason, and the planner and POST /api/sessions refuse the set until it is back', async () => {
      const ls = await lineSet(19);
      const noReason = await td.put(`/api/line-sets/${ls.id}/service`).send({ version: ls.version, inService: false });
      expect(noReason.status).toBe(400);
      expect(noReason.body.error.fields.reason).toEqual(['Say why the line set is out of service']);
      const out = await td.put(`/api/line-sets/${ls.id}/service`).send({ version: ls.version, inService: false, reason: 'Frayed lift line' });
      expect(out.body.lineSet.outOfService).toBe('Frayed lift line');
      const sessions = await count('loading_session');
      const refused = await rail.post('/api/sessions').send({ title: 'Out', lineSets: [{ lineSetId: ls.id, remove: [], add: [{ name: 'Lamp', massKg: 5, positionM: null }] }] });
      expect(refused.status).toBe(400);
      expect(refused.body.error.message).toMatch(/Line set 19 \(Spare pipe\): It is out of service \(Frayed lift line\)/);
      expect(await count('loading_session')).toBe(sessions);
      const back = await td.put(`/api/line-sets/${ls.id}/service`).send({ version: out.body.lineSet.version, inService: true, reason: 'Line replaced' });
      expect(back.body.lineSet.outOfService).toBeNull();
      const history = await deck.get(`/api/line-sets/${ls.id}/history`);
      expect(history.body.entries.map((e: { changes: Record<string, unknown> }) => e.changes.outOfService))
        .toEqual([['Frayed lift line', null], [null, 'Frayed lift line']]);
    });
  });

  describe('a line set in an open session', () => {
    it('cannot be edited, and the refusal names the session', async () => {
      const ls = await lineSet(5);
      const opened = await rail.post('/api/sessions').send({ title: 'Sky swap', lineSets: [{ lineSetId: ls.id, remove: [], add: [] }] });
      expect(opened.status).toBe(201);
      const edit = await td.put(`/api/line-sets/${ls.id}`).send({ lineSet: { ...fieldsOf(ls), notes: 'During a session' }, version: ls.version });
      expect(edit.status).toBe(409);
      expect(edit.body.error.message).toBe(`Line set 5 is in the open loading session "Sky swap" (session ${opened.body.session.id}): it cannot be edited until that session is finished or ended.`);
      const pieceEdit = await rail.put(`/api/pieces/${ls.pieces[0].id}`).send({ piece: piece(), version: ls.version });
      expect(pieceEdit.status).toBe(409);
      expect((await lineSet(5)).version).toBe(ls.version);
    });

    it('is marked in the schedule with its session, so the planner shows it before anyone plans on it', async () => {
      const held = await lineSet(5);
      expect(held.openSession).toMatchObject({ title: 'Sky swap' });
      expect((await lineSet(6)).openSession).toBeNull();
    });
  });

  describe('venue settings', () => {
    it('are saved whole, checked field by field, and kept in the history', async () => {
      const bad = await td.put('/api/venue').send({ name: '', units: 'cubits', settings: { ...DEFAULT_SETTINGS, ropeLockLimitKg: -1, reAlertSeconds: 1 } });
      expect(bad.status).toBe(400);
      expect(Object.keys(bad.body.error.fields)).toEqual(expect.arrayContaining(['name', 'units', 'settings.ropeLockLimitKg', 'settings.reAlertSeconds']));
      const saved = await td.put('/api/venue').send({
        name: 'Larkspur Playhouse', units: 'metric', reason: 'Touring rig is metric',
        settings: { ...DEFAULT_SETTINGS, ropeLockLimitKg: 40 * LB, caution: 'Two hands on every brick.' },
      });
      expect(saved.status).toBe(200);
      expect(saved.body.venue).toMatchObject({ units: 'metric', settings: { ropeLockLimitKg: 40 * LB, caution: 'Two hands on every brick.' } });
      const history = await td.get('/api/venue/history');
      expect(history.body.entries[0]).toMatchObject({ subject: 'venue', reason: 'Touring rig is metric', changes: { units: ['imperial', 'metric'], ropeLockLimitKg: [50 * LB, 40 * LB] } });
      await td.put('/api/venue').send({ name: 'Larkspur Playhouse', units: 'imperial', settings: DEFAULT_SETTINGS });
    });

    it('default to common practice: 50 lb rope lock, 10 ft lift line spacing, 24 in spreader plates', () => {
      // Rope lock 50 lb (common practice), lift lines at most 10 ft apart, a plate every 24 in (common practice).
      expect(DEFAULT_SETTINGS.ropeLockLimitKg).toBe(50 * 0.45359237);
      expect(DEFAULT_SETTINGS.maxSpanM).toBeCloseTo(10 * 0.3048, 12);
      expect(DEFAULT_SETTINGS.spreaderPlateEveryM).toBeCloseTo(24 * 0.0254, 12);
      expect(DEFAULT_SETTINGS.minCrew).toEqual({ rail: 1, loader: 2, deck: 1 });
    });
  });

  describe('bricks', () => {
    it('adds a type, corrects the bridge count with a reason, and refuses deleting a type on an arbor', async () => {
      const created = await td.post('/api/brick-types').send({ brickType: { code: 'quarter', name: 'Quarter brick', massKg: 5 * LB, heightM: 0.0127, widthM: 0.1016, depthM: 0.3048 } });
      expect(created.status, JSON.stringify(created.body)).toBe(201);
      const dupe = await td.post('/api/brick-types').send({ brickType: { code: 'quarter', name: 'Again', massKg: 1, heightM: null, widthM: null, depthM: null } });
      expect(dupe.body.error.fields.code).toEqual(['That code is taken']);
      const noReason = await td.put(`/api/brick-types/${created.body.brickType.id}/stock`).send({ bridgeCount: 12 });
      expect(noReason.status).toBe(400);
      const counted = await td.put(`/api/brick-types/${created.body.brickType.id}/stock`).send({ bridgeCount: 12, reason: 'Counted after get-in' });
      expect(counted.body.brickType.bridgeCount).toBe(12);
      const history = await td.get('/api/venue/history');
      expect(history.body.entries[0]).toMatchObject({ subject: 'bridge-stock', changes: { quarter: [0, 12] }, reason: 'Counted after get-in' });
      const full = (await td.get('/api/schedule')).body.brickTypes.find((b: { code: string }) => b.code === 'full');
      const inUse = await td.delete(`/api/brick-types/${full.id}`).send({});
      expect(inUse.status).toBe(409);
      expect(inUse.body.error.message).toMatch(/on the arbor of line set 1, 2/);
      expect((await td.delete(`/api/brick-types/${created.body.brickType.id}`).send({ reason: 'Sold' })).status).toBe(204);
    });
  });

  describe('another venue', () => {
    it('cannot read or change this venue\'s line sets, pieces or bricks', async () => {
      const { emails } = await addVenueWithPeople(t.database.owner, 'Quillfield Hall', ['admin', 'rail']);
      const other = await signedIn(t.url, emails.admin);
      const ls = await lineSet(7);
      expect((await other.put(`/api/line-sets/${ls.id}`).send({ lineSet: fieldsOf(ls), version: ls.version })).status).toBe(404);
      expect((await other.get(`/api/line-sets/${ls.id}/history`)).status).toBe(404);
      expect((await other.put(`/api/pieces/${ls.pieces[0].id}`).send({ piece: piece(), version: ls.version })).status).toBe(404);
      expect((await other.post(`/api/line-sets/${ls.id}/pieces`).send({ piece: piece(), version: ls.version })).status).toBe(404);
      const full = (await td.get('/api/schedule')).body.brickTypes[0];
      expect((await other.put(`/api/brick-types/${full.id}/stock`).send({ bridgeCount: 0, reason: 'x' })).status).toBe(404);
      expect((await lineSet(7)).version).toBe(ls.version);
    });
  });
});
