import { expect, test } from '@playwright/test';
import { laneUrl } from './support/lanes';
import { joinFromHome, openPhone, startTwoDrapeUnload, type Person } from './fixtures/crew';

test.use({ baseURL: laneUrl('offline') });

const TITLE = 'Offline catch-up';

async function tap(person: Person, testId: string): Promise<void> {
  const button = person.page.getByTestId(testId);
  await expect(button).toBeVisible();
  await button.click();
  await expect(button).toBeHidden();
}

test('a phone that loses its connection mid-session catches up exactly and sends its queued tap once', async ({ browser }) => {
  test.setTimeout(150_000);
  const base = laneUrl('offline');
  const rail = await openPhone(browser, base, 'rail');
  await startTwoDrapeUnload(rail, TITLE);
  // Whoever starts the session is joined as its lead at once.
  await expect(rail.page.getByTestId('rail-panel')).toBeVisible();
  const loader1 = await openPhone(browser, base, 'loader1');
  const loader2 = await openPhone(browser, base, 'loader2');
  const deck = await openPhone(browser, base, 'deck');
  const sm = await openPhone(browser, base, 'sm');
  for (const [p, role] of [[loader1, 'loader'], [loader2, 'loader'], [deck, 'deck'], [sm, 'stage-manager']] as const) {
    await joinFromHome(p, TITLE, role);
  }
  await rail.page.getByRole('button', { name: 'Begin loading' }).click();
  await tap(rail, 'call-move');
  for (const p of [loader1, loader2, deck]) await tap(p, 'alert-clear');
  await tap(rail, 'confirm-locked');
  if (await rail.page.getByTestId('confirm-tie-off').isVisible()) await tap(rail, 'confirm-tie-off');
  await tap(loader1, 'call-clear-rail');
  await tap(rail, 'confirm-rail-clear');

  const smRows = sm.page.getByTestId('log-row');
  const before = await smRows.count();

  // The stage manager's phone drops off the network; the banner says so.
  await sm.context.setOffline(true);
  await expect(sm.page.getByText('Live connection lost.')).toBeVisible({ timeout: 30_000 });

  // The session goes on without it.
  await tap(loader1, 'confirm-step');
  await tap(deck, 'confirm-step');
  await tap(loader2, 'confirm-step');

  // A note written while offline waits in the outbox, with its key.
  await sm.page.getByLabel('Note for the log').fill('Spot line on drape B checked');
  await sm.page.getByRole('button', { name: 'Add note' }).click();
  await expect(sm.page.getByTestId('outbox')).toHaveText(/1 tap waiting to send/);
  await expect(smRows).toHaveCount(before);

  // Back online: the phone re-watches from its last sequence number and sends the note once.
  await sm.context.setOffline(false);
  await expect(sm.page.getByText('Live connection lost.')).toBeHidden({ timeout: 30_000 });
  await expect(sm.page.getByTestId('outbox')).toHaveCount(0);

  const path = new URL(sm.page.url()).pathname;
  await expect(async () => {
    const events = await (await sm.page.request.get(`/api${path}/events?after=0`)).json();
    const seqs: number[] = events.entries.map((e: { seq: number }) => e.seq);
    const shown = await smRows.evaluateAll((trs) => trs.map((tr) => Number(tr.getAttribute('data-seq'))));
    expect(shown).toEqual([...seqs].reverse());
  }).toPass({ timeout: 15_000 });
  const notes = sm.page.getByTestId('session-log').getByText('Spot line on drape B checked');
  await expect(notes).toHaveCount(1);
  await expect(sm.page.getByTestId('session-log')).toContainText(/took Sea-mist drape A off the batten/);
  await sm.page.screenshot({ path: test.info().outputPath('stage-manager-after-catch-up.png') });

  for (const p of [rail, loader1, loader2, deck, sm]) await p.context.close();
});
