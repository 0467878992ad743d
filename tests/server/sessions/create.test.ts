import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApp, type TestApp } from '../../support/app';
import { addVenueWithPeople, signedIn, type Agent } from '../../support/people';
import { NOT_RAIL_LEAD_TEXT } from '@shared/protocol/sessions-api';
import { describeEntry } from '@shared/protocol/session';

const LB = 0.45359237;

describe('opening a session from the schedule', () => {
  let t: TestApp;
  let rail: Agent;
  let ids: Record<number, { id: number; pieces: { id: number }[] }>;
  const count = async () => Number((await t.database.owner.query('SELECT COUNT(*) AS n FROM loading_session'))[0].n);

  beforeAll(async () => {
    t = await startTestApp();
    rail = await signedIn(t.url, 'rail@larkspur.example');
    const { body } = await rail.get('/api/schedule');
    ids = Object.fromEntries(body.lineSets.map((l: { number: number; id: number; pieces: { id: number }[] }) => [l.number, l]));
  });
  afterAll(async () => { await t.close(); });

  it('refuses a piece the batten or its lift lines cannot carry, on the server as in the preview', async () => {
    const before = await count();
    const res = await rail.post('/api/sessions').send({
      title: 'Too heavy',
      lineSets: [{ lineSetId: ids[15].id, remove: [], add: [{ name: 'Steel truss', massKg: 600 * LB, positionM: 20 * 0.3048 }] }],
    });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/Line set 15 \(Spare pipe\)/);
    expect(res.body.error.message).toMatch(/lift line|batten/i);
    expect(await count()).toBe(before);
  });

  it('plans a piece that makes a lift line go slack, with a warning saying what each line carries', async () => {
    // The cases: 300 lb at 5 ft and 150 lb at 0 ft on a 40 ft spare pipe on five lift lines.
    const FT = 0.3048;
    const res = await rail.post('/api/sessions').send({
      title: 'Slack lines',
      lineSets: [
        { lineSetId: ids[19].id, remove: [], add: [{ name: 'Boat bow', massKg: 300 * LB, positionM: 5 * FT }] },
        { lineSetId: ids[29].id, remove: [], add: [{ name: 'Lantern', massKg: 150 * LB, positionM: 0 }] },
      ],
    });
    expect(res.status).toBe(201);
    const [row] = await t.database.owner.query('SELECT plan FROM loading_session WHERE id = ?', [res.body.session.id]);
    const plan = typeof row.plan === 'string' ? JSON.parse(row.plan) : row.plan;
    const slack = plan.lineSets.map((l: { warnings: { code: string; severity: string; message: string }[] }) => l.warnings.find((w) => w.code === 'lift-line-slack'));
    expect(slack[0]).toMatchObject({ severity: 'warning', message: expect.stringMatching(/^Lift line 3 .* goes slack.*line 3 is slack/) });
    expect(slack[1]).toMatchObject({ severity: 'warning', message: expect.stringMatching(/^Lift line 2 .* goes slack.*line 2 is slack/) });
  });

  it('refuses a piece that is not on that line set', async () => {
    const res = await rail.post('/api/sessions').send({ title: 'Wrong piece', lineSets: [{ lineSetId: ids[2].id, remove: [ids[7].pieces[0].id], add: [] }] });
    expect(res.status).toBe(400);
  });

  it('refuses a line set that is already in an open session', async () => {
    const first = await rail.post('/api/sessions').send({ title: 'First', lineSets: [{ lineSetId: ids[5].id, remove: [], add: [{ name: 'Gauze', massKg: 10, positionM: null }] }] });
    expect(first.status).toBe(201);
    const second = await rail.post('/api/sessions').send({ title: 'Second', lineSets: [{ lineSetId: ids[5].id, remove: [], add: [] }] });
    expect(second.status).toBe(409);
    expect(second.body.error.message).toMatch(/already in the open session "First"/);
  });

  it('warns when a line set was last found out of balance', async () => {
    await t.database.owner.query('UPDATE line_set SET out_of_balance = TRUE WHERE id = ?', [ids[9].id]);
    const res = await rail.post('/api/sessions').send({ title: 'Flagged', lineSets: [{ lineSetId: ids[9].id, remove: [], add: [{ name: 'Lamp', massKg: 5, positionM: null }] }] });
    expect(res.status).toBe(201);
    const [row] = await t.database.owner.query('SELECT plan FROM loading_session WHERE id = ?', [res.body.session.id]);
    const plan = typeof row.plan === 'string' ? JSON.parse(row.plan) : row.plan;
    expect(plan.lineSets[0].warnings.map((w: { code: string }) => w.code)).toContain('flagged-out-of-balance');
  });

  it('joins whoever starts it as the lead at once, in the same transaction, with its own log entry', async () => {
    const res = await rail.post('/api/sessions').send({ title: 'Led from the start', lineSets: [{ lineSetId: ids[6].id, remove: [], add: [{ name: 'Scrim', massKg: 8, positionM: null }] }] });
    expect(res.status).toBe(201);
    const [jo] = await t.database.owner.query("SELECT id FROM person WHERE email = 'rail@larkspur.example'");
    expect(res.body.state.leadPersonId).toBe(jo.id);
    expect(res.body.state.participants).toEqual([expect.objectContaining({ personId: jo.id, name: 'Jo Castellan', role: 'rail' })]);
    const { body } = await rail.get(`/api/sessions/${res.body.session.id}/record`);
    expect(body.chain).toEqual({ ok: true });
    expect(body.entries.map((e: { kind: string }) => e.kind)).toEqual(['session-opened', 'joined']);
    expect(body.entries[1]).toMatchObject({ personId: jo.id, personName: 'Jo Castellan', role: 'rail', details: { lead: true } });
    // Joining again is already done, not a second participant.
    const again = await rail.post(`/api/sessions/${res.body.session.id}/actions`).send({ key: 'join-again-1', clientTimeMs: Date.now(), action: { type: 'join', role: 'rail' } });
    expect(again.status).toBe(409);
    expect(again.body.error.message).toBe('You have already joined as rail operator.');
  });

  it('refuses a person without the rail role, saying a rail operator must lead, and writes nothing', async () => {
    const td = await signedIn(t.url, 'td@larkspur.example');
    const before = await count();
    const res = await td.post('/api/sessions').send({ title: 'By the director', lineSets: [{ lineSetId: ids[8].id, remove: [], add: [{ name: 'Cloth', massKg: 8, positionM: null }] }] });
    expect(res.status).toBe(403);
    expect(res.body.error.message).toBe(NOT_RAIL_LEAD_TEXT);
    expect(await count()).toBe(before);
  });

  it('refuses a rail operator of another venue naming these line sets (no such line set there)', async () => {
    const { emails } = await addVenueWithPeople(t.database.owner, 'Quillfield Hall', ['rail']);
    const outsider = await signedIn(t.url, emails.rail);
    const res = await outsider.post('/api/sessions').send({ title: 'Not ours', lineSets: [{ lineSetId: ids[8].id, remove: [], add: [] }] });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/No such line set at this venue/);
  });

  it('keeps the venue\'s units in the session, so a metric venue\'s sentences read kilograms', async () => {
    await t.database.owner.query("UPDATE venue SET units = 'metric'");
    const res = await rail.post('/api/sessions').send({ title: 'Metric', lineSets: [{ lineSetId: ids[35].id, remove: [], add: [{ name: 'Lamp', massKg: 40, positionM: null }] }] });
    expect(res.status).toBe(201);
    const [row] = await t.database.owner.query('SELECT state FROM loading_session WHERE id = ?', [res.body.session.id]);
    const state = typeof row.state === 'string' ? JSON.parse(row.state) : row.state;
    expect(state.settings.units).toBe('metric');
    // And its spreader-plate spacing (the demo's 24 in, common practice), for the steps of a correction.
    expect(state.settings.spreaderSpacingM).toBeCloseTo(24 * 0.0254, 9);
    // A log sentence with a weight in it, read against that state, is in kilograms.
    expect(describeEntry({ kind: 'step-confirmed', role: 'loader', personName: 'Sam', lineSetId: state.lineSets[0].id, details: { imbalanceKg: 4.5, text: 'loaded 4 bricks' } }, state))
      .toBe('Sam loaded 4 bricks on Line set 35 (Spare pipe): now 4.5 kg pipe-heavy.');
  });
});
