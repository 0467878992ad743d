import { expect, test } from '@playwright/test';
import { laneUrl } from './support/lanes';
import { openPhone, startTwoDrapeUnload, type Person } from './fixtures/crew';
import { expectScreenSound } from './support/screen-checks';

test.use({ baseURL: laneUrl('crew-calls') });

const TITLE = 'Drapes off, crew calls';

async function tap(person: Person, testId: string): Promise<void> {
  const button = person.page.getByTestId(testId);
  await expect(button).toBeVisible();
  await button.click();
}

/** Opens the session from the home list without tapping Refresh: the list must have found it by itself. */
async function openFromHome(person: Person, role: 'loader' | 'deck' | 'stage-manager'): Promise<void> {
  await person.page.getByRole('link', { name: `Open ${TITLE}` }).click();
  await person.page.getByTestId(`join-${role}`).click();
  await expect(person.page.getByTestId('join-panel')).toBeHidden();
}

test('the lead is joined at the start, homes update live, a silent phone is answered for, and a hold says why and who has not acknowledged', async ({ browser }) => {
  test.setTimeout(180_000);
  const base = laneUrl('crew-calls');

  // A technical director without the rail role is told before planning that a rail operator must lead.
  const td = await openPhone(browser, base, 'td');
  await td.page.goto('/sessions/new');
  await expect(td.page.getByTestId('planner-needs-rail')).toContainText('A rail operator must lead a loading session');
  await expect(td.page.getByTestId('start-session')).toHaveCount(0);
  const errors: string[] = [];
  await expectScreenSound(td.page, 'planner, no rail role', errors);
  // The shortest re-alert time a venue may set, so the silent deck hand is re-alerted within the test.
  const venue = (await (await td.page.request.get('/api/venue')).json()).venue;
  const saved = await td.page.request.put('/api/venue', { data: { name: venue.name, units: venue.units, settings: { ...venue.settings, reAlertSeconds: 5 } } });
  expect(saved.status(), await saved.text()).toBe(200);

  // Every home screen is open before the session starts: it must appear on them by itself.
  const loader1 = await openPhone(browser, base, 'loader1');
  const loader2 = await openPhone(browser, base, 'loader2');
  const deck = await openPhone(browser, base, 'deck');
  const sm = await openPhone(browser, base, 'sm');
  for (const p of [loader1, loader2, deck, sm]) await expect(p.page.getByTestId('no-sessions')).toBeVisible();

  const rail = await openPhone(browser, base, 'rail');
  for (const p of [td, loader1, loader2, deck, sm, rail]) p.page.on('pageerror', (error) => errors.push(`${p.key}: ${error.message}`));
  await startTwoDrapeUnload(rail, TITLE);
  // The one who started it leads it at once: the rail's panel, no join to tap.
  await expect(rail.page.getByTestId('rail-panel')).toBeVisible();
  await expect(rail.page.getByTestId('join-panel')).toHaveCount(0);
  // Well inside the fallback poll (a minute while connected): the broadcast refreshed the lists.
  for (const p of [loader1, loader2, deck, sm]) {
    await expect(p.page.getByRole('link', { name: `Open ${TITLE}` })).toBeVisible({ timeout: 3000 });
  }
  await openFromHome(loader1, 'loader');
  await openFromHome(loader2, 'loader');
  await openFromHome(deck, 'deck');
  await openFromHome(sm, 'stage-manager');
  await rail.page.getByRole('button', { name: 'Begin loading' }).click();

  // The deck hand's phone goes silent during the call; after Railcall re-alerts, the lead records "clear" by voice.
  await tap(rail, 'call-move');
  await tap(loader1, 'alert-clear');
  await tap(loader2, 'alert-clear');
  await expect(rail.page.getByTestId('re-alerted')).toBeVisible({ timeout: 12_000 });
  await tap(rail, 'record-clear-for');
  await expectScreenSound(rail.page, 'rail, recording a clear for the silent deck hand', errors);
  await tap(rail, 'record-clear-via-voice');
  await expect(rail.page.getByTestId('answer-recorded-by')).toContainText('answered clear by voice, recorded by Jo Castellan');
  await expect(sm.page.getByText('Jo Castellan recorded "clear" for Robin Ashby')).toBeVisible();
  await tap(rail, 'confirm-locked');

  // The stage manager calls a hold with one tap, then says why with one more; every phone shows the reason.
  await tap(sm, 'call-hold');
  await expect(sm.page.getByTestId('hold-reason')).toBeVisible();
  await expectScreenSound(sm.page, 'stage manager, hold reason choices', errors);
  await sm.page.getByRole('button', { name: 'Someone under the gallery' }).click();
  for (const p of [rail, loader1, loader2, deck]) {
    await expect(p.page.getByTestId('hold-alert')).toContainText('Someone under the gallery');
  }
  // The rail sees who has not yet acknowledged, by name, and the list shrinks as each phone answers.
  const notAcked = rail.page.getByTestId('hold-not-acked');
  await expect(notAcked).toContainText('Sam Brightwater');
  await expect(notAcked).toContainText('Robin Ashby');
  await tap(loader1, 'ack-hold');
  await expect(notAcked).not.toContainText('Sam Brightwater');
  await expect(notAcked).toContainText('Robin Ashby');
  await expectScreenSound(rail.page, 'rail, hold with names not yet acknowledged', errors);
  for (const p of [loader2, deck]) await tap(p, 'ack-hold');
  await expect(notAcked).toHaveText('Everyone has acknowledged.');
  await tap(rail, 'release-hold');
  await expect(rail.page.getByTestId('hold-alert')).toBeHidden();

  // Ending the session takes it off a home screen by itself.
  await loader2.page.goto('/bridge');
  await expect(loader2.page.getByRole('link', { name: `Open ${TITLE}` })).toBeVisible();
  await rail.page.getByRole('button', { name: 'End the session early…' }).click();
  await rail.page.getByLabel('Why the session ends (kept in the log)').fill('Crew call test done');
  await rail.page.getByRole('button', { name: 'End the session' }).click();
  await expect(loader2.page.getByTestId('no-sessions')).toBeVisible({ timeout: 3000 });
  expect(errors).toEqual([]);
});
