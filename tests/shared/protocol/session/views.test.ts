import { describe, expect, it } from 'vitest';
import {
  SYSTEM_ACTOR,
  allowedActions,
  describeEntry,
  entryHashText,
  nextReAlertAtMs,
  nextStepFor,
  refusalToApiError,
  silentSince,
  waitingOn,
} from '@shared/protocol/session';
import { Session, T0, alex, jo, kit, robin, sam } from './fixtures';

function called() {
  const s = new Session().joinCrew();
  s.do(jo, { type: 'begin' });
  s.do(jo, { type: 'call-move' });
  return s;
}

describe('silentSince', () => {
  it('lists who has not answered, due once the venue re-alert time (20 s default) has passed', () => {
    const s = called();
    const calledAt = s.nowMs;
    s.do(sam, { type: 'answer-clear' }, 5000);
    const at19 = silentSince(s.state, calledAt + 19_000);
    expect(at19.map((p) => [p.name, p.due, p.silentForMs])).toEqual([
      ['Alex Tamsin', false, 19_000],
      ['Robin Ashby', false, 19_000],
    ]);
    expect(nextReAlertAtMs(s.state)).toBe(calledAt + 20_000);
    expect(silentSince(s.state, calledAt + 20_000).every((p) => p.due)).toBe(true);
  });

  it('counts silence again from each re-alert, and flags how many were sent', () => {
    const s = called();
    const calledAt = s.nowMs;
    s.do(SYSTEM_ACTOR, { type: 're-alert', personIds: [2, 3, 4] }, 20_000);
    const after = silentSince(s.state, calledAt + 30_000);
    expect(after.map((p) => [p.reAlerts, p.due, p.nextReAlertAtMs])).toEqual([
      [1, false, calledAt + 40_000],
      [1, false, calledAt + 40_000],
      [1, false, calledAt + 40_000],
    ]);
  });

  it('follows the venue setting, and is empty during a hold and with no call open', () => {
    const s = new Session(undefined, { reAlertSeconds: 45 }).joinCrew();
    s.do(jo, { type: 'begin' });
    expect(silentSince(s.state, s.nowMs)).toEqual([]);
    expect(nextReAlertAtMs(s.state)).toBeNull();
    s.do(jo, { type: 'call-move' });
    expect(nextReAlertAtMs(s.state)).toBe(s.nowMs + 45_000);
    s.do(kit, { type: 'call-hold' });
    expect(silentSince(s.state, s.nowMs + 60_000)).toEqual([]);
    s.do(jo, { type: 'release-hold' }, 60_000);
    expect(silentSince(s.state, s.nowMs)[0]).toMatchObject({ silentForMs: 0, due: false });
  });
});

describe('waitingOn', () => {
  it('names the lead to release a hold', () => {
    const s = called();
    s.do(sam, { type: 'call-hold', reason: 'Heads' });
    expect(waitingOn(s.state)).toEqual({
      text: 'A hold is on, called by Sam Brightwater ("Heads"). Nothing goes ahead until the rail operator releases it.',
      people: [{ personId: 1, name: 'Jo Castellan', role: 'rail' }],
    });
  });

  it('says what is missing before loading begins', () => {
    const s = new Session();
    expect(waitingOn(s.state).text).toBe('A rail operator must join to lead the session.');
    s.do(jo, { type: 'join', role: 'rail' });
    expect(waitingOn(s.state).text).toBe(
      'A loader must join for the brick steps on line set 7, and a deck crew member for the deck steps on line set 7.',
    );
    s.do(sam, { type: 'join', role: 'loader' });
    s.do(robin, { type: 'join', role: 'deck' });
    expect(waitingOn(s.state).text).toBe(
      'The crew must join (need 2 loaders, 1 joined), or the lead must begin short with a reason.',
    );
  });

  it('names the deck crew when a piece is next', () => {
    const s = new Session().toRailClear();
    s.do(sam, { type: 'confirm-step', stepIndex: 0 });
    expect(waitingOn(s.state).people.map((p) => p.name)).toEqual(['Robin Ashby']);
  });
});

describe('allowedActions and nextStepFor', () => {
  it('offers only joining to someone not joined', () => {
    expect(allowedActions(new Session().state, 99)).toEqual(['join']);
  });

  it('offers begin to the lead when short (a reason will be asked for)', () => {
    const s = new Session();
    s.do(jo, { type: 'join', role: 'rail' });
    s.do(sam, { type: 'join', role: 'loader' });
    s.do(robin, { type: 'join', role: 'deck' });
    expect(allowedActions(s.state, jo.personId)).toContain('begin');
    expect(nextStepFor(s.state, jo.personId).text).toBe('The minimum crew has not joined: wait, or begin short with a reason.');
  });

  it('offers only acknowledging (or, to the lead, releasing) during a hold', () => {
    const s = new Session().toRailClear();
    s.do(robin, { type: 'call-hold' });
    expect(allowedActions(s.state, sam.personId)).toEqual(['ack-hold']);
    // The one who called it may say why.
    expect(allowedActions(s.state, robin.personId)).toEqual(['give-hold-reason']);
    expect(allowedActions(s.state, jo.personId)).toEqual(['ack-hold', 'release-hold', 'end']);
    expect(nextStepFor(s.state, sam.personId).text).toMatch(/Acknowledge it\.$/);
    expect(allowedActions(s.state, 99)).toEqual([]);
  });

  it('offers the next step only to its role, and nothing at the rail, while the rail is clear', () => {
    const s = new Session().toRailClear();
    for (const person of [jo, sam, alex, robin, kit]) {
      expect(allowedActions(s.state, person.personId)).not.toContain('call-move');
    }
    expect(allowedActions(s.state, sam.personId)).toContain('confirm-step');
    expect(allowedActions(s.state, robin.personId)).not.toContain('confirm-step');
  });
});

describe('describeEntry', () => {
  it('writes refusals, holds, notes, tests and re-alerts as one plain sentence', () => {
    const s = called();
    const r = s.refused(jo, { type: 'confirm-locked' });
    expect(describeEntry({ ...r.entry, personName: 'Jo Castellan' })).toBe(
      'Jo Castellan tried to confirm a line set in and locked and was refused: Waiting for "clear" from Sam Brightwater, Alex Tamsin and Robin Ashby: nothing proceeds without their answers.',
    );
    const alert = s.do(SYSTEM_ACTOR, { type: 're-alert', personIds: [3] }, 20_000);
    expect(describeEntry(alert.entries[0])).toBe('Railcall re-alerted Alex Tamsin: no "clear" yet for line set 7.');
    const hold = s.do(kit, { type: 'call-hold', reason: 'Heads' });
    expect(describeEntry({ ...hold.entries[0], personName: 'Kit Harrow' })).toBe('Kit Harrow called a hold: "Heads".');
    expect(
      describeEntry({
        kind: 'test-recorded',
        lineSetId: 'ls-7',
        personName: 'Jo Castellan',
        details: { result: 'pipe-heavy', estimateKg: 4, note: 'Trim chain on', flagged: true, computedImbalanceKg: 0 },
      }, s.state),
    ).toBe('Jo Castellan tested line set 7: pipe-heavy by about 4 kg (computed: balanced) ("Trim chain on"). It stays flagged until corrected.');
  });
});

describe('events helpers', () => {
  it('maps already-done to the conflict error code and keeps the reason', () => {
    const s = called();
    s.do(sam, { type: 'answer-clear' });
    const r = s.refused(sam, { type: 'answer-clear' });
    expect(refusalToApiError(r)).toEqual({ code: 'conflict', message: 'You have already answered "clear" for line set 7.' });
  });

  it('hashes the same text whatever the key order, leaving out only the top-level hash', () => {
    const base = {
      seq: 1, serverTimeMs: T0, clientTimeMs: T0, personId: 1, personName: 'Jo', role: 'rail' as const,
      kind: 'note', lineSetId: null, stepIndex: null, prevHash: '', details: { b: 1, a: { hash: 'kept' } },
    };
    const reordered = { ...base, details: { a: { hash: 'kept' }, b: 1 } };
    expect(entryHashText(base)).toBe(entryHashText(reordered));
    expect(entryHashText({ ...base, hash: 'x' } as never)).toBe(entryHashText(base));
    expect(entryHashText(base)).toContain('"hash":"kept"');
  });
});

describe('describeEntry in the venue units', () => {
  it('states balances and estimates in pounds at an imperial venue, kilograms at a metric one', () => {
    // 20 lb = 9.0718474 kg by the exact definition 1 lb = 0.45359237 kg (NIST SP 811).
    const step = { kind: 'step-confirmed', personName: 'Sam Brightwater', lineSetId: 'ls7', stepIndex: 0, role: 'loader' as const, details: { imbalanceKg: 9.0718474, text: 'pulled 2 bricks' } };
    expect(describeEntry(step, undefined, 'imperial')).toContain('now 20 lb pipe-heavy');
    expect(describeEntry(step, undefined, 'metric')).toContain('now 9.1 kg pipe-heavy');
    const test = { kind: 'test-recorded', personName: 'Jo Castellan', lineSetId: 'ls7', role: 'rail' as const, details: { result: 'arbor-heavy', estimateKg: 4.5359237 } };
    expect(describeEntry(test, undefined, 'imperial')).toContain('arbor-heavy by about 10 lb');
  });
});
