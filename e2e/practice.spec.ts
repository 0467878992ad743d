import { expect, test, type Locator, type Page } from '@playwright/test';
import { laneUrl } from './support/lanes';
import { openPhone } from './fixtures/crew';

test.use({ baseURL: laneUrl('practice') });

/** The rail operator's next tap on the practice screen: whichever of the screen's own buttons shows. */
function railButtons(page: Page): Locator[] {
  return [
    page.getByTestId('release-hold'),
    page.getByTestId('ack-hold'),
    page.getByRole('button', { name: 'Begin loading' }),
    page.getByTestId('call-move'),
    page.getByTestId('confirm-locked'),
    page.getByTestId('confirm-tie-off'),
    page.getByTestId('confirm-rail-clear'),
    page.getByTestId('confirm-untie'),
    page.getByRole('button', { name: 'Tested: balanced' }),
  ];
}

test('a practice at the rail on line set 7, run to the end with the simulated crew, then its debrief and the training record', async ({ browser }) => {
  test.setTimeout(180_000);
  const base = laneUrl('practice');
  const rail = await openPhone(browser, base, 'rail');
  const { page } = rail;
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));

  await page.goto('/practice');
  await page.getByRole('radio', { name: 'Rail operator' }).click();
  await page.getByRole('radio', { name: 'A line set of this venue' }).click();
  await page.getByTestId('practice-line-set').click();
  await page.getByRole('option', { name: /^Line set 7 / }).click();
  await page.getByRole('radio', { name: 'Take off everything on it' }).click();
  await page.getByRole('radio', { name: 'Quick run-through' }).click();
  await page.getByTestId('practice-start').click();
  await expect(page.getByTestId('practice-banner')).toContainText('PRACTICE');
  await expect(page.getByTestId('practice-banner')).toContainText('Line set 7');
  await page.screenshot({ path: test.info().outputPath('practice-running.png') });

  // Play the rail operator's part until the debrief shows: the simulated crew answers on its own.
  const deadline = Date.now() + 150_000;
  while (!(await page.getByTestId('practice-debrief').isVisible())) {
    expect(Date.now(), 'the practice should finish').toBeLessThan(deadline);
    for (const button of railButtons(page)) {
      if (await button.isVisible() && await button.isEnabled()) {
        await button.click();
        break;
      }
    }
    await page.waitForTimeout(250);
  }

  const debrief = page.getByTestId('practice-debrief');
  await debrief.scrollIntoViewIfNeeded();
  await page.screenshot({ path: test.info().outputPath('practice-debrief.png'), fullPage: true });
  await expect(page.getByTestId('debrief-outcome')).toContainText('Finished');
  await expect(page.getByTestId('debrief-out-of-balance')).toHaveText(/\d+ s|\d+ min/);
  // Two loaders and the deck hand answered the one move call.
  await expect(debrief.getByTestId('debrief-answers').locator('li')).toHaveCount(3);
  // Every line of the practice log says it is practice.
  const lines = await page.getByTestId('practice-log').locator('li').allInnerTexts();
  expect(lines.length).toBeGreaterThan(10);
  for (const line of lines) expect(line).toMatch(/^\+\d+ s Practice: /);

  // The real venue saw nothing: no session is running and the practice is not in any real log.
  const sessions = await page.request.get('/api/sessions?active=1');
  expect((await sessions.json()).sessions).toEqual([]);

  // The technical director's training record lists it.
  const td = await openPhone(browser, base, 'td');
  await td.page.goto('/admin/training');
  const jo = td.page.getByTestId('training-person').filter({ hasText: 'Jo Castellan' });
  await expect(jo).toContainText('Rail operator');
  await expect(jo).toContainText('finished');
  await jo.getByRole('link').first().click();
  await expect(td.page.getByTestId('practice-debrief')).toBeVisible();
  expect(errors).toEqual([]);
});
