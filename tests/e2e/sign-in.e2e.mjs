import { accounts, assert, expectText, signIn } from './helpers.mjs';

export const tests = [
  {
    name: 'when someone enters a wrong password, then the sign-in page shows the readable error',
    async run({ page, baseUrl, screenshot }) {
      await page.goto(`${baseUrl}/`);
      // Not signed in: the guard sends the visitor to the sign-in page.
      await page.waitForURL(/\/sign-in/);
      await page.getByRole('heading', { name: 'Sign in' }).waitFor();
      await screenshot('sign-in.png');
      await page.locator('#sign-in-email').fill(accounts.siteManager.email);
      await page.locator('#sign-in-password').fill('not-the-password-2026');
      await page.getByRole('button', { name: 'Sign in' }).click();
      await expectText(page, 'The e-mail or password is not correct.');
      await screenshot('sign-in-error.png');
      assert(page.url().includes('/sign-in'), 'a wrong password left the sign-in page');
    },
  },
  {
    name: 'when a visitor opens a deep link without a session, then they return to it after signing in',
    async run({ page, baseUrl }) {
      await page.goto(`${baseUrl}/account`);
      await page.waitForURL(/\/sign-in\?next=(%2F|\/)account/);
      await page.locator('#sign-in-email').fill(accounts.viewer.email);
      await page.locator('#sign-in-password').fill(accounts.viewer.password);
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.getByRole('heading', { name: 'Change password' }).waitFor();
      assert(new URL(page.url()).pathname === '/account', `expected /account, got ${page.url()}`);
    },
  },
  {
    name: 'when the session ends on the server, then the next request leads to the sign-in page with the way back',
    async run({ page, context, baseUrl }) {
      await signIn(page, baseUrl, accounts.siteManager);
      await context.clearCookies();
      await page.getByRole('link', { name: 'Fennick Cross DC' }).click();
      await page.waitForURL(/\/sign-in\?next=/);
      const next = new URL(page.url()).searchParams.get('next') ?? '';
      assert(next.startsWith('/sites/'), `expected next to point at the site, got “${next}”`);
    },
  },
];
