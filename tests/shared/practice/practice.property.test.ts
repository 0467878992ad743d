import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { applyStep, loadImbalanceKg, type LineSetLoad, type PlanStep } from '@shared/rigging';
import {
  ARBOR_HEAVY_TOLERANCE_KG,
  activeLineSet,
  allowedActions,
  isWorkStep,
  nextStepFor,
  notYetClear,
  type ActionType,
  type SessionState,
} from '@shared/protocol/session';
import {
  PRACTICE_ROLES,
  PracticeEngine,
  actionFor,
  balancedWithinKg,
  computeDebrief,
  inventedLineSet,
  replayPractice,
  seededRandom,
  type PracticeEntry,
  type PracticeSetup,
} from '@shared/practice';
import { MAX_PRACTICE_TAPS } from '@shared/protocol/practice';
import { T0, trussLineSet, twoDrapeLineSet } from '../protocol/session/fixtures';

const LINE_SETS = [twoDrapeLineSet, trussLineSet];
const YOU = { personId: 5, name: 'Pat Trainee' };
const REPERTOIRE: ActionType[] = ['begin', 'call-move', 'answer-clear', 'confirm-locked', 'confirm-tie-off', 'call-clear-rail',
  'confirm-rail-clear', 'confirm-step', 'call-loading-complete', 'confirm-untie', 'record-test', 'call-hold', 'ack-hold', 'release-hold'];

/**
 * The debrief figures worked out again from the practice log alone, independently of the engine:
 * each confirmed step's own record (`details.step`) applied to the line set's starting load with the
 * rigging functions, the imbalance integrated between log times; answer times from the move call
 * to each "clear".
 */
function fromLog(setup: PracticeSetup, log: PracticeEntry[], endMs: number) {
  const loads = new Map<string, LineSetLoad>(setup.session.lineSets.map((l) => [l.id, structuredClone(l.load)]));
  const byId = new Map(setup.session.lineSets.map((l) => [l.id, l]));
  const out = new Map<string, { off: number; beyond: number }>(setup.session.lineSets.map((l) => [l.id, { off: 0, beyond: 0 }]));
  const accepted = log.filter((e) => !e.refusal);
  for (let i = 0; i < accepted.length; i += 1) {
    const e = accepted[i];
    if (e.kind === 'step-confirmed' && e.lineSetId) {
      const ls = byId.get(e.lineSetId)!;
      loads.set(e.lineSetId, applyStep(loads.get(e.lineSetId)!, e.details.step as PlanStep, ls.brickTypes));
    }
    const nextAt = Math.min(accepted[i + 1]?.atMs ?? endMs, endMs);
    // Several lines of one tap share its time: the span belongs to the last of them.
    if (accepted[i + 1] && accepted[i + 1].atMs === e.atMs) continue;
    for (const [id, load] of loads) {
      const ls = byId.get(id)!;
      const kg = Math.abs(loadImbalanceKg(load, ls.brickTypes));
      const span = Math.max(0, nextAt - e.atMs);
      if (kg > balancedWithinKg(ls.brickTypes)) out.get(id)!.off += span;
      if (kg > ls.ropeLockLimitKg) out.get(id)!.beyond += span;
    }
  }
  const calls = new Map<string, number>();
  const answers: number[] = [];
  for (const e of accepted) {
    if (e.kind === 'move-called') calls.set(e.lineSetId!, e.atMs);
    if (e.kind === 'clear-answered') answers.push(e.atMs - calls.get(e.lineSetId!)!);
  }
  return { out, answers, refusals: log.filter((e) => e.refusal).length };
}

/** Rules every accepted practice tap keeps, checked on the state before and after it. */
function checkTap(prev: SessionState, next: SessionState, type: string, byLead: boolean) {
  const ls = activeLineSet(prev);
  if (type === 'confirm-locked') expect(notYetClear(prev)).toEqual([]);
  if (type === 'confirm-step' && ls) {
    expect(ls.stage).toBe('rail-clear');
    if (ls.needsTieOff) expect(ls.tiedOff).toBe(true);
  }
  if (['call-move', 'confirm-locked', 'confirm-tie-off', 'confirm-untie', 'record-test', 'release-hold', 'begin'].includes(type)) expect(byLead).toBe(true);
  for (const after of next.lineSets) {
    // Never arbor-heavy after a work step; beyond the rope lock only while tied off (order of operations: stage rigging handbooks and school crew guides; common practice).
    const lastDone = after.done.lastIndexOf(true);
    if (lastDone >= 0 && isWorkStep(after.steps[lastDone])) expect(after.imbalanceKg).toBeGreaterThanOrEqual(-ARBOR_HEAVY_TOLERANCE_KG);
    if (after.stage === 'rail-clear' && Math.abs(after.imbalanceKg) > after.ropeLockLimitKg) expect(after.tiedOff).toBe(true);
  }
}

const stats = { runs: 0, taps: 0, crewTaps: 0, crewRefused: 0, complete: 0, reAlerts: 0, mostTaps: 0 };

describe('a practice session with a simulated crew, over many random runs', () => {
  it('never breaks the rules, and its debrief equals the figures worked out from its log', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 2 ** 31 - 1 }),
        fc.constantFrom(...PRACTICE_ROLES),
        fc.subarray(LINE_SETS),
        fc.option(fc.integer({ min: 1, max: 2 ** 31 - 1 }), { nil: undefined }),
        fc.double({ min: 0, max: 0.3, noNaN: true }),
        (seed, role, fixed, inventedSeed, sloppiness) => {
          // The fixture sets, and an invented one (whole 5 lb weights on 20 and 10 lb bricks) as practice makes them.
          const lineSets = [...fixed, ...(inventedSeed !== undefined || fixed.length === 0 ? [inventedLineSet(inventedSeed ?? seed)] : [])];
          const setup: PracticeSetup = { title: 'Drill', role, you: YOU, session: { lineSets } };
          const engine = new PracticeEngine(setup, seed, T0, { pace: 0.5 });
          const trainee = seededRandom(seed ^ 0x5bd1e995);
          let now = T0;
          // The trainee acts on their screen after a while, sometimes taps the wrong thing, sometimes idles.
          for (let guard = 0; guard < 600 && !engine.finished; guard += 1) {
            const mine = nextStepFor(engine.state, YOU.personId).actions[0];
            const wake = engine.nextWakeMs();
            const myTime = mine ? now + 500 + trainee.next() * 12_000 : Infinity;
            const at = Math.min(myTime, wake ?? Infinity);
            if (!Number.isFinite(at)) break;
            now = Math.max(now, at);
            engine.advance(now);
            if (at === myTime && !engine.finished) {
              const slip = trainee.next() < sloppiness;
              const type = slip ? REPERTOIRE[Math.floor(trainee.next() * REPERTOIRE.length)] : nextStepFor(engine.state, YOU.personId).actions[0];
              const you = engine.people.find((p) => p.personId === YOU.personId)!;
              const action = type ? actionFor(type, engine.state, you) : null;
              if (action) engine.tap(action, now);
            }
          }
          const endMs = engine.endedAtMs ?? now;
          if (!engine.finished) engine.stop(endMs);
          stats.runs += 1;
          stats.mostTaps = Math.max(stats.mostTaps, engine.taps.length);
          if (engine.state.endedHow === 'complete') stats.complete += 1;

          // The same taps played again give the same log (the server keeps the record from them).
          const replay = replayPractice(setup, engine.taps);
          expect(replay.log).toEqual(engine.log);

          // Every accepted tap keeps the rules; the simulated crew only gets through what the rules allowed.
          let prev = replayPractice(setup, []).state;
          engine.taps.forEach((tap, i) => {
            const next = replay.states[i];
            const accepted = next !== prev;
            stats.taps += 1;
            const member = engine.people.find((p) => p.personId === tap.personId);
            if (member?.simulated) {
              stats.crewTaps += 1;
              if (!accepted) stats.crewRefused += 1;
              if (accepted && tap.action.type !== 'join') expect(allowedActions(prev, tap.personId)).toContain(tap.action.type);
            }
            if (tap.action.type === 're-alert' && accepted) stats.reAlerts += 1;
            if (accepted) checkTap(prev, next, tap.action.type, tap.personId === prev.leadPersonId);
            prev = next;
          });

          // Every practice line is the practice's own (the person, a simulated member or Railcall).
          for (const e of engine.log) expect(e.personId === null || engine.people.some((p) => p.personId === e.personId)).toBe(true);

          const debrief = computeDebrief(setup, engine.taps, endMs);
          const check = fromLog(setup, engine.log, endMs);
          for (const d of debrief.lineSets) {
            expect(d.outOfBalanceMs).toBe(check.out.get(d.lineSetId)!.off);
            expect(d.beyondRopeLockMs).toBe(check.out.get(d.lineSetId)!.beyond);
          }
          expect(debrief.answers.filter((a) => a.kind === 'clear').map((a) => a.tookMs)).toEqual(check.answers);
          expect(debrief.refusals).toHaveLength(check.refusals);
          expect(debrief.durationMs).toBe(endMs - T0);
        },
      ),
      // No shrinking: each run is a whole practice, so a failure is reported at once.
      { numRuns: 100, endOnFailure: true },
    );
    // The runs must really exercise the crew: most finish, the crew slips and gets refused, re-alerts happen.
    expect(stats.complete).toBeGreaterThan(stats.runs * 0.9);
    expect(stats.crewRefused).toBeGreaterThan(0);
    // A practice fits what the server keeps (MAX_PRACTICE_TAPS): no crew stuck tapping the same refused thing.
    expect(stats.mostTaps).toBeLessThanOrEqual(MAX_PRACTICE_TAPS);
    expect(stats.reAlerts).toBeGreaterThan(0);
    // Every run replays its taps a few times over: on a busy two-core machine that takes a while.
  }, 180_000);
});
