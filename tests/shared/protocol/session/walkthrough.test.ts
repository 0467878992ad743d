import { describe, expect, it } from 'vitest';
import {
  allowedActions,
  describeEntry,
  nextStepFor,
  waitingOn,
  type Actor,
  type LogDraft,
} from '@shared/protocol/session';
import { Session, alex, jo, kit, robin, sam } from './fixtures';

/**
 * A whole unload of line set 7 (two 18 kg drapes, four 9 kg bricks, single purchase), in the
 * trade's order: the move call answered "clear" by everyone at risk (call and response: common practice),
 * the rail cleared before loaders work, bricks pulled for each piece before that piece comes off
 * (order of operations: stage rigging handbooks and school crew guides; common practice), "loading complete", and the rail operator's balance test.
 */
describe('a two-drape unload, walked through', () => {
  it('runs from joining to finished, with the log reading as the calls', () => {
    const s = new Session();
    const log: string[] = [];
    const act = (actor: Actor, action: Parameters<Session['do']>[1]) => {
      const d = s.do(actor, action);
      for (const e of d.entries) log.push(describeEntry(withName(e, actor), s.state));
      return d;
    };

    act(jo, { type: 'join', role: 'rail' });
    act(sam, { type: 'join', role: 'loader' });
    act(alex, { type: 'join', role: 'loader' });
    act(robin, { type: 'join', role: 'deck' });
    act(kit, { type: 'join', role: 'stage-manager' });
    expect(waitingOn(s.state).text).toBe('The rail operator must begin loading.');
    act(jo, { type: 'begin' });

    expect(nextStepFor(s.state, jo.personId).text).toBe('Call line set 7 in to the loading position.');
    act(jo, { type: 'call-move' });
    expect(waitingOn(s.state).people.map((p) => p.name)).toEqual(['Sam Brightwater', 'Alex Tamsin', 'Robin Ashby']);
    expect(allowedActions(s.state, robin.personId)).toEqual(['leave', 'answer-clear', 'call-hold', 'note']);
    for (const p of [sam, alex, robin]) act(p, { type: 'answer-clear' });
    expect(allowedActions(s.state, jo.personId)).toContain('confirm-locked');
    act(jo, { type: 'confirm-locked' });

    expect(nextStepFor(s.state, sam.personId).text).toBe('Call to clear the rail.');
    act(sam, { type: 'call-clear-rail' });
    act(jo, { type: 'confirm-rail-clear' });
    expect(nextStepFor(s.state, jo.personId).text).toBe(
      'Stay at least 10 ft back from the rail and keep watch until the loaders call "loading complete".',
    );

    const balance: number[] = [];
    expect(nextStepFor(s.state, alex.personId)).toMatchObject({ text: 'Pull 2 bricks for Drape A, then confirm.', stepIndex: 0 });
    expect(nextStepFor(s.state, robin.personId).text).toBe('Wait. The loaders must pull 2 bricks for Drape A.');
    act(alex, { type: 'confirm-step', stepIndex: 0 });
    balance.push(s.state.lineSets[0].imbalanceKg);
    expect(nextStepFor(s.state, robin.personId)).toMatchObject({ text: 'Take Drape A off the batten, then confirm.', stepIndex: 1 });
    act(robin, { type: 'confirm-step', stepIndex: 1 });
    balance.push(s.state.lineSets[0].imbalanceKg);
    act(sam, { type: 'confirm-step', stepIndex: 2 });
    balance.push(s.state.lineSets[0].imbalanceKg);
    act(robin, { type: 'confirm-step', stepIndex: 3 });
    balance.push(s.state.lineSets[0].imbalanceKg);
    // Pipe-heavy by one drape while it waits to come off, back to balanced after: never arbor-heavy.
    expect(balance).toEqual([18, 0, 18, 0]);
    expect(s.state.lineSets[0].load).toMatchObject({ pieces: [], bricks: { full: 0 } });

    expect(nextStepFor(s.state, sam.personId).text).toBe('Every step is done: call "loading complete".');
    act(sam, { type: 'call-loading-complete' });
    expect(allowedActions(s.state, jo.personId)).not.toContain('confirm-untie');
    expect(nextStepFor(s.state, jo.personId).text).toBe('Test the balance of line set 7 and record the result.');
    act(jo, { type: 'record-test', result: 'balanced' });

    expect(s.state.phase).toBe('finished');
    expect(allowedActions(s.state, jo.personId)).toEqual([]);
    expect(log).toEqual([
      'Jo Castellan joined as rail operator and leads the session.',
      'Sam Brightwater joined as loader.',
      'Alex Tamsin joined as loader.',
      'Robin Ashby joined as deck crew.',
      'Kit Harrow joined as stage manager.',
      'Jo Castellan began loading.',
      'Jo Castellan called line set 7 in to the loading position.',
      'Sam Brightwater answered "clear" for line set 7.',
      'Alex Tamsin answered "clear" for line set 7.',
      'Robin Ashby answered "clear" for line set 7.',
      'Jo Castellan confirmed line set 7 is in position and locked.',
      'Sam Brightwater called to clear the rail for line set 7.',
      'Jo Castellan confirmed the rail is clear for line set 7 (stepped back at least 10 ft, keeping watch).',
      'Alex Tamsin pulled 2 bricks for Drape A on line set 7: now 18.0 kg pipe-heavy.',
      'Robin Ashby took Drape A off the batten on line set 7: now balanced.',
      'Sam Brightwater pulled 2 bricks for Drape B on line set 7: now 18.0 kg pipe-heavy.',
      'Robin Ashby took Drape B off the batten on line set 7: now balanced.',
      'Sam Brightwater called "loading complete" on line set 7.',
      'Jo Castellan tested line set 7: balanced.',
      'Every line set is tested in balance: the session is finished.',
    ]);
  });
});

function withName(entry: LogDraft, actor: Actor) {
  return entry.role === 'system' ? entry : { ...entry, personName: actor.name };
}
