import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { randomUUID } from 'node:crypto';
import { startTestApp, type TestApp } from '../../support/app';
import { demoCrew, drapeUnloadFixture, openDrapeUnload, type Phone } from '../../support/crew';
import { verifyChain } from '../../../server/features/sessions/hash-chain';
import type { SessionAction } from '@shared/protocol/session';

describe('retries, races and a restart mid-session', () => {
  let t: TestApp;
  let crew: Awaited<ReturnType<typeof demoCrew>>;
  let sessionId: number;
  const go = (phone: Phone, action: SessionAction) => phone.must(sessionId, action);
  const entryCount = async () => Number((await t.database.owner.query('SELECT COUNT(*) AS n FROM session_event WHERE session_id = ?', [sessionId]))[0].n);

  beforeAll(async () => {
    t = await startTestApp();
    crew = await demoCrew(t.url);
    ({ sessionId } = await openDrapeUnload(t.url, crew.rail.cookie));
    for (const phone of crew.all) await phone.watch(sessionId);
    await go(crew.loader1, { type: 'join', role: 'loader' });
    await go(crew.loader2, { type: 'join', role: 'loader' });
    await go(crew.deck, { type: 'join', role: 'deck' });
    await go(crew.sm, { type: 'join', role: 'stage-manager' });
    await go(crew.rail, { type: 'begin' });
  });
  afterAll(async () => {
    crew.all.forEach((p) => p.close());
    await t.close();
  });

  it('takes the same key twice as one action with one effect, on the socket and over HTTP', async () => {
    const key = randomUUID();
    const before = await entryCount();
    const first = await crew.rail.act(sessionId, { type: 'call-move' }, key);
    const again = await crew.rail.act(sessionId, { type: 'call-move' }, key);
    const overHttp = await request(t.url).post(`/api/sessions/${sessionId}/actions`).set('Cookie', crew.rail.cookie)
      .send({ key, clientTimeMs: Date.now(), action: { type: 'call-move' } });
    expect(first.ok).toBe(true);
    expect(again).toMatchObject({ ok: true, seq: first.ok ? first.seq : -1 });
    expect(overHttp.body.seq).toBe(first.ok ? first.seq : -1);
    expect(await entryCount()).toBe(before + 1);
  });

  it('takes two identical keys sent at the same moment once', async () => {
    const key = randomUUID();
    const before = await entryCount();
    const [a, b] = await Promise.all([
      crew.deck.act(sessionId, { type: 'answer-clear' }, key),
      crew.deck.act(sessionId, { type: 'answer-clear' }, key),
    ]);
    expect(a).toEqual(b);
    expect(await entryCount()).toBe(before + 1);
  });

  it('accepts one of two loaders confirming the same step at the same moment and tells the other it is done', async () => {
    await go(crew.loader1, { type: 'answer-clear' });
    await go(crew.loader2, { type: 'answer-clear' });
    await go(crew.rail, { type: 'confirm-locked' });
    await go(crew.loader1, { type: 'call-clear-rail' });
    await go(crew.rail, { type: 'confirm-rail-clear' });
    const [a, b] = await Promise.all([
      crew.loader1.act(sessionId, { type: 'confirm-step', stepIndex: 0 }),
      crew.loader2.act(sessionId, { type: 'confirm-step', stepIndex: 0 }),
    ]);
    const answers = [a, b].sort((x, y) => Number(y.ok) - Number(x.ok));
    expect(answers[0].ok).toBe(true);
    expect(answers[1]).toMatchObject({ ok: false, error: { code: 'conflict' } });
    const state = (await request(t.url).get(`/api/sessions/${sessionId}`).set('Cookie', crew.sm.cookie)).body.state;
    expect(state.lineSets[0].done.filter(Boolean)).toHaveLength(1);
  });

  it('carries on after a restart: phones catch up from their last entry and finish the session', async () => {
    await go(crew.deck, { type: 'confirm-step', stepIndex: 1 });
    const before = await entryCount();
    for (const phone of crew.all) await phone.caughtUpTo(before);
    const heldBySm = crew.sm.lastSeq;

    // The stage manager's phone loses signal; the server then restarts (app and pool closed).
    crew.sm.drop();
    crew.all.filter((p) => p !== crew.sm).forEach((p) => p.drop());
    await t.stop();
    t = await t.restart();

    for (const phone of crew.all.filter((p) => p !== crew.sm)) {
      await phone.reconnect(t.url);
      const res = await phone.watch(sessionId);
      expect(res.ok && res.entries.every((e) => e.seq > heldBySm)).toBe(true);
    }
    await go(crew.loader2, { type: 'confirm-step', stepIndex: 2 });
    await go(crew.deck, { type: 'confirm-step', stepIndex: 3 });
    await go(crew.loader1, { type: 'call-loading-complete' });
    await go(crew.rail, { type: 'record-test', result: 'pipe-heavy', estimateKg: 2, note: 'Slight drift down' });

    // The stage manager comes back and asks for exactly what was missed.
    await crew.sm.reconnect(t.url);
    const catchUp = await crew.sm.watch(sessionId, heldBySm);
    expect(catchUp.ok).toBe(true);
    if (!catchUp.ok) return;
    expect(catchUp.entries[0].seq).toBe(heldBySm + 1);
    const log = crew.sm.log();
    expect(log).toHaveLength(await entryCount());
    const record = (await request(t.url).get(`/api/sessions/${sessionId}/record`).set('Cookie', crew.sm.cookie)).body;
    expect(verifyChain(log, record.genesisHash, record)).toEqual({ ok: true });
    expect(catchUp.state.lineSets[0].flagged).toBe(true);

    // An out-of-balance result keeps the line set flagged on the schedule until a balanced test.
    const flagged = (await request(t.url).get('/api/schedule').set('Cookie', crew.rail.cookie)).body.lineSets.find((l: { number: number }) => l.number === 7);
    expect(flagged.outOfBalance).toBe(true);
  });

  it('answers GET events?after=N with exactly the entries after N', async () => {
    const { body } = await request(t.url).get(`/api/sessions/${sessionId}/events?after=5`).set('Cookie', crew.deck.cookie);
    expect(body.entries[0].seq).toBe(6);
    expect(body.entries.at(-1).seq).toBe(body.lastSeq);
  });
});

describe('action keys belong to their first use', () => {
  const f = drapeUnloadFixture();

  it('refuses the same key from another person, or for another action, and tells keys apart by case', async () => {
    const { crew, sessionId } = f;
    const key = 'Key-of-the-rail-1';
    expect((await crew.rail.act(sessionId, { type: 'note', text: 'first' }, key)).ok).toBe(true);
    expect(await crew.deck.act(sessionId, { type: 'join', role: 'deck' }, key)).toMatchObject({ ok: false, error: { code: 'conflict' } });
    expect(await crew.rail.act(sessionId, { type: 'note', text: 'hello' }, key)).toMatchObject({ ok: false, error: { code: 'conflict' } });
    expect((await crew.deck.act(sessionId, { type: 'join', role: 'deck' }, key.toLowerCase())).ok).toBe(true);
  });
});

describe('a person whose roles are taken away', () => {
  const f = drapeUnloadFixture({ watch: true });

  it('stops receiving the session on the phone already open, and cannot watch it again', async () => {
    const { t, crew, sessionId } = f;
    const [deck] = await t.database.owner.query("SELECT id FROM person WHERE email = 'deck@larkspur.example'");
    const admin = await request.agent(t.url);
    await admin.post('/api/auth/sign-in').send({ email: 'td@larkspur.example', password: 'larkspur-demo' });
    expect((await admin.put(`/api/people/${deck.id}/roles`).send({ roles: [] })).status).toBe(200);
    await new Promise((r) => setTimeout(r, 100));
    const seq = await crew.rail.must(sessionId, { type: 'note', text: 'Robin is off the crew tonight' });
    await crew.sm.caughtUpTo(seq);
    expect(crew.deck.lastSeq).toBeLessThan(seq);
    expect(await crew.deck.watch(sessionId)).toMatchObject({ ok: false, error: { code: 'forbidden' } });
  });
});
