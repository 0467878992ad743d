import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { expect, test, type Page } from '@playwright/test';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../shared/protocol/http';

const require = createRequire(import.meta.url);
const axeSource = readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');

// Phone first: the crew holds a phone on the rail and on the loading bridge.
test.use({ viewport: { width: 360, height: 740 }, hasTouch: true, isMobile: true });

const ADMIN = 'td@larkspur.example';
const RAIL = 'rail@larkspur.example';

async function signIn(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto('/');
  await expect(page).toHaveURL(/\/sign-in/);
  await page.getByLabel('E-mail').fill(email);
  await page.locator('input[autocomplete="current-password"]').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
}

async function signOut(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'Menu' }).click();
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/\/sign-in/);
}

/** WCAG AA colour contrast of what is on screen, checked by axe-core in the page. */
async function contrastViolations(page: Page): Promise<string[]> {
  // Fading messages are measured half-transparent: wait until nothing moves.
  await page.waitForFunction(() => document.getAnimations().every((a) => a.playState !== 'running'));
  // Evaluated through the DevTools protocol: the app's CSP rightly refuses injected script tags.
  await page.evaluate(axeSource);
  return page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: { id: string; nodes: { target: unknown[] }[] }[] }> } }).axe;
    const result = await axe.run(document, { runOnly: { type: 'rule', values: ['color-contrast'] } });
    return result.violations.flatMap((v) => v.nodes.map((n) => `${v.id}: ${JSON.stringify(n.target)}`));
  });
}

test.describe('signing in at phone size', () => {
  test('the technical director lands on the people page and sees the demo crew', async ({ page }) => {
    await signIn(page, ADMIN);
    await expect(page).toHaveURL(/\/admin\/people$/);
    await expect(page.getByRole('heading', { name: 'People' })).toBeVisible();
    const people = page.getByRole('list', { name: 'People' });
    for (const account of DEMO_ACCOUNTS) {
      await expect(people.getByText(account.name, { exact: true })).toBeVisible();
      await expect(people.getByText(account.email, { exact: true })).toBeVisible();
    }
    await expect(people.getByText('Rail operator', { exact: true })).toBeVisible();
    expect(await contrastViolations(page)).toEqual([]);
    await signOut(page);
  });

  test('the rail operator lands on the rail home with their name, venue and role', async ({ page }) => {
    await signIn(page, RAIL);
    await expect(page).toHaveURL(/\/rail$/);
    await expect(page.getByRole('heading', { name: 'Hello, Jo' })).toBeVisible();
    await expect(page.getByTestId('role-home-summary')).toHaveText(/Rail operator at Larkspur Playhouse/);
    await expect(page.getByText('No loading session is running')).toBeVisible();

    // The people page is for the technical director only.
    await page.goto('/admin/people');
    await expect(page).toHaveURL(/\/rail$/);
    await expect(page.getByText('That screen is for the technical director')).toBeVisible();
    await signOut(page);
  });

  test('the technical director adds a person, sees the invitation link once, and cannot drop the last technical director', async ({ page }) => {
    await signIn(page, ADMIN);
    await expect(page).toHaveURL(/\/admin\/people$/);

    const email = `fly-${Date.now()}@larkspur.example`;
    await page.getByRole('button', { name: 'Add a person' }).click();
    const addDialog = page.getByRole('dialog');
    await addDialog.getByLabel('Name').fill('Pat Understudy');
    await addDialog.getByLabel('E-mail').fill(email);
    await addDialog.getByText('Deck crew', { exact: true }).click();
    await addDialog.getByRole('button', { name: 'Add to the crew' }).click();

    const inviteDialog = page.getByRole('dialog').filter({ hasText: 'Invitation for Pat Understudy' });
    await expect(inviteDialog).toBeVisible();
    await expect(inviteDialog.getByTestId('invite-link')).toHaveValue(/\/welcome\/.+/);
    await inviteDialog.getByRole('button', { name: 'Close' }).click();
    await expect(inviteDialog).toBeHidden();

    const people = page.getByRole('list', { name: 'People' });
    await expect(people.getByText(email, { exact: true })).toBeVisible();
    await expect(people.getByRole('listitem').filter({ hasText: email }).getByText('Invited')).toBeVisible();

    // Taking the admin role from the only technical director is refused, in words.
    await page.getByRole('button', { name: 'Manage Morgan Vale' }).click();
    await page.getByText('Change roles', { exact: true }).click();
    const rolesDialog = page.getByRole('dialog').filter({ hasText: 'Roles of Morgan Vale' });
    await rolesDialog.getByText('Technical director', { exact: true }).click();
    await rolesDialog.getByRole('button', { name: 'Save roles' }).click();
    await expect(rolesDialog.getByTestId('roles-problem')).toBeVisible();
    await rolesDialog.getByRole('button', { name: 'Cancel' }).click();
    await signOut(page);
  });

  test('a wrong password shows the server message and stays on sign-in', async ({ page }) => {
    await signIn(page, RAIL, 'not-the-password');
    await expect(page.getByRole('alert').filter({ hasText: 'E-mail or password is wrong' })).toBeVisible();
    await expect(page).toHaveURL(/\/sign-in/);
  });

  test('the sign-in page passes contrast checks in the dark and the light theme', async ({ page }) => {
    await page.goto('/sign-in');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect(page.getByText('Enter an e-mail address')).toBeVisible();
    expect(await contrastViolations(page)).toEqual([]);

    await page.evaluate(() => localStorage.setItem('railcall:theme', 'light'));
    await page.reload();
    await expect(page.locator('body')).toHaveClass(/body--light/);
    expect(await contrastViolations(page)).toEqual([]);
  });
});
