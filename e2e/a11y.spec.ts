import { expect, test } from '@playwright/test';
import { laneUrl } from './support/lanes';
import { joinFromHome, openPhone, seriousViolations, startTwoDrapeUnload } from './fixtures/crew';

test.use({ baseURL: laneUrl('a11y') });

const TITLE = 'Accessibility scan';

test('every role screen passes an axe-core scan with no serious violations, dark and light', async ({ browser }) => {
  test.setTimeout(150_000);
  const base = laneUrl('a11y');
  const rail = await openPhone(browser, base, 'rail');
  await rail.page.getByRole('link', { name: 'Start a loading session' }).click();
  await rail.page.getByRole('checkbox', { name: /^Line set 7,/ }).click();
  await rail.page.getByRole('checkbox', { name: 'Take off Sea-mist drape A' }).click();
  await expect(rail.page.getByTestId('plan-steps')).toBeVisible();
  expect(await seriousViolations(rail.page), 'planner').toEqual([]);
  await rail.page.goto('/rail');

  await startTwoDrapeUnload(rail, TITLE);
  // Whoever starts the session is joined as its lead at once.
  await expect(rail.page.getByTestId('rail-panel')).toBeVisible();
  const loader = await openPhone(browser, base, 'loader1');
  const loader2 = await openPhone(browser, base, 'loader2');
  const deck = await openPhone(browser, base, 'deck');
  const sm = await openPhone(browser, base, 'sm');
  await loader.page.getByRole('link', { name: `Open ${TITLE}` }).click();
  expect(await seriousViolations(loader.page), 'join').toEqual([]);
  await loader.page.getByTestId('join-loader').click();
  await joinFromHome(loader2, TITLE, 'loader');
  await joinFromHome(deck, TITLE, 'deck');
  await joinFromHome(sm, TITLE, 'stage-manager');
  await rail.page.getByRole('button', { name: 'Begin loading' }).click();
  await rail.page.getByTestId('call-move').click();
  await expect(deck.page.getByTestId('call-alert')).toBeVisible();

  for (const [name, person] of [['rail', rail], ['loader', loader], ['deck (call alert)', deck], ['stage manager', sm]] as const) {
    expect(await seriousViolations(person.page), `${name}, dark`).toEqual([]);
    await person.page.evaluate(() => localStorage.setItem('railcall:theme', 'light'));
    await person.page.reload();
    await expect(person.page.locator('body')).toHaveClass(/body--light/);
    await expect(person.page.getByTestId('balance-picture')).toBeVisible();
    expect(await seriousViolations(person.page), `${name}, light`).toEqual([]);
  }

  // The hold alert, on a phone other than the caller's.
  await sm.page.getByTestId('call-hold').click();
  await expect(loader.page.getByTestId('hold-alert')).toBeVisible();
  expect(await seriousViolations(loader.page), 'hold alert').toEqual([]);

  for (const p of [rail, loader, loader2, deck, sm]) await p.context.close();
});
