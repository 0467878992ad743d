import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { stringify } from 'csv-stringify/sync';
import { DEFAULT_SETTINGS, type HistoryEntry, type LineSetView } from '@shared/protocol/schedule';
import { csvHeaders } from '@shared/protocol/schedule-csv';
import { startTestApp, type TestApp } from '../support/app';
import { addVenueWithPeople, signedIn, type Agent } from '../support/people';

// Exact definitions: 1 lb = 0.45359237 kg, 1 ft = 0.3048 m (1959 international yard and pound agreement; NIST SP 811).
const LB = 0.45359237;
const FT = 0.3048;

type Row = Record<string, string>;
const emptyRow = (units: 'imperial' | 'metric'): Row => Object.fromEntries(csvHeaders(units).map((h) => [h, '']));
/** Ten new line sets of the imperial demo kind, each with one piece spread along part of its batten. */
function tenNewSets(from: number): string {
  const rows: Row[] = [];
  for (let n = from; n < from + 10; n++) {
    rows.push({
      ...emptyRow('imperial'), row: 'line set', line_set: String(n), name: `Tour set ${n}`, distance_from_plaster_line_ft: String(n / 2),
      purchase: '1', pipe: '1-1/2 in Schedule 40', pipe_weight_lb_per_ft: '2.72', batten_length_ft: '40', lift_lines_ft: '2;11;20;29;38',
      batten_rating_lb_per_ft: '25', lift_line_rating_lb: '500', arbor_empty_lb: '90', arbor_capacity_lb: '1200',
      high_trim_ft: '30', low_trim_ft: '3.5', bricks: 'full:2', notes: 'From the touring plot',
    });
    rows.push({ ...emptyRow('imperial'), row: 'piece', line_set: String(n), name: `Tour drape ${n}`, weight_lb: '42.5', spread_from_ft: '4', spread_to_ft: '36', department: 'Soft goods' });
  }
  return stringify(rows, { header: true, columns: csvHeaders('imperial') });
}

describe('the schedule as CSV', () => {
  let t: TestApp;
  let td: Agent;
  let rail: Agent;
  const count = async (table: string) => Number((await t.database.owner.query(`SELECT COUNT(*) AS n FROM ${table}`))[0].n);
  const exported = async (agent: Agent) => {
    const res = await agent.get('/api/schedule/csv').buffer(true).parse((r, cb) => { let s = ''; r.on('data', (c: Buffer) => { s += c; }); r.on('end', () => cb(null, s)); });
    expect(res.status).toBe(200);
    return res.body as string;
  };
  const preview = (agent: Agent, csv: string) => agent.post('/api/schedule/csv/preview').set('Content-Type', 'text/csv').send(csv);
  const importCsv = async (agent: Agent, csv: string) => {
    const p = await preview(agent, csv);
    expect(p.status, JSON.stringify(p.body)).toBe(200);
    return agent.post(`/api/schedule/csv/import?token=${p.body.token}`).set('Content-Type', 'text/csv').send(csv);
  };
  const schedule = async (agent: Agent) => (await agent.get('/api/schedule')).body as { lineSets: LineSetView[] };
  const setUnits = async (agent: Agent, units: 'imperial' | 'metric') => {
    const { venue } = (await agent.get('/api/venue')).body;
    expect((await agent.put('/api/venue').send({ name: venue.name, units, settings: venue.settings })).status).toBe(200);
  };

  beforeAll(async () => {
    t = await startTestApp();
    td = await signedIn(t.url, 'td@larkspur.example');
    rail = await signedIn(t.url, 'rail@larkspur.example');
  });
  afterAll(async () => { await t.close(); });

  it('exports every line set and piece in the venue\'s units, headers naming them', async () => {
    const csv = await exported(rail);
    const rows: Row[] = parse(csv, { columns: true });
    expect(Object.keys(rows[0])).toEqual(csvHeaders('imperial'));
    const ls9 = rows.find((r) => r.row === 'line set' && r.line_set === '9')!;
    expect(ls9).toMatchObject({ name: 'Lighthouse lamp', batten_length_ft: '40', lift_lines_ft: '2;11;20;29;38', lift_line_rating_lb: '500', purchase: '1' });
    expect(rows.find((r) => r.row === 'piece' && r.line_set === '9')).toMatchObject({ name: 'Lamp room flat', weight_lb: '150', at_ft: '20' });
    expect(rows.find((r) => r.line_set === '22' && r.row === 'line set')!.out_of_service).toMatch(/Loft block/);
  });

  for (const units of ['imperial', 'metric'] as const) {
    it(`round-trips exactly in ${units}: importing its own export changes nothing`, async () => {
      await setUnits(td, units);
      const csv = await exported(td);
      expect(csv.split('\n')[0]).toBe(csvHeaders(units).join(','));
      const before = await schedule(td);
      const history = await count('schedule_change');
      const p = await preview(td, csv);
      expect(p.body.counts).toMatchObject({ created: 0, updated: 0, piecesCreated: 0, piecesUpdated: 0, piecesDeleted: 0 });
      const done = await importCsv(td, csv);
      expect(done.status).toBe(200);
      expect(await schedule(td)).toEqual(before);
      expect(await count('schedule_change')).toBe(history);
      expect(await exported(td)).toBe(csv);
    });

    it(`round-trips exactly in ${units} through an empty venue: the second export is the same file`, async () => {
      await setUnits(td, units);
      const csv = await exported(td);
      const { venueId, emails } = await addVenueWithPeople(t.database.owner, `Empty hall ${units}`, ['admin']);
      await t.database.owner.query("INSERT INTO brick_type (venue_id, code, name, mass_kg) VALUES (?, 'full', 'Full', ?), (?, 'half', 'Half', ?)", [venueId, 20 * LB, venueId, 10 * LB]);
      const other = await signedIn(t.url, emails.admin);
      await setUnits(other, units);
      const done = await importCsv(other, csv);
      expect(done.status, JSON.stringify(done.body)).toBe(200);
      expect(done.body.counts.created).toBeGreaterThanOrEqual(30);
      expect(await exported(other)).toBe(csv);
      await setUnits(td, 'imperial');
    });
  }

  it('imports ten new line sets with their pieces, converting with the exact definitions', async () => {
    const csv = tenNewSets(101);
    const p = await preview(td, csv);
    expect(p.body.counts).toMatchObject({ created: 10, updated: 0, piecesCreated: 10 });
    expect(await count('line_set')).toBeGreaterThan(0);
    const sets = await count('line_set');
    const done = await importCsv(td, csv);
    expect(done.status).toBe(200);
    expect(await count('line_set')).toBe(sets + 10);
    const ls = (await schedule(td)).lineSets.find((l) => l.number === 101)!;
    expect(ls.pipeLengthM).toBeCloseTo(40 * FT, 12); // 12.192 m
    expect(ls.lowTrimM).toBeCloseTo(3.5 * FT, 12);
    expect(ls.pipeKgPerM).toBeCloseTo(2.72 * LB / FT, 12);
    expect(ls.liftLineRatingKg).toBeCloseTo(500 * LB, 12); // 226.796185 kg
    expect(ls.pieces[0]).toMatchObject({ name: 'Tour drape 101', spreadFromM: 4 * FT, spreadToM: 36 * FT, positionM: null });
    expect(ls.pieces[0].massKg).toBeCloseTo(42.5 * LB, 12);
    const history = (await td.get(`/api/line-sets/${ls.id}/history`)).body.entries;
    expect(history.map((e: { via: string; subject: string }) => `${e.subject} ${e.via}`)).toEqual(['piece CSV import', 'line-set CSV import']);
    // Each history row names the row it made (the batched insert reads the new ids back).
    expect(history.map((e: HistoryEntry) => [e.subject, e.action, e.subjectId, e.lineSetId])).toEqual([
      ['piece', 'create', ls.pieces[0].id, ls.id], ['line-set', 'create', ls.id, ls.id],
    ]);
    expect(history[0].changes.name).toEqual([null, 'Tour drape 101']);
    expect(history[1].changes.number).toEqual([null, 101]);
  });

  it('keeps one history row per piece added, changed or removed by an import, naming each piece', async () => {
    const before = (await schedule(td)).lineSets.find((l) => l.number === 103)!;
    const kept = new Set(((await td.get(`/api/line-sets/${before.id}/history`)).body.entries as HistoryEntry[]).map((e) => e.id));
    const rows: Row[] = parse(await exported(td), { columns: true });
    const drape = rows.findIndex((r) => r.row === 'piece' && r.name === 'Tour drape 103');
    rows.splice(drape, 1,
      { ...rows[drape], name: 'Tour border 103', weight_lb: '30' },
      { ...rows[drape], name: 'Tour leg 103', weight_lb: '18', spread_from_ft: '', spread_to_ft: '', at_ft: '6' });
    const done = await importCsv(td, stringify(rows, { header: true, columns: csvHeaders('imperial') }));
    expect(done.status, JSON.stringify(done.body)).toBe(200);
    expect(done.body.counts).toMatchObject({ updated: 1, piecesCreated: 2, piecesDeleted: 1 });
    const after = (await schedule(td)).lineSets.find((l) => l.number === 103)!;
    expect(after.pieces.map((p) => p.name)).toEqual(['Tour border 103', 'Tour leg 103']);
    const history: HistoryEntry[] = (await td.get(`/api/line-sets/${after.id}/history`)).body.entries;
    const byImport = history.filter((e) => !kept.has(e.id));
    const id = (name: string) => after.pieces.find((p) => p.name === name)!.id;
    // The set's own fields are unchanged, so it has no row of its own (an empty change is not kept).
    expect(byImport.map((e) => [e.subject, e.action, e.subjectId]).sort()).toEqual([
      ['piece', 'create', id('Tour border 103')], ['piece', 'create', id('Tour leg 103')], ['piece', 'delete', before.pieces[0].id],
    ].sort());
    expect(after.version).toBe(before.version + 1);
    expect(byImport.every((e) => e.via === 'CSV import' && e.personName !== '')).toBe(true);
  });

  it('previews a change as old and new values, then writes only that', async () => {
    const rows: Row[] = parse(await exported(td), { columns: true });
    rows.find((r) => r.row === 'piece' && r.name === 'Tour drape 101')!.weight_lb = '60';
    rows.find((r) => r.row === 'line set' && r.line_set === '102')!.notes = 'Re-hung';
    const csv = stringify(rows, { header: true, columns: csvHeaders('imperial') });
    const p = await preview(td, csv);
    expect(p.body.counts).toMatchObject({ created: 0, updated: 2, piecesUpdated: 1 });
    const ls101 = p.body.lineSets.find((c: { number: number }) => c.number === 101);
    expect(ls101.pieces).toEqual([{ name: 'Tour drape 101', action: 'update', fields: [{ column: 'weight_lb', old: '42.5', new: '60' }] }]);
    expect((await td.post(`/api/schedule/csv/import?token=${p.body.token}`).set('Content-Type', 'text/csv').send(csv)).status).toBe(200);
    expect((await schedule(td)).lineSets.find((l) => l.number === 101)!.pieces[0].massKg).toBeCloseTo(60 * LB, 12);
  });

  it('refuses a file with bad rows whole, listing every row and column error, writing nothing', async () => {
    const rows: Row[] = parse(tenNewSets(201), { columns: true });
    rows[0].batten_length_ft = 'forty';
    rows[2].purchase = '3';
    rows[4].bricks = 'lead:4';
    rows[9].spread_to_ft = '99';
    rows[7].weight_lb = '';
    rows.push({ ...emptyRow('imperial'), row: 'piece', line_set: '999', name: 'Stray', weight_lb: '1' });
    rows.push({ ...emptyRow('imperial'), row: 'truss', line_set: '201' });
    const csv = stringify(rows, { header: true, columns: csvHeaders('imperial') });
    const [sets, history] = [await count('line_set'), await count('schedule_change')];
    const res = await preview(td, csv);
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields)).toEqual([
      'line 2: batten_length_ft', 'line 4: purchase', 'line 6: bricks', 'line 9: weight_lb', 'line 11: spread_to_ft', 'line 22: line_set', 'line 23: row',
    ]);
    expect(res.body.error.message).toMatch(/^The file was not imported: 7 problems\. Line 2, batten_length_ft: "forty" is not a number/);
    const imported = await td.post(`/api/schedule/csv/import?token=${'0'.repeat(64)}`).set('Content-Type', 'text/csv').send(csv);
    expect(imported.status).toBe(400);
    expect([await count('line_set'), await count('schedule_change')]).toEqual([sets, history]);
  });

  it('refuses a header that lacks columns, and a file that is not CSV', async () => {
    const res = await preview(td, 'row,line_set,name\nline set,1,Oops\n');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/The header lacks distance_from_plaster_line_ft/);
    expect((await preview(td, '"unclosed,quote\n')).status).toBe(400);
  });

  it('refuses an import when the schedule changed after the preview, or a set is in an open session', async () => {
    const rows: Row[] = parse(await exported(td), { columns: true });
    rows.find((r) => r.row === 'line set' && r.line_set === '103')!.notes = 'Preview then race';
    const csv = stringify(rows, { header: true, columns: csvHeaders('imperial') });
    const p = await preview(td, csv);
    const ls = (await schedule(td)).lineSets.find((l) => l.number === 103)!;
    const fields = Object.fromEntries(['number', 'name', 'distanceM', 'purchase', 'pipeSize', 'pipeKgPerM', 'pipeLengthM', 'liftLinesM', 'liftLineRatingKg', 'battenRatingKgPerM', 'arborKg', 'arborCapacityKg', 'highTrimM', 'lowTrimM', 'notes', 'bricks'].map((f) => [f, ls[f as keyof LineSetView]]));
    expect((await td.put(`/api/line-sets/${ls.id}`).send({ lineSet: { ...fields, name: 'Renamed first' }, version: ls.version })).status).toBe(200);
    const late = await td.post(`/api/schedule/csv/import?token=${p.body.token}`).set('Content-Type', 'text/csv').send(csv);
    expect(late.status).toBe(409);
    expect(late.body.error.message).toMatch(/changed after the preview/);

    const opened = await rail.post('/api/sessions').send({ title: 'Held', lineSets: [{ lineSetId: ls.id, remove: [], add: [] }] });
    expect(opened.status).toBe(201);
    const held = await preview(td, csv);
    expect(held.status).toBe(400);
    expect(held.body.error.message).toMatch(/Line set 103 is in the open loading session "Held"/);
  });

  it('lets only those who may edit line sets import; anyone at the venue exports', async () => {
    expect((await preview(rail, tenNewSets(301))).status).toBe(403);
    expect(DEFAULT_SETTINGS.railEditsLineSets).toBe(false);
  });
});
