import { accounts, apiSignIn, assert, expectText, getJson, sameOrigin } from './helpers.mjs';

export const tests = [
  {
    name: 'when an admin invites someone, then the invitation mail is delivered to the capture server and readable in the Outbox',
    async run({ page, baseUrl, screenshot }) {
      await apiSignIn(page, baseUrl, accounts.admin);
      const orgs = await getJson(page.request, `${baseUrl}/api/organizations`);
      const ambergate = (orgs.organizations ?? orgs).find((o) => o.name === 'Ambergate Provisions');
      assert(ambergate, 'no Ambergate Provisions organization in the demo');
      const invite = await page.request.post(`${baseUrl}/api/invitations`, {
        data: { email: 'odile.reader@ambergate.example', name: 'Odile Reader', role: 'viewer', organizationId: ambergate.id },
        headers: sameOrigin(baseUrl),
      });
      assert(invite.status() === 201, `inviting answered ${invite.status()}`);
      // Sent right after queueing; allow a few seconds.
      let sent = false;
      for (let i = 0; i < 40 && !sent; i++) {
        const { mail } = await getJson(page.request, `${baseUrl}/api/mail?status=sent`);
        sent = mail.some((m) => m.to.email === 'odile.reader@ambergate.example');
        if (!sent) await page.waitForTimeout(250);
      }
      assert(sent, 'the invitation mail was not delivered');

      await page.goto(`${baseUrl}/admin/outbox`);
      await page.getByRole('list', { name: 'Captured mail' }).getByText('You are invited to Ambergate Provisions on Driftline').first().click();
      const frame = page.frameLocator('iframe[title="Message as HTML"]');
      await frame.getByText('Set your password').waitFor();
      await expectText(page, 'odile.reader@ambergate.example');
      const sandbox = await page.locator('iframe[title="Message as HTML"]').getAttribute('sandbox');
      assert(sandbox !== null && !sandbox.includes('allow-scripts'), `the message frame must not run scripts (sandbox="${sandbox}")`);
      await page.getByRole('table').getByText('sent').first().waitFor();
      await screenshot('admin-outbox.png');
    },
  },
];
