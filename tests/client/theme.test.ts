import { beforeEach, describe, expect, it } from 'vitest';
import { nextTick } from 'vue';
import { createPinia, setActivePinia } from 'pinia';
import { createApp } from 'vue';
import { Dark, Quasar } from 'quasar';
import { useThemeStore } from '@/stores/theme';

describe('useThemeStore', () => {
  beforeEach(() => {
    localStorage.clear();
    const app = createApp({});
    app.use(Quasar);
    const pinia = createPinia();
    app.use(pinia);
    setActivePinia(pinia);
  });

  it('starts dark when nothing was chosen', () => {
    const theme = useThemeStore();
    expect(theme.mode).toBe('dark');
    expect(Dark.isActive).toBe(true);
  });

  it('remembers the light theme on this device', async () => {
    useThemeStore().toggle();
    await nextTick();
    expect(Dark.isActive).toBe(false);
    expect(localStorage.getItem('railcall:theme')).toBe('light');

    setActivePinia(createPinia());
    expect(useThemeStore().mode).toBe('light');
  });
});
