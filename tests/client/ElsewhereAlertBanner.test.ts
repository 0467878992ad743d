import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { flushPromises, mount, type VueWrapper } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { createMemoryHistory, createRouter } from 'vue-router';
import { Quasar } from 'quasar';
import ElsewhereAlertBanner from '@/components/session/ElsewhereAlertBanner.vue';
import { useLiveSessionStore } from '@/stores/liveSession';

let wrapper: VueWrapper | null = null;
beforeEach(() => setActivePinia(createPinia()));
afterEach(() => {
  wrapper?.unmount();
  wrapper = null;
});

async function banner() {
  const blank = { render: () => null };
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', component: blank },
      { path: '/sessions/:id', component: blank },
    ],
  });
  await router.push('/');
  wrapper = mount(ElsewhereAlertBanner, { global: { plugins: [Quasar, router] } });
  return { w: wrapper, router };
}

describe('ElsewhereAlertBanner', () => {
  it('shows a re-alert from another session with the way into it, and can be dismissed', async () => {
    const store = useLiveSessionStore();
    const { w, router } = await banner();
    expect(w.find('[data-testid="alert-elsewhere"]').exists()).toBe(false);

    store.alertElsewhere = {
      sessionId: 9,
      kind: 're-alert',
      lineSetId: 'ls7',
      people: [{ personId: 2, name: 'Sam Brightwater' }],
      text: 'Sam Brightwater: no "clear" yet for line set 7.',
      seq: 12,
      receivedAtMs: 1,
    };
    await flushPromises();
    const shown = w.get('[data-testid="alert-elsewhere"]');
    expect(shown.attributes('role')).toBe('alert');
    expect(shown.text()).toContain('no "clear" yet for line set 7');
    const open = w.get('[data-testid="alert-elsewhere-open"]');
    expect(open.attributes('href')).toBe('/sessions/9');
    await open.trigger('click');
    await flushPromises();
    expect(router.currentRoute.value.path).toBe('/sessions/9');

    await w.findAll('button').find((b) => b.text() === 'Dismiss')!.trigger('click');
    expect(store.alertElsewhere).toBeNull();
  });
});
