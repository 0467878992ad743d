import { expect, test, type APIRequestContext, type Page } from '@playwright/test';
import { laneUrl } from './support/lanes';
import { openPhone } from './fixtures/crew';

test.use({ baseURL: laneUrl('phone-app') });
const base = laneUrl('phone-app');

/** Sends one session action through the API with a fresh key, as a phone would. */
async function act(request: APIRequestContext, sessionId: number, action: Record<string, unknown>) {
  return request.post(`/api/sessions/${sessionId}/actions`, {
    data: { key: `app-${Math.random().toString(36).slice(2, 12)}`, clientTimeMs: Date.now(), action },
  });
}

/** Waits until the service worker is active and this page is under its control. */
async function controlledByServiceWorker(page: Page): Promise<void> {
  await page.evaluate(() => navigator.serviceWorker.ready.then(() => undefined));
  if (!(await page.evaluate(() => !!navigator.serviceWorker.controller))) await page.reload();
  await expect.poll(() => page.evaluate(() => !!navigator.serviceWorker.controller)).toBe(true);
}

test('the manifest is valid, its icons are drawn to size, and the service worker registers', async ({ browser }) => {
  const phone = await openPhone(browser, base, 'deck');
  const { page } = phone;
  const manifestHref = await page.locator('link[rel="manifest"]').getAttribute('href');
  expect(manifestHref).toBeTruthy();
  const res = await page.request.get(manifestHref!);
  expect(res.status()).toBe(200);
  expect(res.headers()['content-type']).toMatch(/application\/manifest\+json/);
  expect(res.headers()['cache-control']).toBe('no-cache');
  const manifest = await res.json();
  // The fields a browser needs to offer "Install" (W3C Web Application Manifest; Chromium's installability checks).
  expect(manifest).toMatchObject({ name: 'Railcall', short_name: 'Railcall', start_url: '/', display: 'standalone' });
  expect(manifest.theme_color).toMatch(/^#[0-9a-f]{6}$/i);
  const sizes = (manifest.icons as Array<{ sizes: string; purpose?: string }>).map((i) => i.sizes);
  expect(sizes).toEqual(expect.arrayContaining(['192x192', '512x512']));
  expect(manifest.icons.some((i: { purpose?: string }) => i.purpose === 'maskable')).toBe(true);
  for (const icon of manifest.icons as Array<{ src: string; sizes: string; type: string }>) {
    const drawn = await page.evaluate(async (src) => {
      const img = new Image();
      img.src = src;
      await img.decode();
      return `${img.naturalWidth}x${img.naturalHeight}`;
    }, icon.src);
    if (icon.sizes !== 'any') expect(drawn, icon.src).toBe(icon.sizes);
  }

  await controlledByServiceWorker(page);
  // Chromium's own verdict, the one behind its "Install app" menu item (DevTools protocol).
  const cdp = await phone.context.newCDPSession(page);
  const { installabilityErrors } = await cdp.send('Page.getInstallabilityErrors');
  // A Playwright context is a private window, where Chromium never installs anything: that one is the test's, not the app's.
  expect(installabilityErrors.filter((e) => e.errorId !== 'in-incognito')).toEqual([]);
  const sw = await page.request.get('/sw.js');
  expect(sw.headers()['cache-control']).toBe('no-cache');

  // The app shell and the Inter font come from the phone with no network at all.
  await phone.context.setOffline(true);
  await page.reload();
  await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
  expect(await page.evaluate(async () => {
    await document.fonts.ready;
    return document.fonts.check('16px Inter');
  })).toBe(true);
  await phone.context.setOffline(false);
});

test('with the network off, a reload shows the session from the phone, a tap waits, and goes once when the network is back', async ({ browser }) => {
  test.setTimeout(150_000);
  const rail = await openPhone(browser, base, 'rail');
  const schedule = await (await rail.page.request.get('/api/schedule')).json();
  const set7 = schedule.lineSets.find((l: { number: number }) => l.number === 7);
  const opened = await rail.page.request.post('/api/sessions', {
    data: { title: 'Gallery without signal', lineSets: [{ lineSetId: set7.id, remove: set7.pieces.map((p: { id: number }) => p.id), add: [] }] },
  });
  expect(opened.status()).toBe(201);
  const sessionId: number = (await opened.json()).session.id;
  const crew = { loader1: await openPhone(browser, base, 'loader1'), loader2: await openPhone(browser, base, 'loader2'), deck: await openPhone(browser, base, 'deck') };
  // The rail operator who opened it leads it already.
  await act(crew.loader1.page.request, sessionId, { type: 'join', role: 'loader' });
  await act(crew.loader2.page.request, sessionId, { type: 'join', role: 'loader' });
  await act(crew.deck.page.request, sessionId, { type: 'join', role: 'deck' });
  expect((await act(rail.page.request, sessionId, { type: 'begin' })).status()).toBe(200);

  const { page, context } = crew.loader1;
  await page.goto(`/sessions/${sessionId}`);
  await controlledByServiceWorker(page);
  expect((await act(rail.page.request, sessionId, { type: 'call-move' })).status()).toBe(200);
  // After the reload the phone reconnects and catches up: on a busy machine that can take a while.
  await expect(page.getByTestId('call-alert')).toBeVisible({ timeout: 30_000 });
  // Let the phone keep its copy of the call, then lose the signal and reload.
  await page.waitForTimeout(800);
  await context.setOffline(true);
  await page.reload();
  await expect(page.getByTestId('cached-state')).toBeVisible();
  await expect(page.getByTestId('cached-age')).toHaveText(/\d+ s/);
  await expect(page.getByTestId('call-alert')).toBeVisible();
  await page.getByTestId('alert-clear').click();
  await expect(page.getByTestId('cached-state')).toContainText('1 tap waits');

  // The tap outlives another reload without a signal.
  await page.reload();
  await expect(page.getByTestId('cached-state')).toContainText('1 tap waits');

  await context.setOffline(false);
  await expect(page.getByTestId('cached-state')).toBeHidden({ timeout: 30_000 });
  await expect.poll(async () => {
    const events = await (await rail.page.request.get(`/api/sessions/${sessionId}/events?after=0`)).json();
    return events.entries.filter((e: { kind: string; personName: string }) => e.kind === 'clear-answered' && e.personName === 'Sam Brightwater').length;
  }, { timeout: 20_000 }).toBe(1);
  // And only once, even after the phone reloads again with the signal back.
  await page.reload();
  await expect(page.getByTestId('call-alert')).toBeHidden();
  const events = await (await rail.page.request.get(`/api/sessions/${sessionId}/events?after=0`)).json();
  expect(events.entries.filter((e: { kind: string; personName: string }) => e.kind === 'clear-answered' && e.personName === 'Sam Brightwater')).toHaveLength(1);
});
