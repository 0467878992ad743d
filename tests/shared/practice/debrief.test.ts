import { describe, expect, it } from 'vitest';
import type { AnyAction } from '@shared/protocol/session';
import {
  PracticeEngine,
  SIMULATED_ID_BASE,
  computeDebrief,
  practiceSentence,
  replayPractice,
  type PracticeSetup,
  type PracticeTap,
} from '@shared/practice';
import { T0, twoDrapeLineSet } from '../protocol/session/fixtures';

const YOU = { personId: 5, name: 'Pat Trainee' };
const QUILL = SIMULATED_ID_BASE + 1; // loader
const MAREN = SIMULATED_ID_BASE + 2; // loader
const TOBIN = SIMULATED_ID_BASE + 3; // deck
const s = (seconds: number) => T0 + seconds * 1000;
const tap = (seconds: number, personId: number, action: AnyAction): PracticeTap => ({ atMs: s(seconds), personId, action });

/**
 * A worked example, timed by hand: line set 7 (two 18 kg drapes on four 9 kg bricks) unloaded with
 * the person practising at the rail. Each "remove 2 bricks" leaves the set 18 kg pipe-heavy (more than
 * half a brick, less than the 50 lb = 22.68 kg rope lock) until the deck takes the drape off.
 */
const setup: PracticeSetup = { title: 'Unload line set 7', role: 'rail', you: YOU, session: { lineSets: [twoDrapeLineSet] } };
const taps: PracticeTap[] = [
  tap(0, YOU.personId, { type: 'join', role: 'rail' }),
  tap(0, QUILL, { type: 'join', role: 'loader' }),
  tap(0, MAREN, { type: 'join', role: 'loader' }),
  tap(0, TOBIN, { type: 'join', role: 'deck' }),
  tap(5, YOU.personId, { type: 'call-move' }), // refused: loading has not begun
  tap(10, YOU.personId, { type: 'begin' }),
  tap(20, YOU.personId, { type: 'call-move' }),
  tap(23, QUILL, { type: 'answer-clear' }),
  tap(25, MAREN, { type: 'answer-clear' }),
  tap(30, TOBIN, { type: 'answer-clear' }),
  tap(32, YOU.personId, { type: 'confirm-locked' }),
  tap(35, QUILL, { type: 'call-clear-rail' }),
  tap(40, YOU.personId, { type: 'confirm-rail-clear' }),
  tap(45, TOBIN, { type: 'confirm-step', stepIndex: 0 }), // refused: bricks are the loaders'
  tap(50, QUILL, { type: 'confirm-step', stepIndex: 0 }), // 18 kg pipe-heavy from here...
  tap(70, TOBIN, { type: 'confirm-step', stepIndex: 1 }), // ...to here: 20 s
  tap(80, MAREN, { type: 'confirm-step', stepIndex: 2 }), // and again from here...
  tap(110, TOBIN, { type: 'confirm-step', stepIndex: 3 }), // ...to here: 30 s
  tap(115, QUILL, { type: 'call-loading-complete' }),
  tap(130, YOU.personId, { type: 'record-test', result: 'balanced' }),
];

describe('computeDebrief', () => {
  it('gives the figures of a practice timed by hand', () => {
    const { state } = replayPractice(setup, taps);
    expect(state.phase).toBe('finished');
    const d = computeDebrief(setup, taps, state.endedAtMs!);
    expect(d.outcome).toBe('complete');
    expect(d.durationMs).toBe(130_000);
    expect(d.outOfBalanceMs).toBe(50_000);
    expect(d.beyondRopeLockMs).toBe(0);
    expect(d.lineSets[0].worstImbalanceKg).toBeCloseTo(18, 6);
    expect(d.answers.map((a) => [a.name, a.tookMs])).toEqual([
      ['Quill (simulated)', 3000],
      ['Maren (simulated)', 5000],
      ['Tobin (simulated)', 10_000],
    ]);
    expect(d.refusals.map((r) => [r.name, r.actionType, r.rule])).toEqual([
      ['Pat Trainee', 'call-move', 'out of order'],
      ['Tobin (simulated)', 'confirm-step', 'not for this role'],
    ]);
    expect(d.yourRefusals).toBe(1);
    expect(d.yourMedianAnswerMs).toBeNull();
  });

  it('counts only up to the moment a stopped practice ended', () => {
    const upToFirstBricks = taps.slice(0, 15); // the last tap pulls the first bricks at 50 s
    const d = computeDebrief(setup, upToFirstBricks, s(62));
    expect(d.outcome).toBe('stopped');
    expect(d.outOfBalanceMs).toBe(12_000);
  });
});

describe('a practice log', () => {
  it('says "Practice" in every sentence and names only the practice crew', () => {
    const { log, state } = replayPractice(setup, taps);
    for (const entry of log) expect(practiceSentence(entry, state, 'metric')).toMatch(/^Practice: /);
    expect(new Set(log.map((e) => e.personName))).toEqual(new Set(['Pat Trainee', 'Quill (simulated)', 'Maren (simulated)', 'Tobin (simulated)', 'Railcall']));
  });
});

describe('PracticeEngine', () => {
  it('runs a whole session with a crew that never slips, and plays the same way from the same seed', () => {
    const never = { lateAnswer: 0, forgets: 0, outOfOrder: 0, callsHold: 0 };
    const run = (seed: number) => {
      const engine = new PracticeEngine({ ...setup, role: 'loader' }, seed, T0, { habits: never });
      for (let now = T0; !engine.finished && now < s(3600); now += 1000) {
        engine.advance(now);
        const me = engine.you.personId;
        // The person practising is a loader who does their duty at once.
        const step = engine.state.lineSets[0];
        const todo = step.steps.findIndex((st, i) => !step.done[i] && (st.kind === 'remove-bricks' || st.kind === 'add-bricks'));
        if (step.stage === 'move-called' && !step.call?.answers.some((a) => a.personId === me)) engine.tap({ type: 'answer-clear' }, now);
        else if (step.stage === 'in-position') engine.tap({ type: 'call-clear-rail' }, now);
        else if (step.stage === 'rail-clear' && todo >= 0 && step.steps.slice(0, todo).every((st, i) => step.done[i] || st.kind === 'tie-off')) engine.tap({ type: 'confirm-step', stepIndex: todo }, now);
        else if (step.stage === 'rail-clear' && step.done.every((d, i) => d || !['remove-bricks', 'add-bricks', 'remove-piece', 'add-piece'].includes(step.steps[i].kind))) engine.tap({ type: 'call-loading-complete' }, now);
      }
      return engine;
    };
    const a = run(42);
    expect(a.state.endedHow).toBe('complete');
    expect(a.log.filter((e) => e.refusal)).toEqual([]);
    const b = run(42);
    expect(b.log).toEqual(a.log);
    expect(run(43).log.map((e) => e.atMs)).not.toEqual(a.log.map((e) => e.atMs));
  });
});
