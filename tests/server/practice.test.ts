import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { computeDebrief, SIMULATED_ID_BASE } from '@shared/practice';
import type { PracticeStart } from '@shared/protocol/practice';
import { pieceKey } from '@shared/protocol/sessions-api';
import { startTestApp, type TestApp } from '../support/app';
import { signedIn, type Agent } from '../support/people';
import { playPractice } from '../support/practice';

/** The real record and the venue's data: a practice must leave every one of these as it was. */
const REAL_TABLES = ['venue', 'person', 'venue_role', 'line_set', 'piece', 'brick_type', 'loading_session', 'session_event', 'session_action_key'];

describe('practice sessions', () => {
  let t: TestApp;
  let loader: Agent;
  let rail: Agent;
  let td: Agent;
  let lineSet7: { id: number; pieces: number[] };

  const fingerprint = async () => {
    const rows: Array<{ Table: string; Checksum: string }> = await t.database.owner.query(`CHECKSUM TABLE ${REAL_TABLES.join(', ')}`);
    return Object.fromEntries(rows.map((r) => [r.Table.split('.').pop(), r.Checksum]));
  };

  beforeAll(async () => {
    t = await startTestApp();
    loader = await signedIn(t.url, 'loader1@larkspur.example');
    rail = await signedIn(t.url, 'rail@larkspur.example');
    td = await signedIn(t.url, 'td@larkspur.example');
    const [ls] = await t.database.owner.query('SELECT id FROM line_set WHERE number = 7');
    const pieces = await t.database.owner.query('SELECT id FROM piece WHERE line_set_id = ? ORDER BY id', [ls.id]);
    lineSet7 = { id: ls.id, pieces: pieces.map((p: { id: number }) => p.id) };
  });
  afterAll(async () => { await t.close(); });

  it('sets up a practice on a real line set, keeps it once, and writes nothing to the schedule, stock or log', async () => {
    const before = await fingerprint();
    const started = await rail.post('/api/practice-runs').send({ role: 'rail', source: { kind: 'line-sets', lineSets: [{ lineSetId: lineSet7.id, remove: lineSet7.pieces }] } });
    expect(started.status, JSON.stringify(started.body)).toBe(201);
    const start = started.body as PracticeStart;
    expect(start.setup.session.lineSets[0].name).toMatch(/^Line set 7/);
    expect(Object.keys(start.setup.session.lineSets[0].pieceNames ?? {})).toEqual(lineSet7.pieces.map(pieceKey));

    const { taps, endedAtMs, engine } = playPractice(start, Date.now());
    expect(engine.state.endedHow).toBe('complete');
    const kept = await rail.put(`/api/practice-runs/${start.practice.id}/result`).send({ taps, endedAtMs });
    expect(kept.status, JSON.stringify(kept.body)).toBe(200);
    // The server's debrief, from the taps played again, is the one the phone computes.
    expect(kept.body.debrief).toEqual(computeDebrief(start.setup, taps, endedAtMs));
    expect(kept.body.practice.outcome).toBe('complete');
    expect(kept.body.log).toEqual(engine.log);

    expect((await rail.put(`/api/practice-runs/${start.practice.id}/result`).send({ taps, endedAtMs })).status).toBe(409);
    expect(await fingerprint()).toEqual(before);
    const [{ n }] = await t.database.owner.query('SELECT COUNT(*) AS n FROM practice_run');
    expect(Number(n)).toBe(1);
  });

  it('runs an invented line set for a loader, with a simulated rail operator leading', async () => {
    const start = (await loader.post('/api/practice-runs').send({ role: 'loader', source: { kind: 'invented' }, pace: 0.5 })).body as PracticeStart;
    expect(start.pace).toBe(0.5);
    const { taps, endedAtMs, engine } = playPractice(start, Date.now());
    expect(engine.people.find((p) => p.personId === engine.state.leadPersonId)?.simulated).toBe(true);
    const kept = await loader.put(`/api/practice-runs/${start.practice.id}/result`).send({ taps, endedAtMs });
    expect(kept.status, JSON.stringify(kept.body)).toBe(200);
    expect(kept.body.practice.role).toBe('loader');
  });

  it('keeps a practice stopped half way as stopped', async () => {
    const start = (await loader.post('/api/practice-runs').send({ role: 'deck', source: { kind: 'invented' } })).body as PracticeStart;
    const { taps, endedAtMs } = playPractice(start, Date.now(), { stopAfterTaps: 8 });
    const kept = await loader.put(`/api/practice-runs/${start.practice.id}/result`).send({ taps, endedAtMs });
    expect(kept.body.practice.outcome).toBe('stopped');
  });

  it('refuses taps that did not come from the practice, and leaves it open', async () => {
    const start = (await loader.post('/api/practice-runs').send({ role: 'loader', source: { kind: 'invented' } })).body as PracticeStart;
    const { taps, endedAtMs } = playPractice(start, Date.now());
    const path = `/api/practice-runs/${start.practice.id}/result`;
    const stranger = [...taps.slice(0, 5), { atMs: taps[4].atMs, personId: SIMULATED_ID_BASE + 99, action: { type: 'answer-clear' } }];
    const r1 = await loader.put(path).send({ taps: stranger, endedAtMs });
    expect(r1.status).toBe(400);
    expect(r1.body.error.message).toMatch(/nobody with that id/);
    const early = [...taps.slice(0, 6), { atMs: taps[5].atMs, personId: 0, action: { type: 're-alert', personIds: [SIMULATED_ID_BASE + 1] } }];
    expect((await loader.put(path).send({ taps: early, endedAtMs })).body.error.message).toMatch(/before it was due/);
    const backwards = [taps[1], taps[0], ...taps.slice(2)].map((x, i) => (i === 0 ? { ...x, atMs: x.atMs + 1 } : x));
    expect((await loader.put(path).send({ taps: backwards, endedAtMs })).status).toBe(400);
    expect((await loader.put(path).send({ taps: taps.slice(0, 3), endedAtMs: taps[0].atMs - 1 })).status).toBe(400);
    expect((await loader.put(path).send({ taps: [{ atMs: 'soon' }], endedAtMs })).body.error.code).toBe('bad-input');
    // Someone else cannot keep (or read) it.
    expect((await rail.put(path).send({ taps, endedAtMs })).status).toBe(404);
    expect((await rail.get(`/api/practice-runs/${start.practice.id}`)).status).toBe(404);
    const kept = await loader.put(path).send({ taps, endedAtMs });
    expect(kept.status).toBe(200);
  });

  it('refuses a practice plan that cannot be run', async () => {
    const res = await rail.post('/api/practice-runs').send({ role: 'rail', source: { kind: 'line-sets', lineSets: [{ lineSetId: 999999 }] } });
    expect(res.status).toBe(400);
    expect((await rail.post('/api/practice-runs').send({ role: 'admin', source: { kind: 'invented' } })).body.error.fields).toHaveProperty('role');
  });

  it("shows the technical director everyone's practice, and each person only their own", async () => {
    const all = (await td.get('/api/practice-runs')).body.practices as Array<{ personName: string; outcome: string; figures: unknown }>;
    expect(new Set(all.map((p) => p.personName))).toEqual(new Set(['Jo Castellan', 'Sam Brightwater']));
    expect(all.find((p) => p.outcome === 'complete')?.figures).toBeTruthy();
    const mine = (await rail.get('/api/practice-runs')).body.practices as Array<{ personName: string }>;
    expect(mine.every((p) => p.personName === 'Jo Castellan')).toBe(true);
    const [sam] = await t.database.owner.query("SELECT id FROM person WHERE email = 'loader1@larkspur.example'");
    const samOnly = (await td.get(`/api/practice-runs?personId=${sam.id}`)).body.practices as Array<{ personName: string }>;
    expect(samOnly.length).toBeGreaterThan(0);
    expect(samOnly.every((p) => p.personName === 'Sam Brightwater')).toBe(true);
    const one = all[0] as unknown as { id: number };
    expect((await td.get(`/api/practice-runs/${one.id}`)).status).toBe(200);
  });
});
