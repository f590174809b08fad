import { accounts, assert, expectText, signIn } from './helpers.mjs';

export const tests = [
  {
    name: 'when an admin opens Admin and invites someone, then the users list and the invitation link are shown',
    async run({ page, baseUrl, screenshot, shared }) {
      await signIn(page, baseUrl, accounts.admin);
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Admin' }).click();
      await page.getByRole('table', { name: 'Users' }).waitFor();
      await expectText(page, 'nadia.manager@ambergate.example');
      await expectText(page, 'priya.manager@corvane.example');
      await screenshot('admin-users.png');

      await page.getByRole('navigation', { name: 'Admin sections' }).getByRole('link', { name: 'Invitations' }).click();
      await page.locator('#invite-email').fill('hollis.reader@ambergate.example');
      await page.locator('#invite-name').fill('Hollis Reader');
      await page.locator('#invite-organization').click();
      await page.getByRole('option', { name: /Ambergate Provisions/ }).click();
      await page.locator('#invite-role').click();
      await page.getByRole('option', { name: 'Viewer' }).click();
      await page.getByRole('button', { name: 'Create invitation' }).click();
      const link = page.getByTestId('invitation-link');
      await link.waitFor();
      const url = await link.inputValue();
      assert(/\/invite\/[^/]+$/.test(url), `expected an invitation link, got “${url}”`);
      await page.getByRole('table', { name: 'Pending invitations' }).getByText('hollis.reader@ambergate.example').waitFor();
      await screenshot('admin.png');
      shared.invitationLink = url;
    },
  },
  {
    name: 'when the invited person opens the link and sets a password twice, then they are signed in as a viewer',
    async run({ page, baseUrl, screenshot, shared }) {
      assert(typeof shared.invitationLink === 'string', 'the invitation test did not leave a link');
      // The server builds the link from its own base URL; open the same path on this run's server.
      await page.goto(`${baseUrl}${new URL(shared.invitationLink).pathname}`);
      await expectText(page, 'Hollis Reader');
      await page.locator('#invite-password-new').fill('short');
      await page.locator('#invite-password-repeat').fill('short');
      await page.getByRole('button', { name: 'Set password and sign in' }).click();
      await expectText(page, 'at least 12 characters');
      await screenshot('invite-accept.png');
      await page.locator('#invite-password-new').fill('lantern orchard 2026');
      await page.locator('#invite-password-repeat').fill('lantern orchard 2026');
      await page.getByRole('button', { name: 'Set password and sign in' }).click();
      await page.getByRole('heading', { level: 1, name: /Sites of Ambergate Provisions/ }).waitFor();
      await expectText(page, 'Hollis Reader');
    },
  },
  {
    name: 'when an admin looks at the audit log, then the invitation appears there',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.admin);
      await page.goto(`${baseUrl}/admin/audit`);
      await page.getByRole('table', { name: 'Audit log' }).waitFor();
      await expectText(page, 'user.invite');
      await screenshot('admin-audit.png');
    },
  },
  {
    name: 'when an admin opens Job runs and backs up now, then every job kind is shown and the backup run is listed with its file',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.admin);
      await page.goto(`${baseUrl}/admin/job-runs`);
      const kinds = page.getByRole('region', { name: 'Run now' });
      for (const kind of ['Change detection', 'Evidence retention', 'Monthly reports', 'Database backup']) {
        await kinds.getByRole('article', { name: kind }).waitFor();
      }
      const backup = kinds.getByRole('article', { name: 'Database backup' });
      await backup.getByRole('button', { name: 'Back up now' }).click();
      const table = page.getByRole('table', { name: 'Job runs' });
      const row = table.locator('tbody tr').filter({ hasText: 'Database backup' }).filter({ hasText: 'succeeded' }).first();
      await row.waitFor({ timeout: 60_000 });
      const text = await row.innerText();
      assert(/saved driftline-\d{8}T\d{6}Z\.sqlite \([\d.]+ [KMG]?B, integrity check ok\)/.test(text), `expected the backup file and its size in the row, got “${text}”`);
      await backup.getByText('succeeded').waitFor();
      await screenshot('admin-job-runs.png');
    },
  },
  {
    name: "when an admin filters the overview by customer and text, then only the matching sites remain",
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.admin);
      await page.getByRole('heading', { level: 1, name: 'All sites' }).waitFor();
      const rows = page.getByRole('table', { name: 'Sites' }).locator('tbody tr');
      await expectText(page, 'Lowen Harbour Hub');
      assert((await rows.count()) === 5, `expected all 5 demo sites, found ${await rows.count()}`);
      await page.getByRole('combobox', { name: 'Filter by customer' }).click();
      await page.getByRole('option', { name: 'Corvane Parts & Supply' }).click();
      await expectText(page, '3 of 5 sites');
      assert((await page.getByText('Fennick Cross DC').count()) === 0, 'an Ambergate site is still listed under the Corvane filter');
      await page.getByRole('searchbox', { name: 'Search sites' }).or(page.getByLabel('Search sites')).first().fill('brindle');
      await expectText(page, '1 of 5 sites');
      await expectText(page, 'Brindle Ford Crossdock');
      await screenshot('fleet-operator.png');
    },
  },
];
