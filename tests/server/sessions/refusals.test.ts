import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { randomUUID } from 'node:crypto';
import { startTestApp, type TestApp } from '../../support/app';
import { demoCrew, drapeUnloadFixture, openDrapeUnload, Phone } from '../../support/crew';
import { addVenueWithPeople } from '../../support/people';
import type { SessionAction } from '@shared/protocol/session';

/** Each out-of-order attempt is refused with its reason, logged, and changes nothing. */
describe('the session refuses what is out of order', () => {
  let t: TestApp;
  let crew: Awaited<ReturnType<typeof demoCrew>>;
  let sessionId: number;

  const stateJson = async () => JSON.stringify((await request(t.url).get(`/api/sessions/${sessionId}`).set('Cookie', crew.sm.cookie)).body.state);
  const lastEntry = async () => {
    const { body } = await request(t.url).get(`/api/sessions/${sessionId}/events?after=0`).set('Cookie', crew.sm.cookie);
    return body.entries.at(-1);
  };
  /** Sends an action that must be refused; checks the reason, that nothing changed, and that the refusal was logged. */
  async function refused(phone: Phone, action: SessionAction, reason: RegExp, code = 'refused') {
    const before = await stateJson();
    const res = await phone.act(sessionId, action);
    expect(res.ok).toBe(false);
    if (res.ok) return;
    expect(res.error.message).toMatch(reason);
    expect(res.error.code).toBe(code);
    expect(await stateJson()).toBe(before);
    const entry = await lastEntry();
    expect(entry.kind).toBe('refused');
    expect(entry.details.reason).toBe(res.error.message);
    // The acknowledgement points at its own refusal in the log.
    expect(res.seq).toBe(entry.seq);
  }
  const go = (phone: Phone, action: SessionAction) => phone.must(sessionId, action);

  beforeAll(async () => {
    t = await startTestApp();
    crew = await demoCrew(t.url);
    ({ sessionId } = await openDrapeUnload(t.url, crew.rail.cookie));
    for (const phone of crew.all) await phone.watch(sessionId);
  });
  afterAll(async () => {
    crew.all.forEach((p) => p.close());
    await t.close();
  });

  it('refuses joining in a role the person does not hold at the venue', async () => {
    await refused(crew.deck, { type: 'join', role: 'rail' }, /rail/i, 'forbidden');
  });

  it('refuses beginning short-crewed without a reason, and logs the reason when given', async () => {
    await go(crew.loader1, { type: 'join', role: 'loader' });
    await go(crew.deck, { type: 'join', role: 'deck' });
    await refused(crew.rail, { type: 'begin' }, /loader/i);
    await go(crew.loader2, { type: 'join', role: 'loader' });
    await go(crew.sm, { type: 'join', role: 'stage-manager' });
    await go(crew.rail, { type: 'begin' });
  });

  it('refuses confirming the move before every clear, naming who is silent', async () => {
    await go(crew.rail, { type: 'call-move' });
    await go(crew.loader1, { type: 'answer-clear' });
    await go(crew.loader2, { type: 'answer-clear' });
    await refused(crew.rail, { type: 'confirm-locked' }, /Robin Ashby/);
    await go(crew.deck, { type: 'answer-clear' });
    await go(crew.rail, { type: 'confirm-locked' });
  });

  it('refuses bricks before the rail is clear', async () => {
    await refused(crew.loader1, { type: 'confirm-step', stepIndex: 0 }, /rail/i);
    await go(crew.loader1, { type: 'call-clear-rail' });
    await go(crew.rail, { type: 'confirm-rail-clear' });
  });

  it('refuses a drape before its bricks, saying the bridge must pull them first', async () => {
    await refused(crew.deck, { type: 'confirm-step', stepIndex: 1 }, /brick/i);
  });

  it('refuses a brick step from the deck crew (wrong role)', async () => {
    await refused(crew.deck, { type: 'confirm-step', stepIndex: 0 }, /loader/i, 'forbidden');
  });

  it('refuses anything at the rail while the rail is clear', async () => {
    await refused(crew.rail, { type: 'call-move' }, /rail is clear/i);
    await refused(crew.rail, { type: 'record-test', result: 'balanced' }, /rail is clear|loading complete/i);
  });

  it('refuses everything during a hold but acknowledging it, until the lead releases it', async () => {
    await go(crew.sm, { type: 'call-hold', reason: 'Loose brick on the bridge rail' });
    await refused(crew.loader1, { type: 'confirm-step', stepIndex: 0 }, /hold/i);
    await refused(crew.sm, { type: 'note', text: 'still held' }, /hold/i);
    await refused(crew.loader1, { type: 'release-hold' }, /hold|lead|rail/i, 'forbidden');
    await go(crew.loader1, { type: 'ack-hold' });
    await go(crew.rail, { type: 'release-hold' });
    await go(crew.loader1, { type: 'confirm-step', stepIndex: 0 });
  });

  it('answers a stale step with "already done"', async () => {
    const res = await crew.loader2.act(sessionId, { type: 'confirm-step', stepIndex: 0 });
    expect(res.ok).toBe(false);
    if (!res.ok) expect(res.error.code).toBe('conflict');
  });

  it('answers refusals over HTTP with the same reason', async () => {
    const res = await request(t.url).post(`/api/sessions/${sessionId}/actions`).set('Cookie', crew.deck.cookie)
      .send({ key: randomUUID(), clientTimeMs: Date.now(), action: { type: 'confirm-step', stepIndex: 3 } });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/first/i);
  });

  describe('another venue', () => {
    let outsider: Phone;
    beforeAll(async () => {
      const { emails } = await addVenueWithPeople(t.database.owner, 'Quillfield Hall', ['rail']);
      outsider = await Phone.signIn(t.url, emails.rail);
    });
    afterAll(() => outsider.close());

    it('cannot see or act on the session over HTTP', async () => {
      for (const path of ['', '/events?after=0', '/record']) {
        expect((await request(t.url).get(`/api/sessions/${sessionId}${path}`).set('Cookie', outsider.cookie)).status).toBe(404);
      }
      const act = await request(t.url).post(`/api/sessions/${sessionId}/actions`).set('Cookie', outsider.cookie)
        .send({ key: randomUUID(), clientTimeMs: Date.now(), action: { type: 'join', role: 'rail' } });
      expect(act.status).toBe(404);
      const list = await request(t.url).get('/api/sessions?active=1').set('Cookie', outsider.cookie);
      expect(list.body.sessions).toEqual([]);
    });

    it('cannot watch or act on the session over Socket.IO', async () => {
      const watch = await outsider.watch(sessionId, 0);
      expect(watch).toMatchObject({ ok: false, error: { code: 'not-found' } });
      const act = await outsider.act(sessionId, { type: 'join', role: 'rail' });
      expect(act).toMatchObject({ ok: false, error: { code: 'not-found' } });
      expect(outsider.entries.size).toBe(0);
    });
  });

  it('refuses bad input on both paths with a clear message', async () => {
    const http = await request(t.url).post(`/api/sessions/${sessionId}/actions`).set('Cookie', crew.rail.cookie)
      .send({ key: 'x', clientTimeMs: 'now', action: { type: 'launch' } });
    expect(http.status).toBe(400);
    expect(Object.keys(http.body.error.fields)).toEqual(expect.arrayContaining(['key', 'clientTimeMs']));
    const sock = await crew.rail.socket.emitWithAck('session:act', { sessionId, envelope: { key: 'short', clientTimeMs: 1, action: { type: 'confirm-step', stepIndex: -1 } } } as never);
    expect(sock).toMatchObject({ ok: false, error: { code: 'bad-input' } });
  });
});

describe('ending a session early', () => {
  const f = drapeUnloadFixture();

  it('ends at any moment, also while the loaders work: the half-done load is written back and flagged, and the log says what state it was left in', async () => {
    const { t, crew, sessionId } = f;
    const go = (phone: Phone, action: SessionAction) => phone.must(sessionId, action);
    const before = (await request(t.url).get('/api/schedule').set('Cookie', crew.rail.cookie)).body.lineSets.find((l: { number: number }) => l.number === 7);
    await go(crew.loader1, { type: 'join', role: 'loader' });
    await go(crew.deck, { type: 'join', role: 'deck' });
    await go(crew.rail, { type: 'begin', shortCrewReason: 'Second loader off sick' });
    await go(crew.rail, { type: 'call-move' });
    await go(crew.loader1, { type: 'answer-clear' });
    await go(crew.deck, { type: 'answer-clear' });
    await go(crew.rail, { type: 'confirm-locked' });
    await go(crew.loader1, { type: 'call-clear-rail' });
    await go(crew.rail, { type: 'confirm-rail-clear' });
    await go(crew.loader1, { type: 'confirm-step', stepIndex: 0 });
    await go(crew.deck, { type: 'confirm-step', stepIndex: 1 });
    // While the loaders work on the rest.
    await go(crew.rail, { type: 'end', reason: 'Fire alarm: building evacuated' });

    const { body: events } = await request(t.url).get(`/api/sessions/${sessionId}/events?after=0`).set('Cookie', crew.rail.cookie);
    const ended = events.entries.at(-1);
    expect(ended.kind).toBe('ended');
    expect(ended.details.leftAs[0].outcome).toMatch(/^stopped part way \(\d steps? not done\), not tested: flagged$/);
    const { body } = await request(t.url).get('/api/schedule').set('Cookie', crew.rail.cookie);
    const ls7 = body.lineSets.find((l: { number: number }) => l.number === 7);
    expect(ls7.pieces).toHaveLength(before.pieces.length - 1);
    expect(ls7.outOfBalance).toBe(true);
  });
});
