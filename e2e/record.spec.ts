import { readFileSync } from 'node:fs';
import { expect, test } from '@playwright/test';
import { laneUrl } from './support/lanes';
import { openPhone, seriousViolations } from './fixtures/crew';

test.use({ baseURL: laneUrl('record') });

test("the stage manager opens yesterday's session from the history, scrubs the replay and downloads the PDF", async ({ browser }) => {
  test.setTimeout(120_000);
  const sm = await openPhone(browser, laneUrl('record'), 'sm');
  const { page } = sm;
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(e.message));

  // From the home screen to the history: yesterday's drape strike is listed, balanced, led by Jo.
  await page.getByTestId('home-record').click();
  await expect(page).toHaveURL(/\/record$/);
  const row = page.getByTestId('history-row').filter({ hasText: 'Strike the sea-mist drapes' });
  await expect(row).toContainText('led by Jo Castellan');
  await expect(row).toContainText('Every line set balanced');
  const yesterday = new Date(Date.now() - 86_400_000).toLocaleDateString('en-GB', { day: 'numeric', month: 'short', year: 'numeric' });
  await expect(row).toContainText(yesterday);

  // A backwards date range is a field error, and nothing is listed from it.
  const today = new Date().toISOString().slice(0, 10);
  await page.getByRole('textbox', { name: 'From' }).fill(today);
  await page.getByRole('textbox', { name: 'To' }).fill('2020-01-01');
  await expect(page.getByText('The end date is before the start date')).toBeVisible();
  await page.getByRole('textbox', { name: 'To' }).fill(today);
  await expect(page.getByTestId('history-empty')).toBeVisible();
  await page.getByRole('textbox', { name: 'From' }).fill('');
  await page.getByRole('textbox', { name: 'To' }).fill('');
  await expect(row).toBeVisible();
  await page.screenshot({ path: test.info().outputPath('history.png') });

  // The report: crew, the chart, every entry with its date and time to the second.
  await row.click();
  await expect(page.getByTestId('report-title')).toHaveText('Strike the sea-mist drapes');
  await expect(page.getByTestId('balance-chart')).toBeVisible();
  const entries = page.getByTestId('report-entries').locator('li');
  await expect(entries.first()).toContainText(new RegExp(`#1 ${yesterday}, \\d{2}:\\d{2}:\\d{2}`));
  await page.getByTestId('check-chain').click();
  await expect(page.getByTestId('chain-result')).toContainText('Intact');
  expect(await seriousViolations(page)).toEqual([]);
  await page.screenshot({ path: test.info().outputPath('report.png'), fullPage: true });

  // The PDF downloads.
  const downloading = page.waitForEvent('download');
  await page.getByTestId('download-pdf').click();
  const download = await downloading;
  expect(download.suggestedFilename()).toMatch(/^railcall-session-\d+-strike-the-sea-mist-drapes\.pdf$/);
  expect(readFileSync((await download.path())!).subarray(0, 5).toString()).toBe('%PDF-');

  // The replay: at the last entry the set is tested; scrubbing back shows the rail clear for loading.
  await page.getByTestId('open-replay').click();
  const entry = page.getByTestId('replay-entry');
  await expect(entry).toContainText('the session is finished');
  const slider = page.getByTestId('replay-slider');
  await slider.focus();
  await page.keyboard.press('Home');
  await expect(entry).toContainText('#1 of');
  await expect(page.getByTestId('replay-viewer')).toHaveText('Nobody had joined in this role yet.');
  // Forward to the rail being clear: the bridge's screen shows the first brick step.
  for (let i = 0; i < 40; i += 1) {
    if (/confirmed the rail is clear/.test((await entry.textContent()) ?? '')) break;
    await page.getByTestId('replay-next').click();
  }
  await expect(entry).toContainText('confirmed the rail is clear');
  await page.getByRole('tab', { name: 'Bridge' }).click();
  await expect(page.getByTestId('replay-viewer')).toHaveText('As Sam Brightwater saw it');
  await expect(page.getByTestId('brick-step')).toBeVisible();
  await page.getByRole('tab', { name: 'Watch' }).click();
  await expect(page.getByTestId('replay-viewer')).toHaveText('As Kit Harrow saw it');
  await expect(page.getByTestId('replay-balance')).toBeVisible();
  await page.screenshot({ path: test.info().outputPath('replay.png'), fullPage: true });
  await page.getByTestId('replay-next').click();
  await page.getByRole('tab', { name: 'Deck' }).click();
  await expect(page.getByTestId('replay-viewer')).toHaveText('As Robin Ashby saw it');
  expect(await seriousViolations(page)).toEqual([]);
  expect(errors).toEqual([]);
  await sm.context.close();
});

test('an edited export is caught on the check page, naming the entry', async ({ browser }) => {
  const sm = await openPhone(browser, laneUrl('record'), 'sm');
  const { page } = sm;
  const sessions = await (await page.request.get('/api/record/sessions')).json();
  const id = sessions.sessions.find((s: { title: string }) => s.title === 'Strike the sea-mist drapes').id;
  const record = await (await page.request.get(`/api/sessions/${id}/record`)).json();
  record.entries[4].personName = 'Someone Else';
  await page.goto('/record/verify');
  await page.locator('input[type=file]').setInputFiles({ name: 'record.json', mimeType: 'application/json', buffer: Buffer.from(JSON.stringify(record)) });
  await page.getByTestId('verify-submit').click();
  await expect(page.getByTestId('verify-result')).toContainText('Broken at entry 5');
  await page.locator('input[type=file]').setInputFiles({ name: 'schedule.json', mimeType: 'application/json', buffer: Buffer.from('line set,weight\n7,40') });
  await page.getByTestId('verify-submit').click();
  await expect(page.getByText('Choose a session record exported from Railcall (.json)')).toBeVisible();
  await sm.context.close();
});
