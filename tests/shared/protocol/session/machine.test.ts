import { describe, expect, it } from 'vitest';
import {
  SYSTEM_ACTOR,
  SessionPlanError,
  createSessionState,
  decide,
  allowedActions,
  describeEntry,
  nextStepFor,
  notYetClear,
  stepText,
  waitingOn,
} from '@shared/protocol/session';
import type { PlanStep } from '@shared/rigging';
import { Session, alex, jo, kit, lee, robin, sam, trussLineSet, twoDrapeLineSet, ROPE_LOCK_LIMIT_KG } from './fixtures';

describe('createSessionState', () => {
  it('starts gathering, with default settings of 1 rail, 2 loaders, 1 deck and a 20 s re-alert', () => {
    // At least three people: two loaders on the bridge and an operator at the rail (common practice).
    const state = createSessionState({ lineSets: [twoDrapeLineSet] });
    expect(state.phase).toBe('gathering');
    expect(state.settings).toEqual({ minCrew: { rail: 1, loader: 2, deck: 1 }, reAlertSeconds: 20 });
    expect(state.lineSets[0]).toMatchObject({ stage: 'waiting', imbalanceKg: 0, needsTieOff: false, done: [false, false, false, false, false] });
  });

  it('notes a tie-off when the plan has one', () => {
    expect(createSessionState({ lineSets: [trussLineSet] }).lineSets[0].needsTieOff).toBe(true);
  });

  it('refuses a plan whose step cannot be applied', () => {
    const steps: PlanStep[] = [{ kind: 'remove-bricks', bricks: { full: 9 }, imbalanceAfterKg: 81 }];
    expect(() => createSessionState({ lineSets: [{ ...twoDrapeLineSet, steps }] })).toThrow(SessionPlanError);
  });

  it('refuses a plan that takes a piece off before its bricks, leaving the set arbor-heavy', () => {
    // Unloading: remove bricks FIRST, then the load (order of operations: stage rigging handbooks and school crew guides; common practice).
    const steps: PlanStep[] = [
      { kind: 'remove-piece', pieceId: 'drape-a', imbalanceAfterKg: -18 },
      { kind: 'remove-bricks', bricks: { full: 2 }, imbalanceAfterKg: 0 },
    ];
    expect(() => createSessionState({ lineSets: [{ ...twoDrapeLineSet, steps }] })).toThrow(/arbor-heavy/);
  });

  it('refuses a plan beyond the rope lock limit without a tie-off', () => {
    // A rope lock holds a limited out-of-balance; beyond it the set is tied off (common practice; 50 lb default).
    const steps = trussLineSet.steps.filter((s) => s.kind !== 'tie-off' && s.kind !== 'untie');
    expect(() => createSessionState({ lineSets: [{ ...trussLineSet, steps }] })).toThrow(/rope lock/);
    expect(ROPE_LOCK_LIMIT_KG).toBeCloseTo(22.68, 2);
  });

  it('refuses duplicate line set ids and an empty session', () => {
    expect(() => createSessionState({ lineSets: [] })).toThrow(SessionPlanError);
    expect(() => createSessionState({ lineSets: [twoDrapeLineSet, twoDrapeLineSet] })).toThrow(/twice/);
  });
});

describe('joining and leaving', () => {
  it('makes the first rail operator the lead', () => {
    const s = new Session();
    const d = s.do(jo, { type: 'join', role: 'rail' });
    expect(s.state.leadPersonId).toBe(jo.personId);
    expect(d.entries).toEqual([{ kind: 'joined', role: 'rail', details: { lead: true } }]);
  });

  it('forbids joining in a role the person does not hold at the venue', () => {
    const r = new Session().refused(sam, { type: 'join', role: 'rail' });
    expect(r.code).toBe('forbidden');
    expect(r.reason).toBe('You do not hold the rail operator role at this venue.');
    expect(r.entry).toMatchObject({ kind: 'refused', role: null, details: { code: 'forbidden' } });
  });

  it('answers already-done to a second join in the same role, and refuses a second role', () => {
    const s = new Session();
    s.do(lee, { type: 'join', role: 'loader' });
    expect(s.refused(lee, { type: 'join', role: 'loader' }).code).toBe('already-done');
    expect(s.refused(lee, { type: 'join', role: 'rail' }).reason).toMatch(/leave the session first/);
  });

  it('gives a second rail operator no part at the rail: only the lead acts there', () => {
    const s = new Session();
    s.do(jo, { type: 'join', role: 'rail' });
    s.do(lee, { type: 'join', role: 'rail' });
    expect(s.state.leadPersonId).toBe(jo.personId);
    const r = s.refused(lee, { type: 'begin', shortCrewReason: 'rehearsal' });
    expect(r.code).toBe('forbidden');
    expect(r.reason).toBe('Only the rail operator who leads the session (Jo Castellan) does that.');
  });

  it('hands the lead to the next rail operator when the lead leaves before loading begins', () => {
    const s = new Session();
    s.do(jo, { type: 'join', role: 'rail' });
    s.do(lee, { type: 'join', role: 'rail' });
    const d = s.do(jo, { type: 'leave' });
    expect(s.state.leadPersonId).toBe(lee.personId);
    expect(d.entries[0]).toMatchObject({ kind: 'left', role: 'rail', details: { newLeadName: 'Lee Marsh' } });
  });

  it('keeps the lead from leaving once loading has begun', () => {
    const s = new Session().joinCrew();
    s.do(jo, { type: 'begin' });
    expect(s.refused(jo, { type: 'leave' }).reason).toMatch(/end the session with a reason first/);
    s.do(sam, { type: 'leave' });
    expect(s.state.participants.map((p) => p.name)).not.toContain('Sam Brightwater');
  });

  it('forbids anything but joining to a person who has not joined', () => {
    const r = new Session().refused(kit, { type: 'note', text: 'hello' });
    expect(r).toMatchObject({ code: 'forbidden', reason: 'Join the session first.' });
  });

  it('forbids acting in a role the venue has since taken away', () => {
    const s = new Session().joinCrew();
    s.do(jo, { type: 'begin' });
    s.do(jo, { type: 'call-move' });
    const r = s.refused({ ...sam, venueRoles: [] }, { type: 'answer-clear' });
    expect(r).toMatchObject({ code: 'forbidden', reason: 'You no longer hold the loader role at this venue.' });
  });
});

describe('beginning', () => {
  it('refuses to begin short of the minimum crew without a reason, and logs the reason when given', () => {
    const s = new Session();
    s.do(jo, { type: 'join', role: 'rail' });
    s.do(sam, { type: 'join', role: 'loader' });
    s.do(robin, { type: 'join', role: 'deck' });
    const r = s.refused(jo, { type: 'begin' });
    expect(r.code).toBe('refused');
    expect(r.reason).toBe(
      'The minimum crew has not joined (need 2 loaders, 1 joined): wait for them, or give a reason to begin short.',
    );
    const d = s.do(jo, { type: 'begin', shortCrewReason: 'Deck crew on the fly floor phone' });
    expect(d.entries[0]).toMatchObject({ kind: 'began', details: { shortCrewReason: 'Deck crew on the fly floor phone' } });
    expect(s.state.shortCrewReason).toBe('Deck crew on the fly floor phone');
  });

  it('follows the session setting for the minimum crew', () => {
    const s = new Session([twoDrapeLineSet], { minCrew: { rail: 1, loader: 1, deck: 1 } });
    s.do(jo, { type: 'join', role: 'rail' });
    s.do(sam, { type: 'join', role: 'loader' });
    s.do(robin, { type: 'join', role: 'deck' });
    s.do(jo, { type: 'begin' });
    expect(s.state.phase).toBe('loading');
  });

  it('refuses calls before loading begins, saying what must happen first', () => {
    const s = new Session().joinCrew();
    expect(s.refused(jo, { type: 'call-move' }).reason).toBe('The rail operator must begin loading first.');
  });
});

describe('the move call and "clear"', () => {
  it('refuses "in position and locked" until every deck and loader person has answered by name', () => {
    const s = new Session().joinCrew();
    s.do(jo, { type: 'begin' });
    const call = s.do(jo, { type: 'call-move' });
    expect(call.entries[0].details).toMatchObject({ lineSetName: '7', mustAnswer: ['Sam Brightwater', 'Alex Tamsin', 'Robin Ashby'] });
    s.do(sam, { type: 'answer-clear' });
    const r = s.refused(jo, { type: 'confirm-locked' });
    expect(r.reason).toBe('Waiting for "clear" from Alex Tamsin and Robin Ashby: nothing proceeds without their answers.');
    expect(notYetClear(s.state).map((p) => p.name)).toEqual(['Alex Tamsin', 'Robin Ashby']);
    s.do(alex, { type: 'answer-clear' });
    s.do(robin, { type: 'answer-clear' });
    s.do(jo, { type: 'confirm-locked' });
    expect(s.state.lineSets[0].stage).toBe('in-position');
  });

  it('asks a late joiner on deck to answer too, and a person who leaves no longer holds it up', () => {
    const s = new Session().joinCrew();
    s.do(jo, { type: 'begin' });
    s.do(jo, { type: 'call-move' });
    s.do(sam, { type: 'answer-clear' });
    s.do(alex, { type: 'answer-clear' });
    s.do(robin, { type: 'leave' });
    s.do(lee, { type: 'join', role: 'loader' });
    expect(notYetClear(s.state).map((p) => p.name)).toEqual(['Lee Marsh']);
  });

  it('has stage managers and the rail watch, not answer', () => {
    const s = new Session().joinCrew();
    s.do(jo, { type: 'begin' });
    s.do(jo, { type: 'call-move' });
    expect(s.refused(kit, { type: 'answer-clear' }).code).toBe('forbidden');
    expect(s.refused(jo, { type: 'answer-clear' }).code).toBe('forbidden');
  });

  it('answers already-done to a second "clear" and refuses one with no call open', () => {
    const s = new Session().joinCrew();
    s.do(jo, { type: 'begin' });
    expect(s.refused(sam, { type: 'answer-clear' }).reason).toMatch(/No move has been called/);
    s.do(jo, { type: 'call-move' });
    s.do(sam, { type: 'answer-clear' });
    expect(s.refused(sam, { type: 'answer-clear' }).code).toBe('already-done');
  });

  it('answers already-done to a "clear" that comes after the set is locked', () => {
    const s = new Session().toInPosition();
    s.do(lee, { type: 'join', role: 'loader' });
    expect(s.refused(lee, { type: 'answer-clear' })).toMatchObject({
      code: 'already-done',
      reason: 'Line set 7 is already in position and locked.',
    });
  });

  it('answers already-done to a repeated call while the first is open', () => {
    const s = new Session().joinCrew();
    s.do(jo, { type: 'begin' });
    s.do(jo, { type: 'call-move' });
    expect(s.refused(jo, { type: 'call-move' }).code).toBe('already-done');
  });
});

describe('tie-off and clearing the rail', () => {
  it('refuses to clear the rail before a planned tie-off', () => {
    const s = new Session([trussLineSet]).toInPosition();
    expect(s.refused(sam, { type: 'call-clear-rail' }).reason).toBe('The rail operator must tie off line set 12 first.');
    s.do(jo, { type: 'confirm-tie-off' });
    expect(s.state.lineSets[0].done[0]).toBe(true);
    s.do(sam, { type: 'call-clear-rail' });
  });

  it('refuses a tie-off the plan does not have', () => {
    const s = new Session().toInPosition();
    expect(s.refused(jo, { type: 'confirm-tie-off' }).reason).toBe('The plan for line set 7 needs no tie-off.');
  });

  it('lets only a loader call to clear the rail, and only the lead confirm it', () => {
    const s = new Session().toInPosition();
    expect(s.refused(robin, { type: 'call-clear-rail' }).code).toBe('forbidden');
    expect(s.refused(jo, { type: 'confirm-rail-clear' }).reason).toBe('The loaders must call to clear the rail first.');
    s.do(alex, { type: 'call-clear-rail' });
    expect(s.refused(lee, { type: 'confirm-rail-clear' }).code).toBe('forbidden');
    const d = s.do(jo, { type: 'confirm-rail-clear' });
    // Stepped at least 10 ft away, keeping watch (common practice).
    expect(d.entries[0].details).toMatchObject({ distanceFt: 10 });
  });

  it('refuses every rail-side action while the rail is clear, but lets the rail operator hold, release and note', () => {
    const s = new Session([trussLineSet, twoDrapeLineSet]).toRailClear();
    const railClear =
      'The rail is clear for loading on line set 12: nothing may be done at the rail until the loaders call "loading complete".';
    for (const action of [
      { type: 'call-move' },
      { type: 'confirm-locked' },
      { type: 'confirm-tie-off' },
      { type: 'confirm-untie' },
      { type: 'record-test', result: 'balanced' },
    ] as const) {
      expect(s.refused(jo, action)).toMatchObject({ code: 'refused', reason: railClear });
    }
    expect(s.refused(jo, { type: 'confirm-rail-clear' }).code).toBe('already-done');
    s.do(jo, { type: 'note', text: 'Watching from the SL wing' });
    s.do(jo, { type: 'call-hold', reason: 'Brick slipping' });
    s.do(jo, { type: 'release-hold' });
  });
});

describe('work steps', () => {
  it('refuses bricks before the rail is clear', () => {
    const s = new Session().toInPosition();
    expect(s.refused(sam, { type: 'confirm-step', stepIndex: 0 }).reason).toBe('The loaders must call to clear the rail first.');
    s.do(sam, { type: 'call-clear-rail' });
    expect(s.refused(sam, { type: 'confirm-step', stepIndex: 0 }).reason).toBe(
      'The rail operator must step back from the rail and confirm it is clear first.',
    );
  });

  it('refuses a drape before its bricks, naming what must happen first', () => {
    // Unloading: remove bricks from the arbor FIRST, then the load from the batten (order of operations: stage rigging handbooks and school crew guides; common practice).
    const s = new Session().toRailClear();
    const r = s.refused(robin, { type: 'confirm-step', stepIndex: 1 });
    expect(r).toMatchObject({ code: 'refused', reason: 'The loaders must pull 2 bricks for Drape A first.' });
    expect(r.entry).toMatchObject({ kind: 'refused', lineSetId: 'ls-7', stepIndex: 1, role: 'deck' });
  });

  it('refuses a future step and answers already-done to a stale index', () => {
    const s = new Session().toRailClear();
    expect(s.refused(sam, { type: 'confirm-step', stepIndex: 2 }).reason).toBe('The loaders must pull 2 bricks for Drape A first.');
    s.do(sam, { type: 'confirm-step', stepIndex: 0 });
    const stale = s.refused(alex, { type: 'confirm-step', stepIndex: 0 });
    expect(stale).toMatchObject({ code: 'already-done', reason: 'Step 1 is already done: pulled 2 bricks for Drape A.' });
    expect(s.refused(sam, { type: 'confirm-step', stepIndex: 2 }).reason).toBe('The deck crew must take Drape A off the batten first.');
  });

  it('forbids the wrong role: bricks are a loader\'s, pieces the deck crew\'s', () => {
    const s = new Session().toRailClear();
    expect(s.refused(robin, { type: 'confirm-step', stepIndex: 0 })).toMatchObject({
      code: 'forbidden',
      reason: 'Pull 2 bricks for Drape A is confirmed by a loader.',
    });
    s.do(sam, { type: 'confirm-step', stepIndex: 0 });
    expect(s.refused(alex, { type: 'confirm-step', stepIndex: 1 }).code).toBe('forbidden');
    expect(s.refused(kit, { type: 'confirm-step', stepIndex: 1 }).code).toBe('forbidden');
    expect(s.refused(jo, { type: 'confirm-step', stepIndex: 1 }).code).toBe('forbidden');
  });

  it('refuses a step index past the plan and a rail step sent as a work step', () => {
    const s = new Session().toRailClear();
    expect(s.refused(sam, { type: 'confirm-step', stepIndex: 9 }).reason).toBe('Line set 7 has no step 10.');
    expect(s.refused(sam, { type: 'confirm-step', stepIndex: 4 }).reason).toMatch(/rail operator's, not a loading step/);
  });

  it('recomputes the balance after each step and logs it with the step', () => {
    const s = new Session().toRailClear();
    const d = s.do(sam, { type: 'confirm-step', stepIndex: 0 });
    expect(s.state.lineSets[0].imbalanceKg).toBe(18);
    expect(d.entries[0]).toMatchObject({
      kind: 'step-confirmed',
      lineSetId: 'ls-7',
      stepIndex: 0,
      role: 'loader',
      details: { imbalanceKg: 18, plannedImbalanceKg: 18, bricksOnArbor: { full: 2 } },
    });
  });

  it('refuses "loading complete" until every work step is done', () => {
    const s = new Session().toRailClear();
    s.do(sam, { type: 'confirm-step', stepIndex: 0 });
    expect(s.refused(sam, { type: 'call-loading-complete' }).reason).toBe('The deck crew must take Drape A off the batten first.');
    expect(s.refused(robin, { type: 'call-loading-complete' }).code).toBe('forbidden');
  });
});

describe('after loading complete', () => {
  function toLoadingComplete(s: Session) {
    s.toRailClear();
    const ls = s.state.lineSets[s.state.activeIndex!];
    ls.steps.forEach((step, i) => {
      if (step.kind.endsWith('bricks')) s.do(sam, { type: 'confirm-step', stepIndex: i });
      if (step.kind.endsWith('piece')) s.do(robin, { type: 'confirm-step', stepIndex: i });
    });
    s.do(alex, { type: 'call-loading-complete' });
    return s;
  }

  it('has the rail operator untie before testing a tied set', () => {
    const s = toLoadingComplete(new Session([trussLineSet]));
    expect(s.refused(jo, { type: 'record-test', result: 'balanced' }).reason).toBe('The rail operator must untie line set 12 first.');
    s.do(jo, { type: 'confirm-untie' });
    expect(s.refused(jo, { type: 'confirm-untie' }).code).toBe('already-done');
    s.do(jo, { type: 'record-test', result: 'balanced' });
    expect(s.state.lineSets[0].done).toEqual([true, true, true, true, true]);
    expect(s.state.phase).toBe('finished');
  });

  it('refuses an untie on a set never tied off', () => {
    const s = toLoadingComplete(new Session());
    expect(s.refused(jo, { type: 'confirm-untie' }).reason).toBe('Line set 7 was not tied off.');
  });

  it('refuses an out-of-balance result without an estimate', () => {
    const s = toLoadingComplete(new Session());
    expect(s.refused(jo, { type: 'record-test', result: 'pipe-heavy' }).reason).toBe('Give how far out of balance the set is (the estimate) when it is not balanced.');
  });

  it('keeps an out-of-balance set flagged until its correction is worked out, run with its own clear-the-rail call, and tested again', () => {
    const s = toLoadingComplete(new Session([twoDrapeLineSet, trussLineSet]));
    s.do(jo, { type: 'record-test', result: 'pipe-heavy', estimateKg: 18, note: 'Trim chain still on' });
    expect(s.state.lineSets[0]).toMatchObject({ flagged: true, measuredKg: 18, imbalanceKg: 0 });
    // A second test of a tested set is refused as already done: the new test follows a correction.
    expect(s.refused(jo, { type: 'record-test', result: 'balanced', lineSetId: 'ls-7' })).toMatchObject({
      code: 'already-done',
      reason: 'Line set 7 has already been tested: pipe-heavy by 39.7 lb. Work out its correction first; the new test follows it.',
    });
    // The next line set may be called with the flag still on; no correction while it is worked.
    s.do(jo, { type: 'call-move' });
    expect(s.refused(jo, { type: 'plan-correction', lineSetId: 'ls-7' }).reason).toMatch(/^Line set 12 is being worked/);
    for (const p of [sam, alex, robin]) s.do(p, { type: 'answer-clear' });
    s.do(jo, { type: 'confirm-locked' });
    s.do(jo, { type: 'confirm-tie-off' });
    s.do(sam, { type: 'call-clear-rail' });
    s.do(jo, { type: 'confirm-rail-clear' });
    s.do(sam, { type: 'confirm-step', stepIndex: 1 });
    s.do(robin, { type: 'confirm-step', stepIndex: 2 });
    s.do(sam, { type: 'call-loading-complete' });
    s.do(jo, { type: 'confirm-untie' });
    s.do(jo, { type: 'record-test', result: 'balanced' });
    expect(s.state.phase).toBe('loading');
    expect(nextStepFor(s.state, jo.personId).actions).toEqual(['plan-correction']);

    // 18 kg pipe-heavy by the rail's measure: two 9 kg bricks from the bridge (four came off the arbor there).
    const planned = s.do(jo, { type: 'plan-correction', lineSetId: 'ls-7' });
    expect(planned.entries[0]).toMatchObject({ kind: 'correction-planned', details: { measuredKg: 18, computedKg: 0, fromStep: 5 } });
    const ls = s.state.lineSets[0];
    expect(ls.steps.slice(5).map((x) => x.kind)).toEqual(['add-bricks', 'test-balance']);
    expect(ls.steps[5].bricks).toEqual({ full: 2 });
    expect(ls.stage).toBe('in-position');
    expect(stepText(ls, 5)).toBe('load 2 bricks onto the arbor of line set 7 to correct its balance');
    expect(s.refused(jo, { type: 'plan-correction', lineSetId: 'ls-7' }).code).toBe('already-done');
    expect(s.refused(jo, { type: 'record-test', result: 'balanced' }).reason).toBe('The loaders must call to clear the rail first.');
    s.do(alex, { type: 'call-clear-rail' });
    s.do(jo, { type: 'confirm-rail-clear' });
    s.do(alex, { type: 'confirm-step', stepIndex: 5 });
    // Measured beside computed: the rail's figure comes to balance, the schedule's goes 18 kg arbor-heavy.
    expect(s.state.lineSets[0]).toMatchObject({ measuredKg: 0, imbalanceKg: -18 });
    expect(s.state.bridgeStock).toEqual({ full: 6 });
    s.do(alex, { type: 'call-loading-complete' });
    const d = s.do(jo, { type: 'record-test', result: 'balanced' });
    expect(d.entries[0].details).toMatchObject({ flagCleared: true, flagged: false, afterCorrection: true });
    expect(d.entries[1]).toMatchObject({ kind: 'finished', role: 'system' });
    expect(s.state).toMatchObject({ phase: 'finished', endedHow: 'complete' });
    expect(nextStepFor(s.state, jo.personId)).toEqual({ actions: [], text: 'The session has finished: every line set is tested in balance.' });
  });

  it('writes the correction, its refusals and the log in the venue\'s units: a metric venue reads kilograms', () => {
    const s = toLoadingComplete(new Session([twoDrapeLineSet], { units: 'metric' }));
    const test = s.do(jo, { type: 'record-test', result: 'pipe-heavy', estimateKg: 18 });
    expect(describeEntry(test.entries[0], s.state)).toMatch(/pipe-heavy by about 18 kg/);
    expect(s.refused(jo, { type: 'record-test', result: 'balanced', lineSetId: 'ls-7' }).reason)
      .toBe('Line set 7 has already been tested: pipe-heavy by 18 kg. Work out its correction first; the new test follows it.');
    const planned = s.do(jo, { type: 'plan-correction', lineSetId: 'ls-7' });
    const details = planned.entries[0].details as { measuredText: string; steps: { text?: string }[] };
    expect(details.measuredText).toBe('18 kg pipe-heavy');
    const sentence = describeEntry(planned.entries[0], s.state);
    expect(sentence).toMatch(/measured 18 kg pipe-heavy, computed balanced/);
    expect(sentence).not.toMatch(/\blb\b/);
    expect(JSON.stringify(details.steps)).not.toMatch(/\blb\b/);
    // The same session at an imperial venue reads pounds.
    const imperial = toLoadingComplete(new Session([twoDrapeLineSet], { units: 'imperial' }));
    imperial.do(jo, { type: 'record-test', result: 'pipe-heavy', estimateKg: 18 });
    expect(describeEntry(imperial.do(jo, { type: 'plan-correction', lineSetId: 'ls-7' }).entries[0], imperial.state)).toMatch(/measured 39.7 lb pipe-heavy/);
  });

  it('refuses a metric venue\'s correction Railcall cannot work out in kilograms', () => {
    const s = toLoadingComplete(new Session([twoDrapeLineSet], { units: 'metric' }));
    s.do(jo, { type: 'record-test', result: 'pipe-heavy', estimateKg: 4 });
    expect(s.refused(jo, { type: 'plan-correction' }).reason).toBe(
      'Line set 7 cannot be corrected by Railcall: It is out by 4 kg, less than the lightest brick (9 kg): no brick would bring it closer to balance.',
    );
  });

  it('refuses a correction Railcall cannot work out, with the figures', () => {
    const s = toLoadingComplete(new Session());
    s.do(jo, { type: 'record-test', result: 'pipe-heavy', estimateKg: 4 });
    expect(s.refused(jo, { type: 'plan-correction' }).reason).toBe(
      'Line set 7 cannot be corrected by Railcall: It is out by 8.8 lb, less than the lightest brick (19.8 lb): no brick would bring it closer to balance.',
    );
  });
});

describe('a test-only plan', () => {
  const testOnly = { ...twoDrapeLineSet, steps: [{ kind: 'test-balance' as const, imbalanceAfterKg: 0 }] };

  it('is tested as soon as the set is in and locked, with no rail cleared and nobody for bricks or pieces', () => {
    const s = new Session([testOnly]);
    s.do(jo, { type: 'join', role: 'rail' });
    s.do(jo, { type: 'begin', shortCrewReason: 'Only testing line set 7' });
    s.do(jo, { type: 'call-move' });
    s.do(jo, { type: 'confirm-locked' });
    expect(waitingOn(s.state).text).toBe('The rail operator must test the balance of line set 7.');
    s.do(jo, { type: 'record-test', result: 'balanced' });
    expect(s.state.phase).toBe('finished');
  });

  it('refuses clearing the rail for it', () => {
    const s = new Session([testOnly]).toInPosition();
    expect(s.refused(sam, { type: 'call-clear-rail' }).reason).toBe('Line set 7 is a test only: nothing is loaded, so the rail is not cleared.');
  });
});

describe('holds', () => {
  it('refuses everything but acknowledging during a hold, saying who called it and why', () => {
    const s = new Session().toRailClear();
    s.do(kit, { type: 'call-hold', reason: 'Loose brick on the bridge' });
    const holdOn =
      'A hold is on, called by Kit Harrow ("Loose brick on the bridge"). Nothing goes ahead until the rail operator releases it.';
    for (const [actor, action] of [
      [sam, { type: 'confirm-step', stepIndex: 0 }],
      [robin, { type: 'note', text: 'ok' }],
      [alex, { type: 'call-hold' }],
      [sam, { type: 'leave' }],
    ] as const) {
      expect(s.refused(actor, action)).toMatchObject({ code: 'refused', reason: holdOn });
    }
    expect(decide(s.state, { type: 're-alert', personIds: [2] }, SYSTEM_ACTOR, s.nowMs).ok).toBe(false);
    s.do(sam, { type: 'ack-hold' });
    expect(s.refused(sam, { type: 'ack-hold' }).code).toBe('already-done');
    expect(s.refused(kit, { type: 'release-hold' }).code).toBe('forbidden');
    const d = s.do(jo, { type: 'release-hold' });
    expect(d.entries[0].details).toMatchObject({ holdBy: 'Kit Harrow', acknowledgedBy: ['Kit Harrow', 'Sam Brightwater'] });
    s.do(sam, { type: 'confirm-step', stepIndex: 0 });
  });

  it('lets anyone joined call a hold before loading begins, and a rail operator join to release it', () => {
    const s = new Session();
    s.do(kit, { type: 'join', role: 'stage-manager' });
    s.do(kit, { type: 'call-hold' });
    expect(s.refused(sam, { type: 'join', role: 'loader' }).reason).toMatch(/^A hold is on, called by Kit Harrow\./);
    s.do(jo, { type: 'join', role: 'rail' });
    s.do(jo, { type: 'release-hold' });
  });

  it('refuses ack or release with no hold on', () => {
    const s = new Session().joinCrew();
    expect(s.refused(sam, { type: 'ack-hold' }).reason).toBe('No hold is on.');
    expect(s.refused(jo, { type: 'release-hold' }).code).toBe('already-done');
  });
});

describe('beginning needs someone for every kind of step', () => {
  it('refuses to begin with no deck crew when the plan has deck steps, even with a reason, naming who is missing', () => {
    const s = new Session();
    for (const [p, role] of [[jo, 'rail'], [sam, 'loader'], [alex, 'loader']] as const) s.do(p, { type: 'join', role });
    const r = s.refused(jo, { type: 'begin', shortCrewReason: 'Robin is late' });
    expect(r.reason).toBe('Nobody joined can do the deck steps (hanging or taking off pieces on line set 7): a deck crew member must join.');
    expect(allowedActions(s.state, jo.personId)).not.toContain('begin');
    expect(waitingOn(s.state).text).toBe('A deck crew member must join for the deck steps on line set 7.');
    s.do(robin, { type: 'join', role: 'deck' });
    s.do(jo, { type: 'begin' });
  });

  it('refuses to begin with no loader when the plan moves bricks', () => {
    const s = new Session();
    s.do(jo, { type: 'join', role: 'rail' });
    s.do(robin, { type: 'join', role: 'deck' });
    expect(s.refused(jo, { type: 'begin', shortCrewReason: 'short' }).reason).toMatch(/a loader must join/);
  });
});

describe('ending and re-alerts', () => {
  it('lets the lead end with a reason, listing what was left untested', () => {
    const s = new Session().joinCrew();
    s.do(jo, { type: 'begin' });
    expect(s.refused(sam, { type: 'end', reason: 'done' }).code).toBe('forbidden');
    const d = s.do(jo, { type: 'end', reason: 'Fire alarm' });
    expect(d.entries[0].details).toMatchObject({ untested: ['7'] });
    expect(s.refused(jo, { type: 'note', text: 'after' }).reason).toBe('The session has finished.');
  });

  it('lets the lead end at any moment, also while the loaders work and during a hold, saying what each set was left in', () => {
    const s = new Session([twoDrapeLineSet, trussLineSet]).toRailClear();
    s.do(sam, { type: 'confirm-step', stepIndex: 0 });
    s.do(kit, { type: 'call-hold', reason: 'Loose brick' });
    const d = s.do(jo, { type: 'end', reason: 'Out of time' });
    expect(s.state).toMatchObject({ phase: 'finished', endedHow: 'ended', hold: null });
    expect(s.state.lineSets.map((l) => l.flagged)).toEqual([true, false]);
    expect(d.entries[0].details).toMatchObject({
      flagged: ['7'],
      leftAs: [
        { name: '7', outcome: 'stopped part way (3 steps not done), not tested: flagged' },
        { name: '12', outcome: 'not started: its load is unchanged' },
      ],
    });
    expect(describeEntry({ ...d.entries[0], personName: 'Jo Castellan' })).toBe(
      'Jo Castellan ended the session: "Out of time". Line set 7: stopped part way (3 steps not done), not tested: flagged. Line set 12: not started: its load is unchanged.',
    );
  });

  it('accepts re-alert only from Railcall itself, for people still silent', () => {
    const s = new Session().joinCrew();
    s.do(jo, { type: 'begin' });
    s.do(jo, { type: 'call-move' });
    s.do(sam, { type: 'answer-clear' });
    expect(s.refused(jo, { type: 're-alert', personIds: [3] }).code).toBe('forbidden');
    expect(s.refused(SYSTEM_ACTOR, { type: 'note', text: 'x' }).code).toBe('forbidden');
    expect(s.refused(SYSTEM_ACTOR, { type: 're-alert', personIds: [2] }).code).toBe('already-done');
    const d = s.do(SYSTEM_ACTOR, { type: 're-alert', personIds: [2, 3, 4] });
    expect(d.entries[0]).toMatchObject({ kind: 're-alerted', role: 'system', details: { people: [{ name: 'Alex Tamsin' }, { name: 'Robin Ashby' }] } });
    expect(s.state.lineSets[0].call?.alerts.map((a) => a.personId)).toEqual([3, 4]);
  });
});

describe('decide', () => {
  it('never changes the state it is given, even when frozen deep', () => {
    const s = new Session().toRailClear();
    const frozen = deepFreeze(structuredClone(s.state));
    const d = decide(frozen, { type: 'confirm-step', stepIndex: 0 }, sam, s.nowMs);
    expect(d.ok).toBe(true);
    expect(frozen.lineSets[0].imbalanceKg).toBe(0);
  });
});

function deepFreeze<T>(value: T): T {
  if (value && typeof value === 'object') {
    for (const v of Object.values(value)) deepFreeze(v);
    Object.freeze(value);
  }
  return value;
}

describe('a balance test beyond what the rope lock holds', () => {
  const unloaded = () => {
    const s = new Session([twoDrapeLineSet, trussLineSet]).toRailClear();
    s.do(sam, { type: 'confirm-step', stepIndex: 0 });
    s.do(robin, { type: 'confirm-step', stepIndex: 1 });
    s.do(alex, { type: 'confirm-step', stepIndex: 2 });
    s.do(robin, { type: 'confirm-step', stepIndex: 3 });
    s.do(sam, { type: 'call-loading-complete' });
    return s;
  };

  it('is refused until the set is tied off, and then no other set is called until it is corrected', () => {
    // The rope lock limit is 50 lb (22.68 kg): common practice default.
    const s = unloaded();
    expect(s.refused(jo, { type: 'record-test', result: 'pipe-heavy', estimateKg: 30 }).reason).toMatch(/more out of balance than the rope lock holds \(50 lb/);
    const d = s.do(jo, { type: 'record-test', result: 'pipe-heavy', estimateKg: 30, tiedOff: true });
    expect(d.entries[0].details).toMatchObject({ tiedOff: true, flagged: true });
    expect(s.refused(jo, { type: 'call-move' }).reason).toMatch(/tied off out of balance/);
    expect(s.refused(jo, { type: 'record-test', result: 'balanced', lineSetId: s.state.lineSets[0].id }).code).toBe('already-done');
    // 30 kg pipe-heavy, tied off: three of the four 9 kg bricks on the bridge, then untie, then a new test.
    s.do(jo, { type: 'plan-correction' });
    const ls = s.state.lineSets[0];
    expect(ls.steps.slice(5).map((x) => x.kind)).toEqual(['add-bricks', 'untie', 'test-balance']);
    expect(ls.steps[5]).toMatchObject({ bricks: { full: 3 }, imbalanceAfterKg: 3 });
    s.do(sam, { type: 'call-clear-rail' });
    s.do(jo, { type: 'confirm-rail-clear' });
    s.do(sam, { type: 'confirm-step', stepIndex: 5 });
    s.do(sam, { type: 'call-loading-complete' });
    expect(s.refused(jo, { type: 'record-test', result: 'balanced' }).reason).toBe('The rail operator must untie line set 7 first.');
    s.do(jo, { type: 'confirm-untie' });
    const fixed = s.do(jo, { type: 'record-test', result: 'balanced' });
    expect(fixed.entries[0].details).toMatchObject({ tiedOff: false, flagCleared: true });
    s.do(jo, { type: 'call-move' });
  });

  it('within the rope lock needs no tie-off', () => {
    const s = unloaded();
    s.do(jo, { type: 'record-test', result: 'arbor-heavy', estimateKg: 5 });
    expect(s.state.lineSets[0].tiedOff).toBe(false);
  });
});
