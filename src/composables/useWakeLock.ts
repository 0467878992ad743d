import { onBeforeUnmount, onMounted, watch, type Ref } from 'vue';

/**
 * Keeps the screen awake while `active` is true (Screen Wake Lock API, where the browser has it).
 * The browser drops the lock when the page is hidden, so it is taken again on return.
 * https://developer.mozilla.org/en-US/docs/Web/API/Screen_Wake_Lock_API
 */
export function useWakeLock(active: Ref<boolean>) {
  let sentinel: WakeLockSentinel | null = null;

  async function take(): Promise<void> {
    if (!active.value || sentinel || typeof navigator === 'undefined' || !('wakeLock' in navigator)) return;
    if (document.visibilityState !== 'visible') return;
    try {
      sentinel = await navigator.wakeLock.request('screen');
      sentinel.addEventListener('release', () => {
        sentinel = null;
      });
    } catch {
      // Refused (battery saver, no permission): the session works on, the screen may dim.
      sentinel = null;
    }
  }

  function drop(): void {
    void sentinel?.release().catch(() => undefined);
    sentinel = null;
  }

  const onVisible = () => {
    if (document.visibilityState === 'visible') void take();
  };

  onMounted(() => {
    document.addEventListener('visibilitychange', onVisible);
    void take();
  });
  watch(active, (on) => (on ? void take() : drop()));
  onBeforeUnmount(() => {
    document.removeEventListener('visibilitychange', onVisible);
    drop();
  });
}
