import { expect, test } from '@playwright/test';
import { laneUrl } from './support/lanes';
import { openPhone } from './fixtures/crew';

test.use({ baseURL: laneUrl('schedule') });
const base = laneUrl('schedule');

for (const viewport of [{ width: 360, height: 740 }, { width: 1280, height: 800 }]) {
  test(`the technical director hangs a piece on a spare pipe, sees its balance change (${viewport.width} px)`, async ({ browser }) => {
    test.setTimeout(120_000);
    const td = await openPhone(browser, base, 'td');
    const { page } = td;
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await page.setViewportSize(viewport);
    await page.goto('/schedule');
    const wide = viewport.width > 800;
    // A set of the demo venue (a different one per run).
    const number = wide ? 34 : 33;
    const opener = wide ? page.getByRole('button', { name: `Open line set ${number}` }) : page.getByTestId(`line-set-item-${number}`);
    await expect(opener).toBeVisible();
    await opener.click();
    const balance = page.getByTestId('line-set-balance');
    await expect(balance).toBeVisible();
    const before = await balance.innerText();

    await page.getByTestId('hang-piece').click();
    await page.getByLabel('Piece name').fill(`Practice flat ${viewport.width}`);
    await page.getByLabel(/^Weight \(lb\)/).fill('120');
    await page.getByRole('button', { name: 'Save piece' }).click();
    await expect(page.getByRole('list', { name: 'Pieces' }).getByText(`Practice flat ${viewport.width}`)).toBeVisible();
    // Hung without bricks to match, the set is now out of balance, and the form says so.
    await expect.poll(() => balance.innerText()).not.toBe(before);

    expect(errors).toEqual([]);
  });
}
