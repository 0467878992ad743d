/**
 * A whole loading session walked on every role's phone at 360 x 740, in the dark theme and in the
 * light one, with every screen checked at every step (e2e/support/screen-checks.ts): nothing to tap
 * covered, every tap target 48 px high, no heading, button or label cut off, no axe-core finding,
 * no page error.
 */
import { expect, test } from '@playwright/test';
import { laneUrl, type Lane } from './support/lanes';
import { expectScreenSound, watchPageErrors } from './support/screen-checks';
import { openPhone, type Person } from './fixtures/crew';

const TITLE = 'Drapes off, checked screens';

interface Phone extends Person {
  errors: string[];
}

async function phone(...args: Parameters<typeof openPhone>): Promise<Phone> {
  const person = await openPhone(...args);
  return { ...person, errors: watchPageErrors(person.page) };
}

/** Every phone's screen, checked once the step has reached it. */
async function checkAll(step: string, phones: Phone[]): Promise<void> {
  for (const p of phones) await expectScreenSound(p.page, `${step}: ${p.key}'s screen`, p.errors);
}

async function tap(p: Phone, testId: string): Promise<void> {
  const button = p.page.getByTestId(testId);
  await expect(button).toBeVisible();
  await button.click();
  await expect(button).toBeHidden();
}

/** The session appears on a home screen by itself: nobody taps anything to see it. */
async function openFromHome(p: Phone, role: 'loader' | 'deck' | 'stage-manager'): Promise<void> {
  const link = p.page.getByRole('link', { name: `Open ${TITLE}` });
  await expect.soft(link, `${p.key}'s home shows the new session by itself`).toBeVisible({ timeout: 8_000 });
  if (!(await link.isVisible())) await p.page.getByRole('button', { name: 'Refresh' }).click();
  await link.click();
  await expect(p.page).toHaveURL(/\/sessions\/\d+$/);
  await expect(p.page.getByTestId(`join-${role}`)).toBeVisible();
  await expectScreenSound(p.page, `join: ${p.key}'s screen`, p.errors);
  await p.page.getByTestId(`join-${role}`).click();
  await expect(p.page.getByTestId('join-panel')).toBeHidden();
}

/** Whoever's screen offers the next work step taps it, until none does. */
async function workSteps(phones: Phone[], everyone: Phone[], onStep: (n: number) => Promise<void>): Promise<void> {
  for (let n = 0; n < 40; n++) {
    let who: Phone | undefined;
    for (let tries = 0; tries < 20 && !who; tries++) {
      for (const p of phones) if (await p.page.getByTestId('confirm-step').isVisible()) who = p;
      if (!who) {
        if (await phones[0].page.getByTestId('call-loading-complete').isVisible()) return;
        await phones[0].page.waitForTimeout(250);
      }
    }
    if (!who) throw new Error('no phone offers the next step and loading is not complete');
    await tap(who, 'confirm-step');
    await checkAll(`after work step ${n + 1}`, everyone);
    await onStep(n + 1);
  }
}

function walk(lane: Lane, theme: 'dark' | 'light') {
  test(`a whole session on five phones, every screen sound at every step (${theme} theme)`, async ({ browser }) => {
    test.setTimeout(600_000);
    const base = laneUrl(lane);
    const rail = await phone(browser, base, 'rail', { theme });
    const loader1 = await phone(browser, base, 'loader1', { theme });
    const loader2 = await phone(browser, base, 'loader2', { theme, gated: true });
    const deck = await phone(browser, base, 'deck', { theme });
    const sm = await phone(browser, base, 'sm', { theme });
    const td = await phone(browser, base, 'td', { theme });
    const everyone = [rail, loader1, loader2, deck, sm];
    await checkAll('home screens', [...everyone, td]);

    // The menu, open, in this theme.
    await sm.page.getByRole('button', { name: 'Menu' }).click();
    await expect(sm.page.getByText('Sign out')).toBeVisible();
    await expectScreenSound(sm.page, 'menu open', sm.errors);
    // Closed by a tap beside it, as a thumb does.
    await sm.page.mouse.click(20, 400);
    await expect(sm.page.getByText('Sign out')).toBeHidden();

    // The planner: the default title says the day without a month/day order to guess.
    const r = rail.page;
    await r.getByRole('link', { name: 'Start a loading session' }).click();
    await expect(r).toHaveURL(/\/sessions\/new$/);
    const titleInput = r.getByLabel('Session title');
    await expect(titleInput).toHaveValue(/^Loading /);
    expect.soft(await titleInput.inputValue(), 'default title').not.toMatch(/\d{1,2}[/.]\d{1,2}[/.]\d{2,4}/);
    await expectScreenSound(r, 'planner, empty', rail.errors);
    await titleInput.fill(TITLE);
    // 36 sets on the demo: a search narrows the list; a picked set stays in it once the search is cleared.
    const find = r.getByLabel('Find by number, name or piece');
    await find.fill('sea-mist');
    await expect(r.getByRole('checkbox', { name: /^Line set 1,/ })).toBeHidden();
    await r.getByRole('checkbox', { name: /^Line set 7,/ }).click();
    await find.fill('');
    await expect(r.getByRole('checkbox', { name: /^Line set 1,/ })).toBeVisible();
    await expect(r.getByRole('checkbox', { name: /^Line set 7,/ })).toBeChecked();
    const plan = r.getByTestId('plan-line-set-7');
    await plan.getByRole('checkbox', { name: 'Take off Sea-mist drape A' }).click();
    await plan.getByRole('checkbox', { name: 'Take off Sea-mist drape B' }).click();
    await expect(plan.getByTestId('plan-steps').locator('li')).not.toHaveCount(0);
    await expectScreenSound(r, 'planner, a plan', rail.errors);
    // A piece to hang, begun and taken out again: its fields are checked too.
    await plan.getByRole('button', { name: 'Add a piece to hang' }).click();
    await expectScreenSound(r, 'planner, a new piece row', rail.errors);
    await plan.getByRole('button', { name: 'Remove new piece 1' }).click();
    await r.getByTestId('start-session').click();
    await expect(r).toHaveURL(/\/sessions\/\d+$/);
    // Whoever starts the session is joined as its lead at once: no join to tap.
    await expect(r.getByTestId('rail-panel')).toBeVisible();

    // The technical director's home shows the running session too, by itself.
    await td.page.goto('/admin/people');
    await expect.soft(td.page.getByRole('link', { name: `Open ${TITLE}` }), 'the technical director sees running sessions').toBeVisible({ timeout: 8_000 });
    await expectScreenSound(td.page, 'technical director home, session running', td.errors);

    await openFromHome(loader1, 'loader');
    await openFromHome(loader2, 'loader');
    await openFromHome(deck, 'deck');
    await openFromHome(sm, 'stage-manager');
    await checkAll('everyone joined', everyone);

    await r.getByRole('button', { name: 'Begin loading' }).click();
    await expect(r.getByTestId('call-move')).toBeVisible();
    await checkAll('loading begun', everyone);

    await tap(rail, 'call-move');
    for (const p of [loader1, loader2, deck]) await expect(p.page.getByTestId('call-alert')).toBeVisible();
    await checkAll('move called', everyone);
    for (const p of [loader1, loader2, deck]) {
      await tap(p, 'alert-clear');
      await checkAll(`${p.key} answered clear`, [rail, p]);
    }
    await expect(r.getByTestId('confirm-locked')).toBeVisible();
    await checkAll('every clear in', everyone);
    await tap(rail, 'confirm-locked');
    if (await r.getByTestId('confirm-tie-off').isVisible()) {
      await checkAll('tie off asked', [rail]);
      await tap(rail, 'confirm-tie-off');
    }
    await expect(loader1.page.getByTestId('call-clear-rail')).toBeVisible();
    await checkAll('in and locked', everyone);
    await tap(loader1, 'call-clear-rail');
    await expect(r.getByTestId('confirm-rail-clear')).toBeVisible();
    await checkAll('clear the rail called', everyone);
    await tap(rail, 'confirm-rail-clear');
    await expect(loader1.page.getByTestId('brick-step')).toBeVisible();
    await checkAll('rail clear', everyone);

    // A tap from a phone that is behind: refused, the refusal notice checked where it shows.
    loader2.gate!.close();
    await loader1.page.getByTestId('confirm-step').click();
    await expect(loader1.page.getByTestId('confirm-step')).toBeHidden();
    await loader2.page.getByTestId('confirm-step').click();
    await expect(loader2.page.getByText(/already done/)).toBeVisible();
    await expectScreenSound(loader2.page, 'a refusal notice', loader2.errors);
    loader2.gate!.release();
    await expect(loader2.page.getByTestId('confirm-step')).toBeHidden();
    await checkAll('after the first brick step', everyone);

    let held = false;
    await workSteps([loader1, loader2, deck], everyone, async () => {
      if (held) return;
      held = true;
      // A hold, called by the stage manager: every other screen frozen, then released.
      await sm.page.getByTestId('call-hold').click();
      for (const p of [rail, loader1, loader2, deck]) await expect(p.page.getByTestId('hold-alert')).toBeVisible();
      await checkAll('hold called', everyone);
      await tap(loader1, 'ack-hold');
      await checkAll('hold acknowledged', [loader1, rail]);
      await tap(rail, 'release-hold');
      for (const p of everyone) await expect(p.page.getByTestId('hold-alert')).toHaveCount(0);
      await checkAll('hold released', everyone);
    });

    await tap(loader1, 'call-loading-complete');
    if (await r.getByTestId('confirm-untie').isVisible()) await tap(rail, 'confirm-untie');
    await expect(r.getByTestId('record-test')).toBeVisible();
    await checkAll('loading complete', everyone);

    // A test the server refuses (beyond the rope lock, not tied off), then the corrected record.
    await r.getByLabel(/Out of balance by/).fill('100');
    await r.getByRole('button', { name: 'Pipe-heavy' }).click();
    const refusal = r.getByTestId('notice').filter({ hasText: /more out of balance than the rope lock holds/ });
    await expect(refusal).toBeVisible();
    await expectScreenSound(r, 'rail, test refused', rail.errors);
    await r.getByLabel(/Out of balance by/).fill('');
    await r.getByRole('button', { name: 'Tested: balanced' }).click();
    for (const p of everyone) await expect(p.page.getByTestId('session-finished')).toBeVisible();
    await expect.soft(refusal, 'the old refusal clears once the corrected record is taken').toBeHidden();
    await expect.soft(r.getByTestId('notice').filter({ hasText: 'Test recorded: balanced.' }), 'the rail sees the record was taken').toBeVisible();
    await checkAll('session finished', everyone);

    // The stage manager's log at phone width: every entry's sentence on screen, newest first.
    const rows = sm.page.getByTestId('log-row');
    const viewportWidth = sm.page.viewportSize()!.width;
    for (const box of await rows.evaluateAll((els) => els.map((el) => el.getBoundingClientRect().toJSON() as DOMRect))) {
      expect.soft(box.right, 'a log entry fits the phone').toBeLessThanOrEqual(viewportWidth);
    }
    const seqs = await rows.evaluateAll((els) => els.map((el) => Number(el.getAttribute('data-seq'))));
    expect(seqs).toEqual([...seqs].sort((a, b) => b - a));
    await expect(sm.page.getByTestId('session-log')).toContainText('called a hold');

    for (const p of [...everyone, td]) {
      expect(p.errors, `${p.key}: page errors`).toEqual([]);
      await p.context.close();
    }
  });
}

test.describe('every screen at 360 px, dark theme', () => {
  test.use({ baseURL: laneUrl('screens-dark') });
  walk('screens-dark', 'dark');
});

test.describe('every screen at 360 px, light theme', () => {
  test.use({ baseURL: laneUrl('screens-light') });
  walk('screens-light', 'light');
});

