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
    for (const [phone, role] of [[crew.loader1, 'loader'], [crew.loader2, 'loader'], [crew.deck, 'deck']] as const) {
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

describe('re-alerts with two server processes on one database', () => {
  let a: TestApp;
  let b: TestApp;
  let crew: Awaited<ReturnType<typeof demoCrew>>;
  let sessionId: number;
  let aRunning = true;
  const reAlerts = async () => (await a.database.owner.query("SELECT seq, server_time_ms AS t FROM session_event WHERE session_id = ? AND kind = 're-alerted' ORDER BY seq", [sessionId])) as Array<{ seq: number; t: string }>;

  beforeAll(async () => {
    a = await startTestApp();
    await a.database.owner.query("UPDATE venue SET settings = JSON_SET(settings, '$.reAlertSeconds', 5)");
    b = await a.restart(); // a second app on the same database, as a second server process
    crew = await demoCrew(a.url);
    ({ sessionId } = await openDrapeUnload(a.url, crew.rail.cookie));
    for (const [phone, role] of [[crew.loader1, 'loader'], [crew.loader2, 'loader'], [crew.deck, 'deck']] as const) {
      await phone.must(sessionId, { type: 'join', role });
    }
    await crew.rail.must(sessionId, { type: 'begin' });
  });
  afterAll(async () => {
    crew.all.forEach((p) => p.close());
    await b.stop();
    if (aRunning) await a.stop();
    await a.database.drop();
  });

  it('writes exactly one re-alert per due moment, and the other process takes over when the first stops', async () => {
    // Both processes know the due time: A from its own commit, B from the database.
    await crew.rail.must(sessionId, { type: 'call-move' });
    const deadline = Date.now() + 8000;
    while ((await reAlerts()).length < 1 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 200));
    await new Promise((r) => setTimeout(r, 1500)); // time for a duplicate to show up, were there one
    expect(await reAlerts()).toHaveLength(1);
    // The process that wrote the call stops; the next due moment (5 s later) is fired by the other one.
    crew.all.forEach((p) => p.close());
    await a.stop();
    aRunning = false;
    const next = Date.now() + 9000;
    while ((await reAlerts()).length < 2 && Date.now() < next) await new Promise((r) => setTimeout(r, 200));
    await new Promise((r) => setTimeout(r, 1500));
    const rows = await reAlerts();
    expect(rows).toHaveLength(2);
    // One per period of the venue's 5 s (a poll may take up to a second more to notice).
    expect(Number(rows[1].t) - Number(rows[0].t)).toBeGreaterThanOrEqual(5000);
    expect(Number(rows[1].t) - Number(rows[0].t)).toBeLessThan(5000 + 1500);
  }, 30_000);
});
