import { expect, test, type Page } from '@playwright/test';
import { DEMO_PASSWORD } from '../shared/protocol/http';
import { laneUrl } from './support/lanes';
import { openPhone, PHONE } from './fixtures/crew';

const base = laneUrl('sign-in-edges');
test.use({ baseURL: base });

async function signOut(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'Menu' }).click();
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/sign-in/);
}

test.describe('sign-in edges at phone size', () => {
  test('the page and every API answer are never stored by the browser', async ({ request }) => {
    for (const path of ['/', '/watch', '/sign-in', '/api/me', '/api/setup']) {
      const res = await request.get(path);
      expect(res.headers()['cache-control'], path).toBe('no-store');
    }
  });

  test('after sign-out, Back goes to sign-in, never to the previous person\'s screen', async ({ browser }) => {
    const kit = await openPhone(browser, base, 'sm');
    const { page } = kit;
    await expect(page.getByRole('heading', { name: 'Hello, Kit' })).toBeVisible();
    // Within the app, and then as a page load of its own (the back-forward cache's case).
    await page.getByTestId('home-record').click();
    await expect(page).toHaveURL(/\/record$/);
    await page.goto('/record/verify');
    await signOut(page);
    await page.goBack();
    await expect(page).toHaveURL(/\/sign-in/);
    await page.goBack();
    await expect(page).toHaveURL(/\/sign-in/);
    await expect(page.getByRole('heading', { name: 'Sign in' })).toBeVisible();
    await expect(page.getByText('Hello, Kit')).toHaveCount(0);
    await kit.context.close();
  });

  test('a page shown again from the back-forward cache asks who is signed in and goes to sign-in', async ({ browser }) => {
    const kit = await openPhone(browser, base, 'sm');
    const { page } = kit;
    await expect(page.getByRole('heading', { name: 'Hello, Kit' })).toBeVisible();
    // Signed out behind this page's back (as when the page waited in the cache), then shown again.
    expect((await page.request.post('/api/auth/sign-out')).status()).toBe(204);
    await page.evaluate(() => window.dispatchEvent(new PageTransitionEvent('pageshow', { persisted: true })));
    await expect(page).toHaveURL(/\/sign-in/);
    await expect(page.getByText('Hello, Kit')).toHaveCount(0);
    await kit.context.close();
  });

  test('a person whose roles were all removed is told they hold no role at this venue', async ({ browser }) => {
    // Robin is signed in on a phone when the technical director takes away Robin's only role
    // (this lane's own database; no other test here signs Robin in).
    const robinPhone = await openPhone(browser, base, 'deck');
    await expect(robinPhone.page.getByRole('heading', { name: 'Hello, Robin' })).toBeVisible();
    const td = await openPhone(browser, base, 'td');
    const people = await (await td.page.request.get('/api/people')).json();
    const robin = (people.people as { id: number; email: string }[]).find((p) => p.email === 'deck@larkspur.example')!;
    expect((await td.page.request.put(`/api/people/${robin.id}/roles`, { data: { roles: [] } })).status()).toBe(200);
    // The phone is told at once, and goes to sign-in saying why.
    await expect(robinPhone.page).toHaveURL(/\/sign-in/);
    await expect(robinPhone.page.getByTestId('sign-in-problem')).toHaveText(/you hold no role at this venue any more/);
    await robinPhone.context.close();

    const context = await browser.newContext({ ...PHONE, baseURL: base });
    const page = await context.newPage();
    await page.goto('/sign-in');
    await page.getByLabel('E-mail').fill('deck@larkspur.example');
    await page.locator('input[autocomplete="current-password"]').fill('not the password');
    await page.getByRole('button', { name: 'Sign in' }).click();
    // A wrong password says only that, whether or not the account exists.
    await expect(page.getByTestId('sign-in-problem')).toHaveText(/E-mail or password is wrong/);
    await page.locator('input[autocomplete="current-password"]').fill(DEMO_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect(page.getByTestId('sign-in-problem')).toHaveText(/you hold no role at this venue/);
    await expect(page).toHaveURL(/\/sign-in/);

    await context.close();
    await td.context.close();
  });

  test('a short or garbled invitation link is said on load and on submit', async ({ page }) => {
    await page.goto('/welcome/abc123');
    await expect(page.getByTestId('link-problem')).toHaveText(/invitation link is incomplete or garbled/);
    await page.getByLabel('New password').fill('arbor locked and tied');
    await page.getByLabel('The same password again').fill('arbor locked and tied');
    await page.getByRole('button', { name: 'Set password and sign in' }).click();
    await expect(page.getByTestId('form-problem')).toHaveText(/invitation link is incomplete or garbled/);

    // Whole in shape but not one Railcall made (or used already): the server's answer, said as such.
    await page.goto(`/welcome/${'q'.repeat(43)}`);
    await expect(page.getByTestId('link-problem')).toHaveCount(0);
    await page.getByLabel('New password').fill('arbor locked and tied');
    await page.getByLabel('The same password again').fill('arbor locked and tied');
    await page.getByRole('button', { name: 'Set password and sign in' }).click();
    await expect(page.getByTestId('form-problem')).toHaveText(/not valid any more/);
  });
});

