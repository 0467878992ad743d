import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { describeEntry, type LogEntry, type SessionState } from '@shared/protocol/session';
import { initialStateOf, replaySession } from '@shared/protocol/replay';
import { startTestApp, type TestApp } from '../../support/app';
import { demoCrew, openDrapeUnload } from '../../support/crew';

/** A deck hand's phone dies during a call: after Railcall re-alerts them, the lead records the "clear" heard by voice. */
describe('the lead records a "clear" for a silent person after a re-alert', () => {
  let t: TestApp;
  let crew: Awaited<ReturnType<typeof demoCrew>>;
  let sessionId: number;
  let robinId: number;

  const record = async () => (await request(t.url).get(`/api/sessions/${sessionId}/record`).set('Cookie', crew.sm.cookie)).body as { entries: LogEntry[] };
  const lastEntry = async () => (await record()).entries.at(-1)!;

  beforeAll(async () => {
    t = await startTestApp();
    // The shortest re-alert time a venue may set, to keep the test short.
    await t.database.owner.query("UPDATE venue SET settings = JSON_SET(settings, '$.reAlertSeconds', 5)");
    crew = await demoCrew(t.url);
    ({ sessionId } = await openDrapeUnload(t.url, crew.rail.cookie));
    for (const phone of crew.all) await phone.watch(sessionId);
    for (const [phone, role] of [[crew.loader1, 'loader'], [crew.loader2, 'loader'], [crew.deck, 'deck'], [crew.sm, 'stage-manager']] as const) {
      await phone.must(sessionId, { type: 'join', role });
    }
    await crew.rail.must(sessionId, { type: 'begin' });
    await crew.rail.must(sessionId, { type: 'call-move' });
    await crew.loader1.must(sessionId, { type: 'answer-clear' });
    await crew.loader2.must(sessionId, { type: 'answer-clear' });
    robinId = crew.rail.state!.participants.find((p) => p.role === 'deck')!.personId;
  });
  afterAll(async () => {
    crew.all.forEach((p) => p.close());
    await t.close();
  });

  it('refuses it before Railcall has re-alerted the silent person, and logs the refusal', async () => {
    const res = await crew.rail.act(sessionId, { type: 'record-clear-for', personId: robinId, via: 'voice' });
    expect(res).toMatchObject({ ok: false, error: { code: 'refused', message: expect.stringMatching(/Railcall has not re-alerted Robin Ashby yet/) } });
    const entry = await lastEntry();
    expect(entry).toMatchObject({ kind: 'refused', personName: 'Jo Castellan', details: { action: { type: 'record-clear-for', personId: robinId } } });
    expect(res.ok ? 0 : res.seq).toBe(entry.seq);
  });

  it('after the re-alert: only the lead may record it, and it is logged as the lead\'s for Robin, with both names', async () => {
    const deadline = Date.now() + 9000;
    while (!crew.deck.alerts.length && Date.now() < deadline) await new Promise((r) => setTimeout(r, 100));
    expect(crew.deck.alerts).toEqual([expect.objectContaining({ kind: 're-alert' })]);

    const bySm = await crew.sm.act(sessionId, { type: 'record-clear-for', personId: robinId, via: 'voice' });
    expect(bySm).toMatchObject({ ok: false, error: { code: 'forbidden' } });

    const seq = await crew.rail.must(sessionId, { type: 'record-clear-for', personId: robinId, via: 'voice' });
    const entry = await lastEntry();
    expect(entry).toMatchObject({
      seq,
      kind: 'clear-recorded-for',
      personName: 'Jo Castellan',
      role: 'rail',
      details: { forPersonId: robinId, forName: 'Robin Ashby', byName: 'Jo Castellan', via: 'voice', reAlerts: 1, stillWaitingOn: [] },
    });
    expect(describeEntry(entry)).toBe(
      'Jo Castellan recorded "clear" for Robin Ashby on Line set 7 (Sea-mist drapes): Robin Ashby answered clear by voice, not by phone (Railcall had re-alerted Robin Ashby once).',
    );
    // Every phone hears of it, Robin's own too, and the state says who recorded the answer.
    await crew.deck.caughtUpTo(seq);
    const answer = (crew.deck.state as SessionState).lineSets[0].call!.answers.find((a) => a.personId === robinId);
    expect(answer).toMatchObject({ recordedBy: { name: 'Jo Castellan', via: 'voice' } });
  }, 15_000);

  it('refuses it for a person who already answered, by phone or recorded, as already done', async () => {
    const again = await crew.rail.act(sessionId, { type: 'record-clear-for', personId: robinId, via: 'radio' });
    expect(again).toMatchObject({ ok: false, error: { code: 'conflict', message: expect.stringMatching(/Robin Ashby has already answered "clear".*recorded by Jo Castellan/) } });
    const loaderId = crew.rail.state!.participants.find((p) => p.role === 'loader')!.personId;
    const loader = await crew.rail.act(sessionId, { type: 'record-clear-for', personId: loaderId, via: 'voice' });
    expect(loader).toMatchObject({ ok: false, error: { code: 'conflict' } });
    // Robin's phone coming back to life later changes nothing.
    expect(await crew.deck.act(sessionId, { type: 'answer-clear' })).toMatchObject({ ok: false, error: { code: 'conflict' } });
  });

  it('lets the set be locked, and the kept record replays through the rules to the same call and answers', async () => {
    await crew.rail.must(sessionId, { type: 'confirm-locked' });
    const { entries } = await record();
    const { state } = (await request(t.url).get(`/api/sessions/${sessionId}`).set('Cookie', crew.sm.cookie)).body as { state: SessionState };
    const replay = replaySession(initialStateOf(state), entries);
    expect(replay.mismatch).toBeNull();
    const replayed = replay.states.at(-1)!;
    expect(replayed.participants).toEqual(state.participants);
    expect(replayed.lineSets[0].call).toEqual(state.lineSets[0].call);
    expect(replayed.lineSets[0].stage).toBe('in-position');
  });
});
