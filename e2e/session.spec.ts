import { expect, test, type Page } from '@playwright/test';
import { laneUrl } from './support/lanes';
import { joinFromHome, openPhone, startTwoDrapeUnload, type Person } from './fixtures/crew';

test.use({ baseURL: laneUrl('session') });

const TITLE = 'Sea-mist drapes off';

async function shot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: test.info().outputPath(`${name}.png`), fullPage: false });
}

/** The steps a person's screen offers now, as its test ids (what the screen shows, nothing more). */
async function tapWhenShown(person: Person, testId: string): Promise<void> {
  const button = person.page.getByTestId(testId);
  await expect(button).toBeVisible();
  await button.click();
  await expect(button).toBeHidden();
}

test('a complete two-drape unload, tapped on five phones', async ({ browser }) => {
  test.setTimeout(180_000);
  const base = laneUrl('session');

  // The rail operator plans line set 7: both drapes off, and starts the session.
  const rail = await openPhone(browser, base, 'rail');
  await startTwoDrapeUnload(rail, TITLE);
  // Whoever starts the session is joined as its lead at once.
  await expect(rail.page.getByTestId('rail-panel')).toBeVisible();
  await expect(rail.page.getByTestId('session-qr')).toBeVisible();

  const loader1 = await openPhone(browser, base, 'loader1');
  const loader2 = await openPhone(browser, base, 'loader2', { gated: true });
  const deck = await openPhone(browser, base, 'deck');
  const sm = await openPhone(browser, base, 'sm');
  await joinFromHome(loader1, TITLE, 'loader');
  await joinFromHome(loader2, TITLE, 'loader');
  await joinFromHome(deck, TITLE, 'deck');
  await joinFromHome(sm, TITLE, 'stage-manager');
  const everyone = [rail, loader1, loader2, deck, sm];

  await rail.page.getByRole('button', { name: 'Begin loading' }).click();
  await tapWhenShown(rail, 'call-move');

  // The call takes over the loaders' and the deck's screens with one large "clear".
  for (const p of [loader1, loader2, deck]) await expect(p.page.getByTestId('call-alert')).toBeVisible();
  // The call covers the hold bar, so it carries its own HOLD: a full thumb's target at the bottom edge.
  const alertHold = deck.page.getByTestId('alert-call-hold');
  await expect(alertHold).toBeVisible();
  await expect(alertHold).toHaveAccessibleName('Call a hold: stop everything');
  const holdBox = (await alertHold.boundingBox())!;
  const clearBox = (await deck.page.getByTestId('alert-clear').boundingBox())!;
  expect(holdBox.height).toBeGreaterThanOrEqual(48);
  expect(holdBox.y).toBeGreaterThan(clearBox.y + clearBox.height);
  expect(holdBox.y + holdBox.height).toBeGreaterThan(deck.page.viewportSize()!.height * 0.8);
  expect(clearBox.height).toBeGreaterThan(holdBox.height);
  await shot(deck.page, 'deck-call');
  await tapWhenShown(loader1, 'alert-clear');
  await tapWhenShown(loader2, 'alert-clear');

  // Without the deck's answer the rail cannot confirm the move: the deck is shown as still silent.
  await expect(rail.page.getByTestId('answer-silent')).toContainText(deck.name);
  await expect(rail.page.getByTestId('answers')).toContainText('2 of 3 clear');
  await expect(rail.page.getByTestId('confirm-locked')).toHaveCount(0);
  await shot(rail.page, 'rail-waiting-for-deck');
  await tapWhenShown(deck, 'alert-clear');
  await expect(rail.page.getByTestId('answer-silent')).toHaveCount(0);
  await tapWhenShown(rail, 'confirm-locked');
  if (await rail.page.getByTestId('confirm-tie-off').isVisible()) {
    await expect(rail.page.getByTestId('caution')).toContainText('Never leave a tie-off unattended');
    await tapWhenShown(rail, 'confirm-tie-off');
  }

  await tapWhenShown(loader1, 'call-clear-rail');
  await expect(rail.page.getByTestId('caution')).toContainText('at least 10 ft away from the rail and out from under the gallery');
  await tapWhenShown(rail, 'confirm-rail-clear');

  // The first brick step, in large type on both loaders' phones.
  await expect(loader1.page.getByTestId('brick-step')).toHaveText(/^Pull \d+ (full |half )?bricks?, \d+ lb each/);
  await expect(loader2.page.getByTestId('brick-step')).toBeVisible();
  await shot(loader1.page, 'loader-brick-step');

  // A loader's tap from a screen that is behind: the second loader's phone has not yet heard that
  // the first loader confirmed, taps too, and the server refuses it in plain words.
  loader2.gate!.close();
  await loader1.page.getByTestId('confirm-step').click();
  await expect(loader1.page.getByTestId('confirm-step')).toBeHidden();
  await loader2.page.getByTestId('confirm-step').click();
  await expect(loader2.page.getByTestId('notice').filter({ hasText: 'already done' })).toBeVisible();
  await shot(loader2.page, 'loader-refused');
  loader2.gate!.release();
  await expect(loader2.page.getByTestId('confirm-step')).toBeHidden();

  // The deck's turn: drape A off.
  await expect(deck.page.getByTestId('piece-step')).toHaveText('Take Sea-mist drape A off the batten');
  await tapWhenShown(deck, 'confirm-step');

  // The stage manager calls a hold: every other screen freezes until the rail operator releases it.
  await sm.page.getByTestId('call-hold').click();
  for (const p of [rail, loader1, loader2, deck]) {
    await expect(p.page.getByTestId('hold-alert')).toBeVisible();
    await expect(p.page.getByTestId('hold-frozen')).toBeAttached();
    await expect(p.page.getByTestId('confirm-step')).toHaveCount(0);
  }
  await shot(loader2.page, 'loader-hold');
  await tapWhenShown(loader1, 'ack-hold');
  await shot(rail.page, 'rail-hold');
  await tapWhenShown(rail, 'release-hold');
  for (const p of everyone) await expect(p.page.getByTestId('hold-alert')).toHaveCount(0);

  // Drape B: the second loader pulls its bricks this time, then the deck takes it off.
  await tapWhenShown(loader2, 'confirm-step');
  await expect(deck.page.getByTestId('piece-step')).toHaveText('Take Sea-mist drape B off the batten');
  await tapWhenShown(deck, 'confirm-step');
  await tapWhenShown(loader1, 'call-loading-complete');
  if (await rail.page.getByTestId('confirm-untie').isVisible()) await tapWhenShown(rail, 'confirm-untie');
  await rail.page.getByRole('button', { name: 'Tested: balanced' }).click();
  for (const p of everyone) await expect(p.page.getByTestId('session-finished')).toBeVisible();

  // The stage manager's log lists every entry, newest first, with nothing missing or twice.
  const sessionPath = new URL(sm.page.url()).pathname;
  const events = await (await sm.page.request.get(`/api${sessionPath}/events?after=0`)).json();
  const seqs: number[] = events.entries.map((e: { seq: number }) => e.seq);
  expect(seqs).toEqual(seqs.map((_, i) => i + 1));
  const rows = sm.page.getByTestId('log-row');
  await expect(rows).toHaveCount(seqs.length);
  expect(await rows.evaluateAll((trs) => trs.map((tr) => Number(tr.getAttribute('data-seq'))))).toEqual([...seqs].reverse());
  const log = sm.page.getByTestId('session-log');
  await expect(log).toContainText(/called line set 7\b.* in to the loading position/i);
  await expect(log).toContainText(`${deck.name} answered "clear"`);
  await expect(log).toContainText('Refused:');
  await expect(log).toContainText('called a hold');
  await expect(log).toContainText('released the hold');
  await sm.page.getByTestId('session-log').scrollIntoViewIfNeeded();
  await shot(sm.page, 'stage-manager-log');

  // Filtered by person: only the deck crew's entries.
  await sm.page.getByTestId('log-filter-person').click();
  await sm.page.getByRole('option', { name: deck.name }).click();
  const whoCells = await rows.getByTestId('log-who').allTextContents();
  expect(whoCells.length).toBeGreaterThan(0);
  expect(new Set(whoCells)).toEqual(new Set([deck.name]));

  for (const p of everyone) await p.context.close();
});
