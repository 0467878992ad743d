import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApp, type TestApp } from '../../support/app';
import { demoCrew, openDrapeUnload } from '../../support/crew';

describe('re-alerting whoever is silent after a move call', () => {
  let t: TestApp;
  let crew: Awaited<ReturnType<typeof demoCrew>>;
  let sessionId: number;

  beforeAll(async () => {
    t = await startTestApp();
    // The shortest re-alert time a venue may set, to keep the test short.
    await t.database.owner.query("UPDATE venue SET settings = JSON_SET(settings, '$.reAlertSeconds', 5)");
    crew = await demoCrew(t.url);
    ({ sessionId } = await openDrapeUnload(t.url, crew.rail.cookie));
    for (const phone of crew.all) await phone.watch(sessionId);
    for (const [phone, role] of [[crew.rail, 'rail'], [crew.loader1, 'loader'], [crew.loader2, 'loader'], [crew.deck, 'deck']] as const) {
      await phone.must(sessionId, { type: 'join', role });
    }
    await crew.rail.must(sessionId, { type: 'begin' });
  });
  afterAll(async () => {
    crew.all.forEach((p) => p.close());
    await t.close();
  });

  it('alerts the silent deck hand again after the venue time, logs it, and flags it for the caller', async () => {
    await crew.rail.must(sessionId, { type: 'call-move' });
    await crew.loader1.must(sessionId, { type: 'answer-clear' });
    await crew.loader2.must(sessionId, { type: 'answer-clear' });
    const deadline = Date.now() + 8000;
    while (!crew.deck.alerts.length && Date.now() < deadline) await new Promise((r) => setTimeout(r, 100));
    expect(crew.deck.alerts).toEqual([expect.objectContaining({ kind: 're-alert', people: [expect.objectContaining({ name: 'Robin Ashby' })] })]);
    expect(crew.loader1.alerts).toEqual([]);
    const entry = [...crew.rail.entries.values()].find((e) => e.kind === 're-alerted');
    expect(entry).toMatchObject({ role: 'system', personId: null, personName: 'Railcall' });
    expect(crew.rail.state!.lineSets[0].call!.alerts).toEqual([expect.objectContaining({ personId: entry!.details.people && (entry!.details.people as Array<{ personId: number }>)[0].personId, count: 1 })]);
    // Nothing proceeds without the answer, however long the wait.
    const locked = await crew.rail.act(sessionId, { type: 'confirm-locked' });
    expect(locked.ok).toBe(false);
  }, 15_000);
});
