import { afterEach, describe, expect, it } from 'vitest';
import { mount, type VueWrapper } from '@vue/test-utils';
import { nextTick } from 'vue';
import { Quasar } from 'quasar';
import { createPinia } from 'pinia';
import SessionAlertOverlay from '@/components/session/SessionAlertOverlay.vue';
import { begun, jo, play, sam } from './support/session';

let wrapper: VueWrapper | null = null;
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
});

function overlay(busy = false) {
  const called = play(begun(), [jo, { type: 'call-move' }]);
  wrapper = mount(SessionAlertOverlay, {
    props: { state: called, personId: sam.personId, busy },
    attachTo: document.body,
    global: { plugins: [Quasar, createPinia()] },
  });
  return wrapper;
}

describe('SessionAlertOverlay', () => {
  it('offers HOLD on the call screen, which covers the hold bar, labelled for screen readers', async () => {
    const w = overlay();
    expect(w.find('[data-testid="call-alert"]').exists()).toBe(true);
    const hold = w.get('[data-testid="alert-call-hold"]');
    expect(hold.attributes('aria-label')).toBe('Call a hold: stop everything');
    await hold.trigger('click');
    expect(w.emitted('act')).toEqual([[{ type: 'call-hold' }]]);
  });

  it('keeps "Clear" the main action: the focused button, with HOLD after it', async () => {
    const w = overlay();
    await nextTick();
    await nextTick();
    const clear = w.get('[data-testid="alert-clear"]');
    expect(document.activeElement).toBe(clear.element);
    const buttons = w.findAll('button').map((b) => b.attributes('data-testid'));
    expect(buttons).toEqual(['alert-clear', 'alert-call-hold']);
  });

  it('never disables HOLD while other taps wait to send', () => {
    const w = overlay(true);
    expect(w.get('[data-testid="alert-clear"]').attributes('disabled')).toBeDefined();
    expect(w.get('[data-testid="alert-call-hold"]').attributes('disabled')).toBeUndefined();
  });
});
