/**
 * Checks of one phone screen as a crew member meets it at 360 px with gloves in the dark: nothing
 * they can tap is covered by another element, every tap target is a thumb high, no heading, button
 * or label is cut off, axe-core finds no contrast failure, and the page threw no error.
 */
import { expect, type Page } from '@playwright/test';
import { seriousViolations } from '../fixtures/crew';

/** WCAG 2.5.5 (target size, enhanced) asks 44 CSS px; Railcall keeps 48 for gloved hands (common practice). */
export const MIN_TARGET_PX = 48;

/** The elements a finger can act on. */
const INTERACTIVE = [
  'button', 'a[href]', 'input:not([type="hidden"])', 'select', 'textarea',
  '[role="button"]', '[role="checkbox"]', '[role="switch"]', '[role="combobox"]', '[role="radio"]', '[role="tab"]', '[role="link"]',
].join(',');

/** Texts a reader must see whole. */
const MUST_FIT = 'h1, h2, h3, .q-btn__content, .q-field__label, .q-toolbar__title, .q-checkbox__label, .q-toggle__label, th, dt, dd, label';

export interface ScreenProblem {
  kind: 'covered' | 'small' | 'cut-off' | 'contrast' | 'page-error';
  detail: string;
}

/** Page errors of a phone, collected from the moment it is watched. */
export function watchPageErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('pageerror', (error) => errors.push(error.message));
  return errors;
}

/**
 * Everything on the screen now that breaks the rules above. Every interactive element is brought
 * into view the way the browser itself does it for focus (`block: 'nearest'`: the least scroll
 * that shows it) and its centre hit-tested with `elementFromPoint`; then the scroll goes back.
 */
export async function layoutProblems(page: Page): Promise<ScreenProblem[]> {
  // Let transitions settle: a half-open dialog is not what the person sees.
  await page.waitForFunction(() => document.getAnimations().every((a) => a.playState !== 'running'));
  return page.evaluate(
    ({ interactive, mustFit, minPx }) => {
      const problems: { kind: 'covered' | 'small' | 'cut-off'; detail: string }[] = [];
      const describe = (el: Element) => {
        const name = el.getAttribute('aria-label') || (el as HTMLElement).innerText?.trim().replace(/\s+/g, ' ').slice(0, 50) || el.getAttribute('placeholder') || '';
        const id = el.closest('[data-testid]')?.getAttribute('data-testid');
        return `<${el.tagName.toLowerCase()}${el.getAttribute('role') ? ` role=${el.getAttribute('role')}` : ''}> "${name}"${id ? ` in [${id}]` : ''}`;
      };
      /** Shown and reachable: not hidden, not inert behind a dialog, not in a closed drawer. */
      const reachable = (el: Element) => {
        if (el.closest('[inert], [aria-hidden="true"], .q-layout--prevent-focus')) return false;
        const style = getComputedStyle(el);
        if (style.visibility === 'hidden' || style.display === 'none') return false;
        const box = el.getBoundingClientRect();
        return box.width > 0 && box.height > 0 && (el as HTMLElement).offsetParent !== null || style.position === 'fixed';
      };
      /** What a finger actually touches: a Quasar field's whole control, else the element. */
      const target = (el: Element): Element => el.closest('.q-field__control') ?? el.closest('.q-checkbox, .q-toggle, .q-radio') ?? el;
      // Quasar's off-screen focus helpers (opacity 0, a pixel wide) are not tap targets.
      const helper = (el: Element) => el.matches('.q-select__focus-target, .q-field__native[readonly][tabindex="-1"], input[aria-hidden="true"]');

      const scrolled: Array<[Element | Window, number]> = [[window, window.scrollY]];
      document.querySelectorAll('*').forEach((el) => {
        if (el.scrollTop > 0) scrolled.push([el, el.scrollTop]);
      });

      const seen = new Set<Element>();
      for (const el of document.querySelectorAll(interactive)) {
        if (!reachable(el) || helper(el)) continue;
        const tap = target(el);
        if (seen.has(tap)) continue;
        seen.add(tap);
        const box0 = tap.getBoundingClientRect();
        if (box0.height < minPx - 0.5) problems.push({ kind: 'small', detail: `${describe(el)} is ${box0.height.toFixed(0)} px high` });
        tap.scrollIntoView({ block: 'nearest', inline: 'nearest' });
        const box = tap.getBoundingClientRect();
        const x = Math.min(Math.max(box.left + box.width / 2, 0), window.innerWidth - 1);
        const y = Math.min(Math.max(box.top + box.height / 2, 0), window.innerHeight - 1);
        const hit = document.elementFromPoint(x, y);
        const ok = hit && (tap.contains(hit) || hit.contains(tap) && getComputedStyle(tap).pointerEvents === 'none' || hit.closest('label')?.contains(tap));
        if (!ok) {
          const by = hit ? describe(hit.closest('[data-testid]') ?? hit) : 'nothing (off screen)';
          problems.push({ kind: 'covered', detail: `${describe(el)} is covered by ${by}` });
        }
      }
      for (const [where, top] of scrolled) {
        if (where === window) window.scrollTo(window.scrollX, top);
        else (where as Element).scrollTop = top;
      }

      for (const el of document.querySelectorAll(mustFit)) {
        if (!reachable(el) && !el.closest('.q-field')) continue;
        if (el.closest('[inert], [aria-hidden="true"], .q-layout--prevent-focus')) continue;
        const html = el as HTMLElement;
        if (html.scrollWidth > html.clientWidth + 1) {
          problems.push({ kind: 'cut-off', detail: `${describe(el)} needs ${html.scrollWidth} px, has ${html.clientWidth}` });
        }
      }
      // The page itself must not be wider than the phone.
      if (document.documentElement.scrollWidth > window.innerWidth + 1) {
        problems.push({ kind: 'cut-off', detail: `the page is ${document.documentElement.scrollWidth} px wide on a ${window.innerWidth} px screen` });
      }
      return problems;
    },
    { interactive: INTERACTIVE, mustFit: MUST_FIT, minPx: MIN_TARGET_PX },
  );
}

/** Every problem of the screen now: layout, axe-core's serious findings (contrast among them) and page errors. */
export async function screenProblems(page: Page, pageErrors: string[] = []): Promise<ScreenProblem[]> {
  const problems = await layoutProblems(page);
  for (const v of await seriousViolations(page)) problems.push({ kind: 'contrast', detail: v });
  for (const e of pageErrors.splice(0)) problems.push({ kind: 'page-error', detail: e });
  return problems;
}

/** Fails the test, naming the screen and each problem, when the screen breaks any rule. */
export async function expectScreenSound(page: Page, screen: string, pageErrors: string[] = []): Promise<void> {
  const problems = await screenProblems(page, pageErrors);
  expect.soft(problems.map((p) => `${p.kind}: ${p.detail}`), screen).toEqual([]);
}
