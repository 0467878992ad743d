import { readFileSync } from 'node:fs';
import { expect, test, type Browser, type Page } from '@playwright/test';
import { stringify } from 'csv-stringify/sync';
import sharp from 'sharp';
import { csvHeaders } from '../shared/protocol/schedule-csv';
import { firstRunLog, laneUrl, type FirstRunLane } from './support/lanes';
import { PHONE } from './fixtures/crew';

// The first day of a new install: the real server process on an empty database without the demo
// (e2e/support/serve.ts). Everything below is done through the screens, on a phone and on a laptop
// (one install each: setup works once).
const SIZES: Array<{ lane: FirstRunLane; viewport: { width: number; height: number } }> = [
  { lane: 'first-run', viewport: { width: 360, height: 740 } },
  { lane: 'first-run-wide', viewport: { width: 1280, height: 800 } },
];

const DIRECTOR = { name: 'Robin Ashgrove', email: 'robin@ashgrove-rep.example', password: 'first-night-call' };
const RAIL = { name: 'Sam Tallow', email: 'sam@ashgrove-rep.example', password: 'rope-lock-on-please' };

/** The setup code the server printed in its console at start (server/index.ts). */
async function setupCodeFromConsole(lane: FirstRunLane): Promise<string> {
  let code = '';
  await expect.poll(() => {
    code = /setup code ([A-Z2-9]{4}-[A-Z2-9]{4}-[A-Z2-9]{4})/.exec(readFileSync(firstRunLog(lane), 'utf8'))?.[1] ?? '';
    return code;
  }, { message: `a setup code in ${firstRunLog(lane)}` }).not.toBe('');
  return code;
}

/** Ten line sets and one piece on each, as a venue would type them into a spreadsheet. */
function tenLineSetsCsv(): string {
  const empty = Object.fromEntries(csvHeaders('imperial').map((h) => [h, '']));
  const rows: Record<string, string>[] = [];
  for (let n = 2; n <= 11; n++) {
    rows.push({
      ...empty, row: 'line set', line_set: String(n), name: `Border ${n}`, distance_from_plaster_line_ft: String(n * 1.5), purchase: '1',
      pipe: '1-1/2 in Schedule 40', pipe_weight_lb_per_ft: '2.72', batten_length_ft: '40', lift_lines_ft: '2;11;20;29;38',
      batten_rating_lb_per_ft: '25', lift_line_rating_lb: '500', arbor_empty_lb: '90', arbor_capacity_lb: '1200', high_trim_ft: '32', low_trim_ft: '4',
    });
    rows.push({ ...empty, row: 'piece', line_set: String(n), name: `Black border ${n}`, weight_lb: '38', spread_from_ft: '2', spread_to_ft: '38', department: 'Soft goods' });
  }
  return stringify(rows, { header: true, columns: csvHeaders('imperial') });
}

async function newDevice(browser: Browser, baseURL: string, viewport: { width: number }, who: string): Promise<{ page: Page; errors: string[] }> {
  const context = await browser.newContext(viewport.width > 800 ? { viewport: { width: 1280, height: 800 }, baseURL } : { ...PHONE, baseURL });
  const page = await context.newPage();
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(`[${who}] ${e.message}`));
  return { page, errors };
}

for (const { lane, viewport } of SIZES) test(`from a first run, the director sets up the venue and its schedule, a rail operator plans a session on a new set, and the director opens a second venue (${viewport.width} px)`, async ({ browser }) => {
  test.setTimeout(180_000);
  const base = laneUrl(lane);
  const wide = viewport.width > 800;
  const director = await newDevice(browser, base, viewport, 'director');
  const page = director.page;
  // The schedule is a table on a laptop and a list on a phone.
  const lineSets = () => page.locator(wide ? '[data-testid^="line-set-row-"]' : '[data-testid^="line-set-item-"]');

  // 1. Setup: the install sends everyone to it, and it needs the printed code.
  await page.goto('/');
  await expect(page).toHaveURL(/\/setup$/);
  await page.getByLabel('Setup code').fill(await setupCodeFromConsole(lane));
  await page.getByLabel('Venue name').fill('Ashgrove Repertory');
  await page.getByLabel('Your name').fill(DIRECTOR.name);
  await page.getByLabel('Your e-mail').fill(DIRECTOR.email);
  await page.getByLabel('Your password').fill(DIRECTOR.password);
  await page.getByRole('button', { name: 'Create the venue' }).click();
  await expect(page).not.toHaveURL(/\/setup$/);
  // Gone once used.
  expect((await page.request.get('/api/setup')).ok() && (await (await page.request.get('/api/setup')).json()).needed).toBe(false);

  // 2. One line set by the form.
  await page.goto('/schedule');
  await page.getByTestId('add-line-set').click();
  const dialog = page.getByRole('dialog');
  await dialog.getByLabel('Number').fill('1');
  await dialog.getByLabel('Name or use').fill('Main curtain');
  await dialog.getByLabel('Batten length (ft)').fill('40');
  await dialog.getByLabel('Lift lines (ft, separated by ;)').fill('2; 11; 20; 29; 38');
  await dialog.getByLabel('Batten rating (lb/ft)').fill('25');
  await dialog.getByLabel('Lift line rating (lb)').fill('500');
  await dialog.getByLabel('Arbor empty (lb)').fill('90');
  await dialog.getByLabel('Arbor capacity (lb)').fill('1200');
  await dialog.getByRole('button', { name: 'Add line set' }).click();
  await expect(page.getByText('Line set 1 saved.')).toBeVisible();

  // 3. A piece on it: the balance and the warnings change as it is hung.
  const balance = dialog.getByTestId('line-set-balance');
  await expect(balance).toBeVisible();
  const before = await balance.innerText();
  await dialog.getByTestId('hang-piece').click();
  await expect(dialog.getByText('No capacity warnings.')).toBeVisible();
  // A heavy point load right at a lift line: more than that line's 500 lb rating.
  await dialog.getByLabel('Piece name').fill('Shell ceiling');
  await dialog.getByLabel('Weight (lb)').fill('640');
  await dialog.getByText('At a point', { exact: true }).click();
  await dialog.getByLabel('At (ft from stage-left end)').fill('11');
  await dialog.getByRole('button', { name: 'Save piece' }).click();
  await expect(dialog.getByRole('list', { name: 'Pieces' }).getByText('Shell ceiling')).toBeVisible();
  await expect.poll(() => balance.innerText()).not.toBe(before);
  await expect(balance).toContainText('pipe-heavy');
  await expect(dialog.getByTestId('line-set-warnings')).toBeVisible();

  // 4. A photo of the hang. QFile puts its attributes (the test id too) on its native file input.
  const png = await sharp({ create: { width: 96, height: 64, channels: 3, background: '#3a4a5c' } }).png().toBuffer();
  await dialog.getByTestId('photo-file').setInputFiles({ name: 'main-curtain.png', mimeType: 'image/png', buffer: png });
  await dialog.getByRole('button', { name: 'Upload the photo' }).click();
  await expect(dialog.getByRole('button', { name: /^Open photo:/ })).toHaveCount(1);
  await dialog.getByRole('button', { name: 'Close' }).first().click();

  // 5. Ten more by CSV: previewed, then confirmed.
  await page.getByTestId('import-csv').click();
  const csvDialog = page.getByRole('dialog').filter({ hasText: 'Import a schedule CSV' });
  await csvDialog.getByTestId('csv-file').setInputFiles({ name: 'ashgrove.csv', mimeType: 'text/csv', buffer: Buffer.from(tenLineSetsCsv()) });
  await expect(csvDialog.getByTestId('csv-preview')).toContainText('10 line sets to add');
  await csvDialog.getByTestId('csv-confirm').click();
  await expect(page.getByTestId(wide ? 'line-set-row-11' : 'line-set-item-11')).toBeVisible();
  await expect(lineSets()).toHaveCount(11);

  // 6. A rail operator, invited from People.
  await page.goto('/admin/people');
  await page.getByRole('button', { name: 'Add a person' }).click();
  const add = page.getByRole('dialog');
  await add.getByLabel('Name').fill(RAIL.name);
  await add.getByLabel('E-mail').fill(RAIL.email);
  await add.getByText('Rail operator', { exact: true }).click();
  await add.getByRole('button', { name: 'Add to the crew' }).click();
  const invite = page.getByRole('dialog').filter({ hasText: `Invitation for ${RAIL.name}` });
  const link = await invite.getByTestId('invite-link').inputValue();
  expect(link).toMatch(/\/welcome\/.+/);
  await invite.getByRole('button', { name: 'Close' }).click();

  // 7. The rail operator takes the invitation and plans a session on a set that came from the CSV.
  const rail = await newDevice(browser, base, viewport, 'rail');
  await rail.page.goto(link);
  await rail.page.getByLabel('New password').fill(RAIL.password);
  await rail.page.getByLabel('The same password again').fill(RAIL.password);
  await rail.page.getByRole('button', { name: 'Set password and sign in' }).click();
  await expect(rail.page.getByTestId('role-home-summary')).toHaveText(/Rail operator at Ashgrove Repertory/);
  await rail.page.getByRole('link', { name: 'Start a loading session' }).click();
  await expect(rail.page).toHaveURL(/\/sessions\/new$/);
  await rail.page.getByLabel('Session title').fill('Border 5 re-hang');
  await rail.page.getByRole('checkbox', { name: /^Line set 5,/ }).click();
  const plan = rail.page.getByTestId('plan-line-set-5');
  await plan.getByRole('checkbox', { name: 'Take off Black border 5' }).click();
  await expect(plan.getByTestId('plan-steps').locator('li')).not.toHaveCount(0);
  await expect(rail.page.getByTestId('start-session')).toBeEnabled();
  await rail.page.getByTestId('start-session').click();
  await expect(rail.page).toHaveURL(/\/sessions\/\d+$/);
  await expect(rail.page.getByText('Border 5 re-hang').first()).toBeVisible();

  // 8. The director opens a second theatre from the menu, works there, and switches back.
  await page.getByRole('button', { name: 'Menu' }).click();
  await page.getByTestId('menu-open-venue').click();
  const opening = page.getByRole('dialog').filter({ hasText: 'Open another venue' });
  await opening.getByLabel('Venue name').fill('Ashgrove Studio');
  await opening.getByRole('button', { name: 'Open the venue' }).click();
  await expect(page.getByText('Now working at Ashgrove Studio.')).toBeVisible();
  await page.goto('/schedule');
  await expect(page.getByText('Line set schedule').first()).toBeVisible();
  await expect(page.getByText(/^Ashgrove Studio · lengths in/)).toBeVisible();
  await expect(lineSets()).toHaveCount(0);
  await page.getByRole('button', { name: 'Menu' }).click();
  const menu = page.getByRole('navigation', { name: 'Menu' });
  await menu.getByText('Ashgrove Repertory', { exact: true }).click();
  await expect(page.getByText('Now working at Ashgrove Repertory.')).toBeVisible();
  await page.goto('/schedule');
  await expect(lineSets()).toHaveCount(11);

  expect([...director.errors, ...rail.errors]).toEqual([]);
});
