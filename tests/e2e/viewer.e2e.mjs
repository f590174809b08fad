import { accounts, assert, expectText, signIn } from './helpers.mjs';

export const tests = [
  {
    name: 'when a viewer opens a site’s robots, then mounts are shown and token management is not',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.viewer);
      await page.getByRole('link', { name: 'Fennick Cross DC' }).click();
      await page.getByRole('link', { name: /Robots/ }).first().click();
      await page.locator('article').first().waitFor();
      await expectText(page, 'Scanner mounts');
      assert((await page.getByRole('heading', { name: 'Ingest tokens' }).count()) === 0, 'a viewer sees the token panel');
      assert((await page.getByRole('button', { name: 'Create token' }).count()) === 0, 'a viewer sees “Create token”');
      assert((await page.getByRole('button', { name: /Revoke/ }).count()) === 0, 'a viewer sees a revoke button');
      assert((await page.getByRole('button', { name: 'Add robot' }).count()) === 0, 'a viewer sees “Add robot”');
      await screenshot('viewer-robots.png');
    },
  },
  {
    name: 'when a viewer opens the admin address, then the not-found page is shown and no Admin link exists',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.viewer);
      assert((await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Admin' }).count()) === 0, 'a viewer sees the Admin link');
      await page.goto(`${baseUrl}/admin/users`);
      await page.getByRole('heading', { name: 'This page is not here' }).waitFor();
      await screenshot('not-found.png');
    },
  },
];
