import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestApp, type TestApp } from '../../support/app';
import { demoCrew, openDrapeUnload, type Phone } from '../../support/crew';
import { verifyChain } from '../../../server/features/sessions/hash-chain';

describe('a full unload of two drapes from line set 7', () => {
  let t: TestApp;
  let crew: Awaited<ReturnType<typeof demoCrew>>;
  let sessionId: number;
  let lastSeq = 0;

  beforeAll(async () => {
    t = await startTestApp();
    crew = await demoCrew(t.url);
    ({ sessionId } = await openDrapeUnload(t.url, crew.rail.cookie));
    for (const phone of crew.all) expect((await phone.watch(sessionId)).ok).toBe(true);
  });
  afterAll(async () => {
    crew.all.forEach((p) => p.close());
    await t.close();
  });

  const go = async (phone: Phone, action: Parameters<Phone['must']>[1]) => { lastSeq = await phone.must(sessionId, action); };

  it('plans pull, strike, pull, strike, test: no tie-off for a 40 lb drape under a 50 lb rope lock', async () => {
    const { body } = await request(t.url).get(`/api/sessions/${sessionId}`).set('Cookie', crew.sm.cookie);
    // Order of operations (common practice): bricks off the arbor before each piece comes off the batten.
    expect(body.state.lineSets[0].steps.map((s: { kind: string }) => s.kind))
      .toEqual(['remove-bricks', 'remove-piece', 'remove-bricks', 'remove-piece', 'test-balance']);
  });

  it('runs from joining to the test of balance, every call answered', async () => {
    await go(crew.loader1, { type: 'join', role: 'loader' });
    await go(crew.loader2, { type: 'join', role: 'loader' });
    await go(crew.deck, { type: 'join', role: 'deck' });
    await go(crew.sm, { type: 'join', role: 'stage-manager' });
    await go(crew.rail, { type: 'begin' });
    await go(crew.rail, { type: 'call-move' });
    for (const p of [crew.deck, crew.loader1, crew.loader2]) await go(p, { type: 'answer-clear' });
    await go(crew.rail, { type: 'confirm-locked' });
    await go(crew.loader1, { type: 'call-clear-rail' });
    await go(crew.rail, { type: 'confirm-rail-clear' });
    await go(crew.loader1, { type: 'confirm-step', stepIndex: 0 });
    await go(crew.deck, { type: 'confirm-step', stepIndex: 1 });
    await go(crew.loader2, { type: 'confirm-step', stepIndex: 2 });
    await go(crew.deck, { type: 'confirm-step', stepIndex: 3 });
    await go(crew.loader1, { type: 'call-loading-complete' });
    await go(crew.rail, { type: 'record-test', result: 'balanced' });

    const state = crew.rail.state!;
    expect(state.lineSets[0].stage).toBe('tested');
    expect(state.phase).toBe('finished');
    expect(state.lineSets[0].load.pieces).toEqual([]);
    expect(state.lineSets[0].imbalanceKg).toBeGreaterThanOrEqual(0);
  });

  it('broadcast every entry to every phone, in order and without gaps', async () => {
    for (const phone of crew.all) await phone.caughtUpTo(lastSeq);
    const reference = crew.sm.log().map((e) => e.hash);
    for (const phone of crew.all) expect(phone.log().map((e) => e.hash)).toEqual(reference);
  });

  it('kept a gapless log with a valid hash chain, each entry with both clocks, person, role and step', async () => {
    const { body } = await request(t.url).get(`/api/sessions/${sessionId}/record`).set('Cookie', crew.sm.cookie);
    expect(body.chain).toEqual({ ok: true });
    const entries = body.entries as Array<Record<string, unknown>>;
    expect(entries.map((e) => e.seq)).toEqual(entries.map((_, i) => i + 1));
    expect(verifyChain(entries as never, body.genesisHash, body)).toEqual({ ok: true });
    // A record that was edited, or cut short, no longer checks out.
    const edited = structuredClone(entries) as never as Parameters<typeof verifyChain>[0];
    edited[14].details = { ...edited[14].details, stepIndex: 99 };
    expect(verifyChain(edited, body.genesisHash, body)).toMatchObject({ ok: false, atSeq: 15 });
    expect(verifyChain(entries.slice(0, -1) as never, body.genesisHash, body)).toMatchObject({ ok: false });
    expect(verifyChain(entries as never, 'f'.repeat(64), body)).toMatchObject({ ok: false, atSeq: 1 });
    const kinds = entries.map((e) => e.kind);
    expect(kinds).toEqual([
      'session-opened', 'joined', 'joined', 'joined', 'joined', 'joined', 'began', 'move-called',
      'clear-answered', 'clear-answered', 'clear-answered', 'locked', 'rail-clear-called', 'rail-clear-confirmed',
      'step-confirmed', 'step-confirmed', 'step-confirmed', 'step-confirmed', 'loading-complete', 'test-recorded',
      ...kinds.slice(20),
    ]);
    const step = entries.find((e) => e.kind === 'step-confirmed' && e.stepIndex === 1)!;
    expect(step).toMatchObject({ personName: 'Robin Ashby', role: 'deck', lineSetId: expect.any(String) });
    expect(step.clientTimeMs).toEqual(expect.any(Number));
    expect(step.serverTimeMs).toEqual(expect.any(Number));
  });

  it('wrote the new load back to the schedule: no drapes, bricks back on the bridge', async () => {
    const { body } = await request(t.url).get('/api/schedule').set('Cookie', crew.rail.cookie);
    const ls7 = body.lineSets.find((l: { number: number }) => l.number === 7);
    expect(ls7.pieces).toEqual([]);
    expect(ls7.outOfBalance).toBe(false);
    const bridge = Object.fromEntries(body.brickTypes.map((b: { code: string; bridgeCount: number }) => [b.code, b.bridgeCount]));
    const pulled = crew.rail.state!.lineSets[0].steps.filter((s) => s.kind === 'remove-bricks')
      .reduce((sum, s) => sum + (s.bricks?.full ?? 0), 0);
    expect(pulled).toBeGreaterThan(0);
    expect(bridge.full).toBe(60 + pulled);
  });

  it('kept the write-back in line set 7\'s history, naming the session that wrote it', async () => {
    const { body: schedule } = await request(t.url).get('/api/schedule').set('Cookie', crew.rail.cookie);
    const ls7 = schedule.lineSets.find((l: { number: number }) => l.number === 7);
    const { body } = await request(t.url).get(`/api/line-sets/${ls7.id}/history`).set('Cookie', crew.deck.cookie);
    expect(body.sessions.map((s: { id: number }) => s.id)).toContain(sessionId);
    const written = body.entries.filter((e: { sessionId: number | null }) => e.sessionId === sessionId);
    expect(written.map((e: { subject: string; action: string }) => `${e.subject} ${e.action}`).sort())
      .toEqual(expect.arrayContaining(['line-set update', 'piece delete', 'piece delete', 'bridge-stock update']));
    expect(written[0]).toMatchObject({ personName: 'Jo Castellan', sessionTitle: expect.any(String), via: 'loading session' });
    await expect(t.db.query('DELETE FROM schedule_change')).rejects.toThrow(/denied/i);
  });

  it('lets the application account append to the log but never change or delete it', async () => {
    await expect(t.db.query('UPDATE session_event SET kind = ? WHERE session_id = ?', ['forged', sessionId])).rejects.toThrow(/denied/i);
    await expect(t.db.query('DELETE FROM session_event WHERE session_id = ?', [sessionId])).rejects.toThrow(/denied/i);
  });
});
