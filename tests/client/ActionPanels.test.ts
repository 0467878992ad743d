import { afterEach, describe, expect, it } from 'vitest';
import { mount, type VueWrapper } from '@vue/test-utils';
import { Quasar } from 'quasar';
import type { Component } from 'vue';
import { SYSTEM_ACTOR, type SessionState } from '@shared/protocol/session';
import RailActionPanel from '@/components/session/RailActionPanel.vue';
import LoaderActionPanel from '@/components/session/LoaderActionPanel.vue';
import DeckActionPanel from '@/components/session/DeckActionPanel.vue';
import WatchActionPanel from '@/components/session/WatchActionPanel.vue';
import { alex, begun, calledDeckSilent, jo, kit, LB, newSession, play, railClear, robin, sam } from './support/session';

let wrapper: VueWrapper | null = null;
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
});

function panel(component: Component, state: SessionState, personId: number) {
  wrapper = mount(component, { props: { state, personId, units: 'imperial' }, global: { plugins: [Quasar] } });
  return wrapper;
}
const button = (w: VueWrapper, testId: string) => w.find(`[data-testid="${testId}"]`);
const buttonLabels = (w: VueWrapper) => w.findAll('button').map((b) => b.text());

describe('RailActionPanel', () => {
  it('reads a test estimate typed with a decimal comma ("5,5") as 5.5 in the venue units', async () => {
    const done = play(railClear(),
      [sam, { type: 'confirm-step', stepIndex: 0 }], [robin, { type: 'confirm-step', stepIndex: 1 }],
      [alex, { type: 'confirm-step', stepIndex: 2 }], [robin, { type: 'confirm-step', stepIndex: 3 }],
      [sam, { type: 'call-loading-complete' }]);
    const w = panel(RailActionPanel, done, jo.personId);
    await w.get('[data-testid="record-test"]').findAll('input, textarea')[0].setValue('5,5');
    await w.findAll('button').find((b) => b.text() === 'Arbor-heavy')!.trigger('click');
    const [[action]] = w.emitted('act') as [[{ type: string; result: string; estimateKg: number }]];
    expect(action).toMatchObject({ type: 'record-test', result: 'arbor-heavy' });
    expect(action.estimateKg).toBeCloseTo(5.5 * LB, 9);
  });

  it('records an out-of-balance test with the estimate in the venue units and a note, and then offers no second test', async () => {
    const done = play(railClear(),
      [sam, { type: 'confirm-step', stepIndex: 0 }], [robin, { type: 'confirm-step', stepIndex: 1 }],
      [alex, { type: 'confirm-step', stepIndex: 2 }], [robin, { type: 'confirm-step', stepIndex: 3 }],
      [sam, { type: 'call-loading-complete' }]);
    const w = panel(RailActionPanel, done, jo.personId);
    const inputs = w.get('[data-testid="record-test"]').findAll('input, textarea');
    await inputs[0].setValue('5');
    await inputs[1].setValue('Drifts in slowly');
    const pipeHeavy = w.findAll('button').find((b) => b.text() === 'Pipe-heavy')!;
    await pipeHeavy.trigger('click');
    const [[action]] = w.emitted('act') as [[{ type: string; result: string; estimateKg: number; note: string }]];
    expect(action).toMatchObject({ type: 'record-test', result: 'pipe-heavy', note: 'Drifts in slowly' });
    // 5 lb at the exact definition 1 lb = 0.45359237 kg (NIST SP 811).
    expect(action.estimateKg).toBeCloseTo(5 * LB, 9);

    // Once tested, the test form is gone: a second test of the set only follows its correction.
    await w.setProps({ state: play(done, [jo, action as never]) });
    expect(w.find('[data-testid="record-test"]').exists()).toBe(false);
    expect(buttonLabels(w).some((l) => /tests balanced now/.test(l))).toBe(false);
  });

  it('ends the session early only with a reason', async () => {
    const w = panel(RailActionPanel, begun(), jo.personId);
    await w.get('[data-testid="end-session"]').find('button').trigger('click');
    const end = () => w.findAll('button').find((b) => b.text() === 'End the session')!;
    expect(end().attributes('disabled')).toBeDefined();
    await w.get('[data-testid="end-session"]').find('textarea').setValue('Fire alarm test in the house');
    await end().trigger('click');
    expect(w.emitted('act')).toEqual([[{ type: 'end', reason: 'Fire alarm test in the house' }]]);
  });


  it('before the crew has joined offers no begin to a rail operator who has not joined', () => {
    const w = panel(RailActionPanel, newSession(), jo.personId);
    expect(buttonLabels(w)).toEqual([]);
  });

  it('offers one large "Call line set 7 in" once loading has begun, and emits call-move', async () => {
    const w = panel(RailActionPanel, begun(), jo.personId);
    const call = button(w, 'call-move');
    expect(call.text()).toBe('Call line set 7 in');
    await call.trigger('click');
    expect(w.emitted('act')).toEqual([[{ type: 'call-move' }]]);
  });

  it('lists the answers by name, highlights who is still silent, and does not offer "locked" until everyone is clear', async () => {
    const w = panel(RailActionPanel, calledDeckSilent(), jo.personId);
    expect(w.get('[data-testid="answers"]').text()).toContain('2 of 3 clear');
    const silent = w.findAll('[data-testid="answer-silent"]');
    expect(silent).toHaveLength(1);
    expect(silent[0].text()).toContain('Robin Ashby');
    expect(silent[0].text()).toContain('STILL SILENT');
    expect(w.findAll('[data-testid="answer-clear"]').map((a) => a.text())).toEqual([
      expect.stringContaining('Sam Brightwater'),
      expect.stringContaining('Alex Tamsin'),
    ]);
    expect(button(w, 'confirm-locked').exists()).toBe(false);
    expect(w.get('[data-testid="next-text"]').text()).toContain('Robin Ashby must answer "clear"');

    // After the venue's re-alert time Railcall alerts the silent person again; the caller sees it flagged.
    await w.setProps({ state: play(calledDeckSilent(), [SYSTEM_ACTOR, { type: 're-alert', personIds: [robin.personId] }]) });
    expect(w.get('[data-testid="re-alerted"]').text()).toContain('alerted again 1×');

    await w.setProps({ state: play(calledDeckSilent(), [robin, { type: 'answer-clear' }]) });
    expect(button(w, 'confirm-locked').text()).toBe('Line set 7 is in and locked');
  });

  it('reminds to stand 10 ft away and out from under the gallery when confirming the rail is clear', async () => {
    const state = play(calledDeckSilent(), [robin, { type: 'answer-clear' }], [jo, { type: 'confirm-locked' }], [sam, { type: 'call-clear-rail' }]);
    const w = panel(RailActionPanel, state, jo.personId);
    expect(w.get('[data-testid="caution"]').text()).toContain('at least 10 ft away from the rail and out from under the gallery');
    await button(w, 'confirm-rail-clear').trigger('click');
    expect(w.emitted('act')).toEqual([[{ type: 'confirm-rail-clear' }]]);
  });

  it('offers nothing at the rail while the rail is clear for loading, only ending the session early', () => {
    const w = panel(RailActionPanel, railClear(), jo.personId);
    expect(buttonLabels(w)).toEqual(['End the session early…']);
    expect(w.get('[data-testid="caution"]').text()).toContain('10 ft');
  });

  it('records a balance test: balanced at once, out of balance with an estimate in the venue units', async () => {
    const state = play(
      railClear(),
      [sam, { type: 'confirm-step', stepIndex: 0 }],
      [robin, { type: 'confirm-step', stepIndex: 1 }],
      [alex, { type: 'confirm-step', stepIndex: 2 }],
      [robin, { type: 'confirm-step', stepIndex: 3 }],
      [sam, { type: 'call-loading-complete' }],
    );
    const w = panel(RailActionPanel, state, jo.personId);
    const test = w.get('[data-testid="record-test"]');
    await test.findAll('button').find((b) => b.text() === 'Pipe-heavy')!.trigger('click');
    // No estimate yet: nothing is sent, the field says why.
    expect(w.emitted('act')).toBeUndefined();
    await test.get('input').setValue('5');
    await test.findAll('button').find((b) => b.text() === 'Pipe-heavy')!.trigger('click');
    const [[action]] = w.emitted('act') as [[{ type: string; result: string; estimateKg: number }]];
    expect(action).toMatchObject({ type: 'record-test', result: 'pipe-heavy' });
    expect(action.estimateKg).toBeCloseTo(5 * 0.45359237, 9);
    await test.findAll('button').find((b) => b.text() === 'Tested: balanced')!.trigger('click');
    expect((w.emitted('act') as unknown[][])[1]).toEqual([{ type: 'record-test', result: 'balanced' }]);
  });
});

describe('LoaderActionPanel', () => {
  it('answers a call with one "clear"', async () => {
    const w = panel(LoaderActionPanel, play(begun(), [jo, { type: 'call-move' }]), sam.personId);
    await button(w, 'answer-clear').trigger('click');
    expect(w.emitted('act')).toEqual([[{ type: 'answer-clear' }]]);
  });

  it('calls for the rail to be cleared once the set is locked', async () => {
    const state = play(calledDeckSilent(), [robin, { type: 'answer-clear' }], [jo, { type: 'confirm-locked' }]);
    const w = panel(LoaderActionPanel, state, alex.personId);
    await button(w, 'call-clear-rail').trigger('click');
    expect(w.emitted('act')).toEqual([[{ type: 'call-clear-rail' }]]);
  });

  it('shows the next brick step in large type in the venue units, the bricks on the arbor, and confirms it', async () => {
    const w = panel(LoaderActionPanel, railClear(), sam.personId);
    expect(w.get('[data-testid="brick-step"]').text()).toBe('Pull 2 bricks, 20 lb each');
    expect(w.text()).toContain('for Sea-mist drape A');
    expect(w.get('[data-testid="arbor-count"]').text()).toContain('4 bricks');
    await button(w, 'confirm-step').trigger('click');
    expect(w.emitted('act')).toEqual([[{ type: 'confirm-step', stepIndex: 0 }]]);
  });

  it('while the deck takes a piece off, offers nothing and says who is working', () => {
    const w = panel(LoaderActionPanel, play(railClear(), [sam, { type: 'confirm-step', stepIndex: 0 }]), alex.personId);
    expect(button(w, 'confirm-step').exists()).toBe(false);
    expect(w.get('[data-testid="next-text"]').text()).toContain('Wait');
    expect(w.get('[data-testid="up-next"]').text()).toContain('Pull 2 bricks, 20 lb each for Sea-mist drape B');
    expect(w.get('[data-testid="arbor-count"]').text()).toContain('2 bricks');
  });

  it('calls "loading complete" when every step is done', async () => {
    const state = play(
      railClear(),
      [sam, { type: 'confirm-step', stepIndex: 0 }],
      [robin, { type: 'confirm-step', stepIndex: 1 }],
      [alex, { type: 'confirm-step', stepIndex: 2 }],
      [robin, { type: 'confirm-step', stepIndex: 3 }],
    );
    const w = panel(LoaderActionPanel, state, alex.personId);
    await button(w, 'call-loading-complete').trigger('click');
    expect(w.emitted('act')).toEqual([[{ type: 'call-loading-complete' }]]);
  });
});

describe('DeckActionPanel', () => {
  it('answers a call with one large "clear"', async () => {
    const w = panel(DeckActionPanel, calledDeckSilent(), robin.personId);
    expect(button(w, 'answer-clear').text()).toBe('Clear');
    await button(w, 'answer-clear').trigger('click');
    expect(w.emitted('act')).toEqual([[{ type: 'answer-clear' }]]);
  });

  it('waits while the loaders pull bricks, then shows the piece step on its turn', async () => {
    const w = panel(DeckActionPanel, railClear(), robin.personId);
    expect(button(w, 'confirm-step').exists()).toBe(false);
    await w.setProps({ state: play(railClear(), [sam, { type: 'confirm-step', stepIndex: 0 }]) });
    expect(w.get('[data-testid="piece-step"]').text()).toBe('Take Sea-mist drape A off the batten');
    await button(w, 'confirm-step').trigger('click');
    expect(w.emitted('act')).toEqual([[{ type: 'confirm-step', stepIndex: 1 }]]);
  });
});

describe('WatchActionPanel', () => {
  it('says what the session waits on and adds a note to the log', async () => {
    const w = panel(WatchActionPanel, calledDeckSilent(), kit.personId);
    expect(w.get('[data-testid="next-text"]').text()).toContain('Robin Ashby must answer "clear"');
    await w.get('textarea').setValue('  Drape B has a torn tie  ');
    await w.get('form').trigger('submit');
    expect(w.emitted('act')).toEqual([[{ type: 'note', text: 'Drape B has a torn tie' }]]);
  });
});
