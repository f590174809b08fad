import { accounts, assert, expectText, signIn } from './helpers.mjs';

const ambergateSites = ['Fennick Cross DC', 'Tarrow Heath Cold Store'];
const corvaneSites = ['Lowen Harbour Hub', 'Brindle Ford Crossdock', 'Quarrington Vale Returns'];

export const tests = [
  {
    name: "when a site manager signs in, then the overview lists only their organization's two sites",
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.siteManager);
      const table = page.getByRole('table');
      await table.waitFor();
      for (const name of ambergateSites) await expectText(page, name);
      const rows = await table.locator('tbody tr').count();
      assert(rows === 2, `expected 2 site rows, found ${rows}`);
      for (const name of corvaneSites) {
        assert((await page.getByText(name).count()) === 0, `another organization's site “${name}” is visible`);
      }
      // The demo's scans load in the background: a site shows its score once detection has run, "no data yet" before.
      const overview = await table.innerText();
      assert(/\d %|\d%|no data yet/.test(overview), 'the health column shows neither a score nor "no data yet"');
      await page.locator('.p-skeleton').first().waitFor({ state: 'detached' }).catch(() => {});
      await screenshot('fleet-overview.png');
    },
  },
  {
    name: 'when a site manager switches to cards and opens a site, then its header shows the safety caution',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.siteManager);
      await page.getByRole('radio', { name: /Cards/ }).or(page.getByRole('button', { name: /Cards/ })).first().click();
      await page.getByRole('list', { name: 'Sites' }).waitFor();
      await screenshot('fleet-cards.png');
      await page.getByRole('link', { name: 'Fennick Cross DC' }).click();
      await page.getByRole('heading', { level: 1, name: 'Fennick Cross DC' }).waitFor();
      await expectText(page, 'It does not certify that a site, a map or a robot is safe');
      await expectText(page, 'Europe/London');
      await screenshot('site-overview.png');
      await page.getByRole('link', { name: 'Read the full caution' }).click();
      await expectText(page, 'works independently of localization');
    },
  },
  {
    name: 'when a site manager creates a robot token, then the secret is shown once with a copy button, and revoking asks first',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.siteManager);
      await page.getByRole('link', { name: 'Tarrow Heath Cold Store' }).click();
      await page.getByRole('link', { name: /Robots/ }).first().click();
      await page.getByRole('heading', { name: 'Ingest tokens' }).first().waitFor();
      const firstRobot = page.locator('article').first();
      await firstRobot.getByPlaceholder(/Label/).fill('controller in cabinet 2');
      await firstRobot.getByRole('button', { name: 'Create token' }).click();
      const dialog = page.getByRole('dialog');
      await dialog.waitFor();
      await expectText(page, 'This secret is shown only once');
      const secret = await dialog.locator('#token-secret').inputValue();
      assert(secret.length >= 16, `expected a token secret, got “${secret}”`);
      await dialog.getByRole('button', { name: /Copy/ }).waitFor();
      await screenshot('token-secret.png', { fullPage: false });
      await dialog.getByRole('button', { name: 'I have stored it' }).click();
      await dialog.waitFor({ state: 'hidden' });
      assert((await page.getByText(secret).count()) === 0, 'the secret is still visible after closing the dialog');
      await firstRobot.getByText('controller in cabinet 2').waitFor();
      await firstRobot.getByRole('button', { name: 'Revoke token controller in cabinet 2' }).click();
      await page.getByRole('alertdialog').or(page.getByRole('dialog')).getByRole('button', { name: 'Revoke token' }).click();
      await expectText(page, 'Token revoked');
      await screenshot('site-robots.png');
    },
  },
  {
    name: 'when loading the sites fails, then the overview says so and “Try again” loads them',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.siteManager);
      // Answer the next sites request the way a failing server would, then let requests through again.
      await page.route('**/api/sites', (route) => route.fulfill({ status: 503, contentType: 'application/json', body: JSON.stringify({ error: { code: 'unavailable', message: 'The database is busy; please try again.' } }) }), { times: 1 });
      await page.reload();
      await expectText(page, 'The sites could not be loaded');
      await expectText(page, 'The database is busy; please try again.');
      await screenshot('fleet-error.png');
      await page.getByRole('button', { name: 'Try again' }).click();
      await expectText(page, 'Fennick Cross DC');
    },
  },
];
