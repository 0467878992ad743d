import { defineStore } from 'pinia';
import { ref } from 'vue';

export type NoticeKind = 'negative' | 'positive' | 'info' | 'warning';

export interface Notice {
  id: number;
  kind: NoticeKind;
  message: string;
  /** Groups notices that a later event clears together, e.g. a session's refusals once a tap is taken. */
  tag: string | null;
}

/** How long each kind stays unless dismissed; refusals stay until dismissed or answered. */
const TIMEOUT_MS: Record<NoticeKind, number | null> = { negative: null, warning: 10_000, info: 5_000, positive: 4_000 };
/** More at once would push the screen down too far: the oldest go first. */
const MAX_SHOWN = 3;

/**
 * The notices a person reads: shown in the page's flow under the header (components/NoticeStack),
 * never floating over a control, and inside a full-screen alert while one is up.
 */
export const useNoticesStore = defineStore('notices', () => {
  const notices = ref<Notice[]>([]);
  /** Full-screen alerts open now: while any is, notices show inside it. */
  const overlays = ref(0);
  let nextId = 1;
  const timers = new Map<number, ReturnType<typeof setTimeout>>();

  function dismiss(id: number): void {
    const timer = timers.get(id);
    if (timer) clearTimeout(timer);
    timers.delete(id);
    notices.value = notices.value.filter((n) => n.id !== id);
  }

  function push(kind: NoticeKind, message: string, opts: { tag?: string; timeoutMs?: number | null } = {}): number {
    // The same words again replace the old notice instead of stacking a copy.
    for (const old of notices.value.filter((n) => n.message === message)) dismiss(old.id);
    const notice: Notice = { id: nextId++, kind, message, tag: opts.tag ?? null };
    notices.value = [notice, ...notices.value];
    for (const old of notices.value.slice(MAX_SHOWN)) dismiss(old.id);
    const timeout = opts.timeoutMs === undefined ? TIMEOUT_MS[kind] : opts.timeoutMs;
    if (timeout !== null) timers.set(notice.id, setTimeout(() => dismiss(notice.id), timeout));
    return notice.id;
  }

  function clearTag(tag: string): void {
    for (const n of notices.value.filter((x) => x.tag === tag)) dismiss(n.id);
  }

  function clearAll(): void {
    for (const n of [...notices.value]) dismiss(n.id);
  }

  function overlayOpened(): void {
    overlays.value += 1;
  }

  function overlayClosed(): void {
    overlays.value = Math.max(0, overlays.value - 1);
  }

  return { notices, overlays, push, dismiss, clearTag, clearAll, overlayOpened, overlayClosed };
});
