import { describe, expect, it } from 'vitest';
import { SYSTEM_ACTOR, allowedActions, describeEntry, nextStepFor, proxyClearCandidates } from '@shared/protocol/session';
import { replaySession, initialStateOf } from '@shared/protocol/replay';
import type { LogEntry } from '@shared/protocol/session';
import { Session, alex, jo, kit, lee, robin, sam } from './fixtures';

/** Called, two loaders clear, Robin (deck) silent: the state where a phone has died during a call. */
function robinSilent(): Session {
  const s = new Session().joinCrew();
  s.do(jo, { type: 'begin' });
  s.do(jo, { type: 'call-move' });
  s.do(sam, { type: 'answer-clear' });
  s.do(alex, { type: 'answer-clear' });
  return s;
}

describe('the lead records a "clear" for a silent person (record-clear-for)', () => {
  it('is refused before Railcall has re-alerted the person, saying to wait for their own answer', () => {
    const s = robinSilent();
    const r = s.refused(jo, { type: 'record-clear-for', personId: robin.personId, via: 'voice' });
    expect(r.code).toBe('refused');
    expect(r.reason).toMatch(/Railcall has not re-alerted Robin Ashby yet/);
    expect(proxyClearCandidates(s.state, jo.personId)).toEqual([]);
    expect(allowedActions(s.state, jo.personId)).not.toContain('record-clear-for');
  });

  it('after a re-alert, records the answer as the lead\'s for that person, with both names, and lets the set be locked', () => {
    const s = robinSilent();
    s.do(SYSTEM_ACTOR, { type: 're-alert', personIds: [robin.personId] }, 20_000);
    expect(proxyClearCandidates(s.state, jo.personId).map((p) => p.name)).toEqual(['Robin Ashby']);
    expect(allowedActions(s.state, jo.personId)).toContain('record-clear-for');
    // Offered beside the silent person, not as the lead's main call: the screen still says who is silent.
    expect(nextStepFor(s.state, jo.personId).text).toMatch(/Robin Ashby must answer "clear"/);

    const d = s.do(jo, { type: 'record-clear-for', personId: robin.personId, via: 'voice' });
    expect(d.entries).toHaveLength(1);
    expect(d.entries[0]).toMatchObject({
      kind: 'clear-recorded-for',
      role: 'rail',
      lineSetId: 'ls-7',
      details: { forPersonId: robin.personId, forName: 'Robin Ashby', byPersonId: jo.personId, byName: 'Jo Castellan', via: 'voice', reAlerts: 1, stillWaitingOn: [] },
    });
    expect(s.state.lineSets[0].call!.answers.at(-1)).toMatchObject({
      personId: robin.personId,
      name: 'Robin Ashby',
      recordedBy: { personId: jo.personId, name: 'Jo Castellan', via: 'voice' },
    });
    expect(describeEntry({ ...d.entries[0], personName: 'Jo Castellan' })).toBe(
      'Jo Castellan recorded "clear" for Robin Ashby on line set 7: Robin Ashby answered clear by voice, not by phone (Railcall had re-alerted Robin Ashby once).',
    );
    s.do(jo, { type: 'confirm-locked' });
  });

  it('is refused for a person who already answered, by phone or recorded', () => {
    const s = robinSilent();
    const byPhone = s.refused(jo, { type: 'record-clear-for', personId: sam.personId, via: 'radio' });
    expect(byPhone.code).toBe('already-done');
    expect(byPhone.reason).toBe('Sam Brightwater has already answered "clear" for line set 7.');
    s.do(SYSTEM_ACTOR, { type: 're-alert', personIds: [robin.personId] }, 20_000);
    s.do(jo, { type: 'record-clear-for', personId: robin.personId, via: 'seen' });
    const twice = s.refused(jo, { type: 'record-clear-for', personId: robin.personId, via: 'voice' });
    expect(twice.code).toBe('already-done');
    expect(twice.reason).toMatch(/recorded by Jo Castellan/);
    // And Robin's own late tap is already done too.
    expect(s.refused(robin, { type: 'answer-clear' }).code).toBe('already-done');
  });

  it('is for the lead alone, only while a move call waits, only for the crew who answer, and not during a hold', () => {
    const s = new Session().joinCrew();
    s.do(lee, { type: 'join', role: 'rail' });
    s.do(jo, { type: 'begin' });
    expect(s.refused(jo, { type: 'record-clear-for', personId: robin.personId, via: 'voice' }).reason).toMatch(/No move call is waiting/);
    s.do(jo, { type: 'call-move' });
    s.do(SYSTEM_ACTOR, { type: 're-alert', personIds: [sam.personId, alex.personId, robin.personId] }, 20_000);
    expect(s.refused(lee, { type: 'record-clear-for', personId: robin.personId, via: 'voice' }).code).toBe('forbidden');
    expect(s.refused(sam, { type: 'record-clear-for', personId: robin.personId, via: 'voice' }).code).toBe('forbidden');
    expect(s.refused(jo, { type: 'record-clear-for', personId: kit.personId, via: 'voice' }).reason).toMatch(/only the deck crew and loaders answer/);
    expect(s.refused(jo, { type: 'record-clear-for', personId: 99, via: 'voice' }).reason).toMatch(/has not joined/);
    s.do(kit, { type: 'call-hold' });
    expect(s.refused(jo, { type: 'record-clear-for', personId: robin.personId, via: 'voice' }).reason).toMatch(/A hold is on/);
  });

  it('is logged as a refusal in words, never silently', () => {
    const s = robinSilent();
    const r = s.refused(jo, { type: 'record-clear-for', personId: robin.personId, via: 'voice' });
    expect(describeEntry({ ...r.entry, personName: 'Jo Castellan' })).toMatch(/^Jo Castellan tried to record a "clear" for someone else and was refused: Railcall has not re-alerted/);
  });

  it('replays from the log to the same state', () => {
    const s = robinSilent();
    const initial = initialStateOf(s.state);
    // Rebuild the same run as log entries, in order, and replay them.
    const run = new Session().joinCrew();
    const entries: LogEntry[] = [];
    const log = (actor: typeof jo, action: Parameters<Session['do']>[1], advanceMs = 1000) => {
      const d = run.do(actor, action, advanceMs);
      for (const e of d.entries) {
        entries.push({
          seq: entries.length + 1, serverTimeMs: run.nowMs, clientTimeMs: null,
          personId: actor === SYSTEM_ACTOR ? null : actor.personId, personName: actor.name,
          role: e.role ?? null, kind: e.kind, lineSetId: e.lineSetId ?? null, stepIndex: e.stepIndex ?? null,
          details: e.details, hash: '', prevHash: '',
        });
      }
    };
    const fresh = new Session();
    run.state = fresh.state;
    run.nowMs = fresh.nowMs;
    for (const [actor, role] of [[jo, 'rail'], [sam, 'loader'], [alex, 'loader'], [robin, 'deck']] as const) log(actor, { type: 'join', role });
    log(jo, { type: 'begin' });
    log(jo, { type: 'call-move' });
    log(sam, { type: 'answer-clear' });
    log(alex, { type: 'answer-clear' });
    log(SYSTEM_ACTOR, { type: 're-alert', personIds: [robin.personId] }, 20_000);
    log(jo, { type: 'record-clear-for', personId: robin.personId, via: 'radio' });
    log(jo, { type: 'confirm-locked' });
    const replay = replaySession(initial, entries);
    expect(replay.mismatch).toBeNull();
    expect(replay.states.at(-1)).toEqual(run.state);
  });
});
