import { expect, test, type APIRequestContext, type Page } from '@playwright/test';
import { DEMO_PASSWORD } from '../shared/protocol/http';
import type { MailboxMessage } from '../shared/protocol/mail';
import { laneUrl } from './support/lanes';
import { openPhone } from './fixtures/crew';

const base = laneUrl('mail');
test.use({ baseURL: base });

/** Waits until the local fake mail server holds a message that matches (read through the mailbox route). */
async function mailFor(request: APIRequestContext, match: (m: MailboxMessage) => boolean): Promise<MailboxMessage> {
  let found: MailboxMessage | undefined;
  await expect.poll(async () => {
    const res = await request.get('/api/dev/mailbox');
    found = ((await res.json()).messages as MailboxMessage[]).find(match);
    return Boolean(found);
  }, { timeout: 15_000 }).toBe(true);
  return found!;
}

/** The rail operator (over the API) opens a session on line set 7 and ends it early: a finished session. */
async function finishedSession(request: APIRequestContext, title: string): Promise<number> {
  expect((await request.post('/api/auth/sign-in', { data: { email: 'rail@larkspur.example', password: DEMO_PASSWORD } })).status()).toBe(200);
  const schedule = await (await request.get('/api/schedule')).json();
  const ls7 = schedule.lineSets.find((l: { number: number }) => l.number === 7);
  const opened = await request.post('/api/sessions', { data: { title, lineSets: [{ lineSetId: ls7.id, remove: [], add: [] }] } });
  const id = (await opened.json()).session.id as number;
  // The rail operator who opened it leads it already.
  for (const action of [{ type: 'end', reason: 'Rehearsal moved to tomorrow' }]) {
    const res = await request.post(`/api/sessions/${id}/actions`, { data: { key: `mail-spec-${action.type}-${Date.now()}`, clientTimeMs: Date.now(), action } });
    expect(res.status(), await res.text()).toBe(200);
  }
  return id;
}

async function openMailPage(page: Page): Promise<void> {
  await page.goto('/admin/mail');
  await expect(page.getByRole('heading', { name: 'Mail', exact: true })).toBeVisible();
}

test('an invitation arrives by mail; its link sets a password once and not twice', async ({ browser }) => {
  const td = await openPhone(browser, base, 'td');
  const { page } = td;
  const email = `fly-${Date.now()}@larkspur.example`;
  await page.getByRole('button', { name: 'Add a person' }).click();
  const addDialog = page.getByRole('dialog');
  await addDialog.getByLabel('Name').fill('Quinn Battenby');
  await addDialog.getByLabel('E-mail').fill(email);
  await addDialog.getByText('Loader', { exact: true }).click();
  await addDialog.getByRole('button', { name: 'Add to the crew' }).click();
  const invite = page.getByRole('dialog').filter({ hasText: 'Invitation for Quinn Battenby' });
  await expect(invite.getByTestId('invite-mail-status')).toContainText(`Railcall mails this link to ${email}`);
  await invite.getByRole('button', { name: 'Close' }).click();
  const row = page.getByTestId('person-row').filter({ hasText: email });
  await expect(row.getByTestId('invitation-mail-status')).toHaveText(/Invitation mail: sent/, { timeout: 15_000 });

  // The technical director's mail page shows it sent, and the local mailbox holds it.
  await openMailPage(page);
  await expect(page.getByTestId('outbox-row').filter({ hasText: email }).getByTestId('outbox-status')).toHaveText('Sent');
  const message = page.getByTestId('mailbox-message').filter({ hasText: 'Your Railcall invitation to Larkspur Playhouse' }).filter({ hasText: email });
  await message.click();
  const link = /http:\/\/127\.0\.0\.1:\d+\/welcome\/[A-Za-z0-9_-]+/.exec(await message.locator('pre').innerText())![0];

  const newcomer = await browser.newContext({ viewport: { width: 360, height: 740 }, hasTouch: true, isMobile: true });
  const phone = await newcomer.newPage();
  await phone.goto(link);
  await phone.getByLabel('New password').fill('battens and bricks');
  await phone.getByLabel('The same password again').fill('battens and bricks');
  await phone.getByRole('button', { name: 'Set password and sign in' }).click();
  await expect(phone).toHaveURL(/\/bridge$/);
  await expect(phone.getByRole('heading', { name: 'Hello, Quinn' })).toBeVisible();

  // The same link a second time is refused, in words.
  const again = await (await browser.newContext()).newPage();
  await again.goto(link);
  await again.getByLabel('New password').fill('another password!');
  await again.getByLabel('The same password again').fill('another password!');
  await again.getByRole('button', { name: 'Set password and sign in' }).click();
  await expect(again.getByRole('alert')).toContainText('not valid any more');
});

test("the stage manager opens yesterday's session from the history, scrubs the replay, downloads the PDF and mails it; it arrives with the PDF attached", async ({ browser }) => {
  test.setTimeout(120_000);
  const sm = await openPhone(browser, base, 'sm');
  const { page } = sm;
  await page.getByTestId('home-record').click();
  await expect(page).toHaveURL(/\/record$/);
  await page.getByTestId('history-row').filter({ hasText: 'Strike the sea-mist drapes' }).click();
  await expect(page.getByTestId('report-title')).toHaveText('Strike the sea-mist drapes');
  const reportUrl = page.url();
  const sessionId = Number(reportUrl.split('/').pop());

  // Scrub the replay back to the first entry, then return to the report.
  await page.getByTestId('open-replay').click();
  const slider = page.getByTestId('replay-slider');
  await slider.focus();
  await page.keyboard.press('Home');
  await expect(page.getByTestId('replay-entry')).toContainText('#1 of');
  await page.goBack();
  await expect(page.getByTestId('report-title')).toBeVisible();

  // The PDF downloads.
  const downloading = page.waitForEvent('download');
  await page.getByTestId('download-pdf').click();
  const pdfName = (await downloading).suggestedFilename();
  expect(pdfName).toMatch(/\.pdf$/);

  // Mail it: to the technical director and one other address. A wrong address is a field error; nothing is sent.
  await page.getByTestId('mail-report').click();
  const dialog = page.getByRole('dialog').filter({ hasText: 'Mail the report' });
  await dialog.getByRole('checkbox', { name: /Morgan Vale/ }).click();
  await dialog.getByLabel('Other addresses').fill('producer@larkspur.example, not-an-address');
  await dialog.getByRole('button', { name: 'Send the report' }).click();
  await expect(dialog.getByText('Not an e-mail address: not-an-address')).toBeVisible();
  await dialog.getByLabel('Other addresses').fill('producer@larkspur.example');
  await dialog.getByRole('button', { name: 'Send the report' }).click();
  const sent = dialog.getByTestId('report-mail-sent');
  await expect(sent).toContainText('Morgan Vale');
  await expect(sent).toContainText('producer@larkspur.example');

  // It arrives at the fake mail server, with the same PDF attached.
  const td = await openPhone(browser, base, 'td');
  const subject = 'Session report: Strike the sea-mist drapes (Larkspur Playhouse)';
  const arrived = await mailFor(td.page.request, (m) => m.subject === subject && m.to.includes('td@larkspur.example'));
  expect(arrived.text).toContain('Kit Harrow sends you the report of the loading session "Strike the sea-mist drapes"');
  expect(arrived.attachments).toEqual([expect.objectContaining({ contentType: 'application/pdf', filename: pdfName })]);
  expect(pdfName).toMatch(new RegExp(`^railcall-session-${sessionId}-`));
  const pdf = await td.page.request.get(`/api/dev/mailbox/${arrived.id}/attachments/0`);
  expect((await pdf.body()).subarray(0, 5).toString()).toBe('%PDF-');
  await mailFor(td.page.request, (m) => m.subject === subject && m.to.includes('producer@larkspur.example'));

  // And the mail page lists it, with the attachment to open.
  await openMailPage(td.page);
  const message = td.page.getByTestId('mailbox-message').filter({ hasText: subject }).filter({ hasText: 'td@larkspur.example' });
  await message.click();
  await expect(message.getByTestId('mailbox-attachment')).toContainText(pdfName);
  await expect(td.page.getByTestId('outbox-row').filter({ hasText: 'producer@larkspur.example' }).getByTestId('outbox-status')).toHaveText('Sent');
});

test('a session ended early leads from its live screen to its report, where it can be mailed', async ({ browser, request }) => {
  const title = `Fog drop rehang ${Date.now()}`;
  const sessionId = await finishedSession(request, title);
  const sm = await openPhone(browser, base, 'sm');
  await sm.page.goto(`/sessions/${sessionId}`);
  await expect(sm.page.getByTestId('session-finished')).toContainText('Rehearsal moved to tomorrow');
  await sm.page.getByTestId('open-report').click();
  await expect(sm.page.getByTestId('report-title')).toHaveText(title);
  await expect(sm.page.getByTestId('mail-report')).toBeVisible();
});

test('a person whose roles here were all taken away is added back with their e-mail: their account and name are kept, a notice arrives', async ({ browser }) => {
  const td = await openPhone(browser, base, 'td');
  const { page } = td;
  // Take every role of the second loader away (as the roles dialog would): they drop off the list.
  const people = (await (await page.request.get('/api/people')).json()).people as { id: number; name: string; email: string }[];
  const loader = people.find((p) => p.email === 'loader2@larkspur.example')!;
  expect((await page.request.put(`/api/people/${loader.id}/roles`, { data: { roles: [] } })).status()).toBe(200);
  await page.reload();
  await expect(page.getByTestId('person-row').first()).toBeVisible();
  await expect(page.getByTestId('person-row').filter({ hasText: 'loader2@larkspur.example' })).toHaveCount(0);

  await page.getByRole('button', { name: 'Add a person' }).click();
  const addDialog = page.getByRole('dialog');
  await addDialog.getByLabel('Name').fill('A different name');
  await addDialog.getByLabel('E-mail').fill('loader2@larkspur.example');
  await addDialog.getByText('Deck crew', { exact: true }).click();
  await addDialog.getByRole('button', { name: 'Add to the crew' }).click();
  await expect(page.getByText(`loader2@larkspur.example already has a Railcall account, so it keeps its own name (${loader.name})`)).toBeVisible();
  await expect(page.getByRole('dialog').filter({ hasText: 'Invitation for' })).toHaveCount(0);
  await expect(page.getByTestId('person-row').filter({ hasText: 'loader2@larkspur.example' })).toContainText(loader.name);

  const notice = await mailFor(page.request, (m) => m.to.includes('loader2@larkspur.example') && m.subject.includes('crew of Larkspur Playhouse'));
  expect(notice.text).toContain('You now hold the roles Deck crew at Larkspur Playhouse.');
});
