import { onBeforeUnmount, watch, type Ref } from 'vue';
import { useNoticesStore } from '@/stores/notices';

/**
 * While `active`, everything on the page but `el` (and what lies inside it) is inert: a full-screen
 * alert covers the screen, so nothing under it may take a tap, a focus or a screen reader's reading.
 * Done the way modal dialogs do it: every sibling of `el` and of each of its ancestors gets `inert`.
 * The notices then show inside the alert (NoticeStack in-alert copy).
 */
export function useInertOthers(el: Ref<HTMLElement | null>, active: Ref<boolean>): void {
  const notices = useNoticesStore();
  let made: Element[] = [];
  let covering = false;

  function release(): void {
    for (const other of made) other.removeAttribute('inert');
    made = [];
    if (covering) notices.overlayClosed();
    covering = false;
  }

  function cover(target: HTMLElement): void {
    release();
    for (let node: HTMLElement | null = target; node && node !== document.body; node = node.parentElement) {
      for (const sibling of node.parentElement?.children ?? []) {
        if (sibling === node || sibling.hasAttribute('inert') || sibling.tagName === 'SCRIPT') continue;
        sibling.setAttribute('inert', '');
        made.push(sibling);
      }
    }
    covering = true;
    notices.overlayOpened();
  }

  watch(
    [el, active],
    ([target, on]) => {
      if (on && target) cover(target);
      else release();
    },
    { flush: 'post', immediate: true },
  );
  onBeforeUnmount(release);
}
