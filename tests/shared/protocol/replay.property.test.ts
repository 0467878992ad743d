import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
  SYSTEM_ACTOR, TEST_RESULTS, activeLineSet, allowedActions, createSessionState, decide, nextWorkStepIndex, notYetClear, silentSince,
  type Actor, type AnyAction, type LineSetInput, type LogDraft, type LogEntry, type SessionState,
} from '@shared/protocol/session';
import { initialStateOf, replaySession } from '@shared/protocol/replay';
import { T0, alex, jo, kit, lee, robin, sam, trussLineSet, twoDrapeLineSet } from './session/fixtures';

const PEOPLE: Actor[] = [jo, lee, sam, alex, robin, kit, SYSTEM_ACTOR];
const LINE_SETS: LineSetInput[] = [twoDrapeLineSet, trussLineSet];

const commandArb = fc.record({
  person: fc.nat({ max: PEOPLE.length - 1 }),
  pick: fc.nat({ max: 1000 }),
  guided: fc.double({ min: 0, max: 1, noNaN: true }).map((x) => x < 0.95),
  result: fc.nat({ max: TEST_RESULTS.length - 1 }),
  estimateKg: fc.double({ min: 0.5, max: 40, noNaN: true }),
  advanceMs: fc.integer({ min: 0, max: 30_000 }),
});
type Command = typeof commandArb extends fc.Arbitrary<infer C> ? C : never;

const SIDE = new Set<AnyAction['type']>(['end', 'leave', 'note', 'call-hold']);
const ANY: AnyAction['type'][] = ['join', 'begin', 'call-move', 'answer-clear', 'confirm-locked', 'confirm-step', 'record-test', 'call-hold', 'release-hold', 'note', 'leave', 'end'];

function build(type: AnyAction['type'], c: Command, state: SessionState, actor: Actor): AnyAction {
  const ls = activeLineSet(state);
  const result = TEST_RESULTS[c.result];
  switch (type) {
    case 'join': return { type, role: (actor.venueRoles[c.pick % Math.max(1, actor.venueRoles.length)] ?? 'deck') as 'rail' };
    case 'begin': return { type, shortCrewReason: c.pick % 3 ? 'Short tonight' : undefined };
    case 'confirm-step': return { type, stepIndex: ls ? Math.max(0, nextWorkStepIndex(ls)) : 0 };
    case 'record-test':
      return { type, result, estimateKg: result === 'balanced' ? undefined : c.estimateKg, tiedOff: result !== 'balanced' && c.estimateKg > (ls?.ropeLockLimitKg ?? 0), note: c.pick % 2 ? 'Felt light' : undefined };
    case 'call-hold': return { type, reason: c.pick % 2 ? 'Heads' : undefined };
    case 'give-hold-reason': return { type, reason: state.hold?.reason === 'Under the gallery' ? 'Lost sight of the batten' : 'Under the gallery' };
    case 'record-clear-for': {
      const alerted = new Set(ls?.call?.alerts.map((a) => a.personId));
      const silent = notYetClear(state).find((p) => alerted.has(p.personId));
      return { type, personId: silent?.personId ?? 1 + (c.pick % 6), via: c.pick % 2 ? 'voice' : 'radio' };
    }
    case 'note': return { type, text: `Note ${c.pick}` };
    case 'end': return { type, reason: 'Done for tonight' };
    case 're-alert': {
      const due = silentSince(state, T0 + 1e12).map((p) => p.personId);
      return { type, personIds: due.length ? due : [1 + (c.pick % 6)] };
    }
    default: return { type } as AnyAction;
  }
}

function choose(c: Command, state: SessionState): { actor: Actor; action: AnyAction } {
  const actor = PEOPLE[c.person];
  if (actor === SYSTEM_ACTOR) return { actor, action: build('re-alert', c, state, actor) };
  // Mostly the main line of work; now and then a note, a hold, a leave or an early end.
  const side = c.pick % 10 === 0;
  const allowed = allowedActions(state, actor.personId).filter((t) => (side ? t !== 'end' || c.pick % 70 === 0 : !SIDE.has(t)));
  const type = c.guided && allowed.length ? allowed[c.pick % allowed.length] : ANY[c.pick % ANY.length];
  return { actor, action: build(type, c, state, actor) };
}

/** What the server's appendEntries makes of a decision's drafts (without the hash, which replay does not read). */
function toEntries(drafts: LogDraft[], seq0: number, actor: Actor, nowMs: number): LogEntry[] {
  const system = actor === SYSTEM_ACTOR;
  return drafts.map((d, i) => ({
    seq: seq0 + i + 1, serverTimeMs: nowMs, clientTimeMs: system ? null : nowMs - 40,
    personId: system ? null : actor.personId, personName: actor.name, role: d.role ?? null,
    kind: d.kind, lineSetId: d.lineSetId ?? null, stepIndex: d.stepIndex ?? null, details: d.details, prevHash: '', hash: '',
  }));
}

describe('replaySession', () => {
  it('rebuilds, at every entry N of a random session, exactly the live state after entry N', () => {
    let entriesSeen = 0;
    let finished = 0;
    let steps = 0;
    fc.assert(
      fc.property(fc.array(commandArb, { minLength: 80, maxLength: 300 }), fc.subarray(LINE_SETS, { minLength: 1 }), (commands, lineSets) => {
        let state = createSessionState({ lineSets });
        let nowMs = T0;
        const log: LogEntry[] = toEntries([{ kind: 'session-opened', role: null, details: {} }], 0, jo, nowMs);
        const live: SessionState[] = [state];
        for (const c of commands) {
          nowMs += c.advanceMs;
          const { actor, action } = choose(c, state);
          const d = decide(state, action, actor, nowMs);
          if (d.ok) state = d.state;
          const written = toEntries(d.ok ? d.entries : [d.entry], log.length, actor, nowMs);
          log.push(...written);
          for (const _ of written) live.push(state);
        }
        const { states, mismatch } = replaySession(initialStateOf(state), log);
        expect(mismatch).toBeNull();
        expect(states).toHaveLength(live.length);
        states.forEach((s, n) => expect(s).toEqual(live[n]));
        entriesSeen += log.length;
        steps += log.filter((e) => e.kind === 'step-confirmed').length;
        if (state.phase === 'finished') finished += 1;
      }),
      // No shrinking: a failure over hundreds of entries is reported at once instead of taking minutes to shrink.
      { numRuns: 100, seed: 20251210, endOnFailure: true },
    );
    // The runs reach deep into sessions (many entries, some finished), so the equality is not vacuous.
    expect(entriesSeen).toBeGreaterThan(5_000);
    expect(steps).toBeGreaterThan(60);
    expect(finished).toBeGreaterThan(0);
  }, 120_000);

  it('says which entry the rules would not have written', () => {
    let state = createSessionState({ lineSets: [twoDrapeLineSet] });
    const log: LogEntry[] = toEntries([{ kind: 'session-opened', role: null, details: {} }], 0, jo, T0);
    const d = decide(state, { type: 'join', role: 'rail' }, jo, T0 + 1000);
    if (!d.ok) throw new Error(d.reason);
    state = d.state;
    log.push(...toEntries(d.entries, 1, jo, T0 + 1000));
    // A forged "locked" before any call: the rules refuse it.
    log.push({ ...log[1], seq: 3, kind: 'locked', role: 'rail', details: {} });
    const result = replaySession(initialStateOf(state), log);
    expect(result.mismatch?.seq).toBe(3);
    expect(result.states[2]).toEqual(state);
  });
});
