import { defineStore } from 'pinia';
import { computed, ref, watch } from 'vue';
import { Dark } from 'quasar';

export type ThemeMode = 'dark' | 'light';

const STORAGE_KEY = 'railcall:theme';
/** Page colours per theme, also given to the browser's own bars (meta theme-color). */
const PAGE_COLOURS: Record<ThemeMode, string> = { dark: '#121212', light: '#f5f6f8' };

function readSaved(): ThemeMode {
  try {
    return globalThis.localStorage?.getItem(STORAGE_KEY) === 'light' ? 'light' : 'dark';
  } catch {
    return 'dark';
  }
}

/** Dark by default (backstage is dark); a chosen light theme is remembered on this device. */
export const useThemeStore = defineStore('theme', () => {
  const mode = ref<ThemeMode>(readSaved());
  const isDark = computed(() => mode.value === 'dark');

  function apply(value: ThemeMode): void {
    Dark.set(value === 'dark');
    if (typeof document !== 'undefined') {
      document.querySelector('meta[name="theme-color"]')?.setAttribute('content', PAGE_COLOURS[value]);
    }
    try {
      globalThis.localStorage?.setItem(STORAGE_KEY, value);
    } catch {
      // Private browsing may refuse storage; the theme still applies for this visit.
    }
  }

  watch(mode, apply, { immediate: true });

  function setMode(value: ThemeMode): void {
    mode.value = value;
  }

  function toggle(): void {
    mode.value = isDark.value ? 'light' : 'dark';
  }

  return { mode, isDark, setMode, toggle };
});
