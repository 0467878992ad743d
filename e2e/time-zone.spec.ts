import { expect, test, type APIRequestContext } from '@playwright/test';
import { laneUrl } from './support/lanes';
import { openPhone } from './fixtures/crew';

const base = laneUrl('time-zone');
test.use({ baseURL: base });

/** The reference is the browser's own Intl.DateTimeFormat with the IANA zone database, not Railcall's words. */
const ZONE = 'Asia/Tokyo'; // UTC+9 all year
const clock = (ms: number) => new Intl.DateTimeFormat('en-GB', { timeZone: ZONE, hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' }).format(ms);
const day = (ms: number) => new Intl.DateTimeFormat('en-GB', { timeZone: ZONE, day: 'numeric', month: 'short', year: 'numeric' }).format(ms);

async function act(request: APIRequestContext, sessionId: number, action: Record<string, unknown>): Promise<void> {
  const res = await request.post(`/api/sessions/${sessionId}/actions`, { data: { key: `tz-${String(action.type)}-${Date.now()}`, clientTimeMs: Date.now(), action } });
  expect(res.status(), await res.text()).toBe(200);
}

test("the director sets the venue's time zone; the stage manager's log and the report show times there", async ({ browser }) => {
  test.setTimeout(120_000);
  const td = await openPhone(browser, base, 'td');
  // The stored settings arrive late, as on a slow phone: a choice made before they arrive must not be overwritten.
  await td.page.route('**/api/venue', async (route) => {
    await new Promise((resolve) => setTimeout(resolve, 800));
    await route.continue();
  });
  await td.page.goto('/admin/venue');
  const zone = td.page.getByRole('combobox', { name: /Time zone/ });
  await expect(zone).toHaveValue('UTC');
  await zone.fill('tokyo');
  await td.page.getByRole('option', { name: ZONE }).click();
  await td.page.getByLabel('Why (kept in the history)').fill('Touring to Japan');
  await td.page.getByRole('button', { name: 'Save settings' }).click();
  await expect(td.page.getByText('Venue settings saved.')).toBeVisible();
  const history = td.page.getByTestId('venue-history');
  await expect(history).toContainText(`timeZone: UTC → ${ZONE}`);
  await expect(history).toContainText('Why: Touring to Japan');
  await td.context.close();

  // The rail operator opens a session (and leads it); the stage manager joins and writes a note.
  const rail = await openPhone(browser, base, 'rail');
  const schedule = await (await rail.page.request.get('/api/schedule')).json();
  const ls7 = schedule.lineSets.find((l: { number: number }) => l.number === 7);
  const opened = await rail.page.request.post('/api/sessions', { data: { title: 'Zone check', lineSets: [{ lineSetId: ls7.id, remove: [], add: [] }] } });
  expect(opened.status()).toBe(201);
  const sessionId = (await opened.json()).session.id as number;
  const sm = await openPhone(browser, base, 'sm');
  await act(sm.page.request, sessionId, { type: 'join', role: 'stage-manager' });
  await act(sm.page.request, sessionId, { type: 'note', text: 'Get-in starts at nine, local time' });

  await sm.page.goto(`/sessions/${sessionId}`);
  await expect(sm.page.getByTestId('log-zone')).toHaveText(`${ZONE} (UTC+9)`);
  const events = (await (await sm.page.request.get(`/api/sessions/${sessionId}/events?after=0`)).json()).entries as { serverTimeMs: number }[];
  const newest = events.at(-1)!.serverTimeMs;
  await expect(sm.page.getByTestId('log-row').first().locator('.rc-log__time')).toHaveText(clock(newest));

  await act(rail.page.request, sessionId, { type: 'end', reason: 'Zone check done' });
  await sm.page.goto(`/record/sessions/${sessionId}`);
  await expect(sm.page.getByText(`times in ${ZONE} (UTC+9)`)).toBeVisible();
  const first = events[0].serverTimeMs;
  await expect(sm.page.getByTestId('report-entries').locator('li').first()).toContainText(`#1 ${day(first)}, ${clock(first)} UTC+9`);
  await rail.context.close();
  await sm.context.close();
});
