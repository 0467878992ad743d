import { expect, test } from '@playwright/test';
import { laneUrl } from './support/lanes';
import { openPhone } from './fixtures/crew';
import { expectScreenSound, watchPageErrors } from './support/screen-checks';

const base = laneUrl('planner-slack');

test('a piece that makes a lift line go slack plans with a warning and what each line carries; the schedule shows the shares too', async ({ browser }) => {
  test.setTimeout(120_000);
  const rail = await openPhone(browser, base, 'rail');
  const { page } = rail;
  const errors = watchPageErrors(page);
  await page.getByRole('link', { name: 'Start a loading session' }).click();
  await expect(page).toHaveURL(/\/sessions\/new$/);
  await page.getByRole('checkbox', { name: /^Line set 19,/ }).click();
  const plan = page.getByTestId('plan-line-set-19');
  await plan.getByRole('button', { name: 'Add a piece to hang' }).click();
  const piece = plan.getByTestId('new-piece-1');
  await piece.getByTestId('new-piece-name').fill('Boat bow');
  await piece.getByTestId('new-piece-weight').fill('300');
  // A decimal comma is read as a decimal point.
  await piece.getByTestId('new-piece-position').fill('5,0');

  // 300 lb at 5 ft on the 40 ft spare pipe: line 3 goes slack. A warning, not a refusal.
  await expect(plan.getByTestId('plan-warnings')).toContainText(/Lift line 3 \(at 20' 0"\) goes slack/);
  await expect(plan.getByTestId('plan-warnings')).not.toContainText('Cannot run');
  const shares = plan.getByTestId('lift-line-shares');
  await expect(shares.locator('li')).toHaveCount(5);
  await expect(shares.locator('li[data-slack="true"]')).toHaveCount(1);
  await expect(shares.locator('li').nth(2)).toContainText('Line 3 (at 20\' 0"): slack, carries nothing');
  await expect(shares.locator('li').nth(0)).toContainText(/Line 1 \(at 2' 0"\): [\d.]+ lb of 500 lb rated/);
  await expectScreenSound(page, 'planner with a slack lift line', errors);
  // Every label of the balance picture shows at least 14 px high on the phone.
  const picture = plan.getByTestId('balance-picture').locator('svg');
  await expect(picture).toBeVisible();
  const sizes = await picture.evaluate((svg: SVGSVGElement) => {
    const scale = svg.getScreenCTM()!.a;
    return [...svg.querySelectorAll('text')].map((t) => parseFloat(getComputedStyle(t).fontSize) * scale);
  });
  expect(sizes.length).toBeGreaterThan(3);
  for (const px of sizes) expect(px).toBeGreaterThanOrEqual(14);
  await expect(plan.getByTestId('piece-names')).toContainText('Boat bow');
  await expect(page.getByTestId('start-session')).toBeEnabled();
  await page.getByTestId('start-session').click();
  await expect(page).toHaveURL(/\/sessions\/\d+$/);

  // The schedule's line set form shows the same shares for what hangs now.
  const td = await openPhone(browser, base, 'td');
  await td.page.goto('/schedule');
  await td.page.getByTestId('line-set-item-9').click();
  const tdShares = td.page.getByTestId('line-set-balance').getByTestId('lift-line-shares');
  await expect(tdShares.locator('li')).toHaveCount(5);
  await expect(tdShares.locator('li[data-slack="true"]')).toHaveCount(0);
  await td.page.goto('/schedule');

  // A weight typed with a decimal comma is saved as that number.
  await td.page.getByTestId('line-set-item-35').click();
  await td.page.getByTestId('hang-piece').click();
  await td.page.getByLabel('Piece name').fill('Buoy');
  await td.page.getByLabel(/^Weight \(lb\)/).fill('40,5');
  await td.page.getByRole('button', { name: 'Save piece' }).click();
  await expect(td.page.getByRole('list', { name: 'Pieces' }).getByText('Buoy · 40.5 lb')).toBeVisible();
  expect(errors).toEqual([]);
});
