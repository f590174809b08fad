import { accounts, apiSignIn, assert, expectText, getJson, sameOrigin, signIn, waitForDetection } from './helpers.mjs';

// A person of our own (invited and joined here), so that no demo account's password changes for later files.
const person = { email: 'marit.quayside@ambergate.example', name: 'Marit Quayside', password: 'lantern-over-the-dock-4' };
const NEW_PASSWORD = 'copper-gulls-at-noon-8';

/** Invites the person as an admin and joins through the invitation with their first password; leaves the browser signed out. */
async function joinPerson(page, context, baseUrl) {
  await apiSignIn(page, baseUrl, accounts.admin);
  // While the demo loads its weeks of scans the server answers pages slowly; start once it is done, as the other files do.
  await waitForDetection(page.request, baseUrl);
  const orgs = await getJson(page.request, `${baseUrl}/api/organizations`);
  const ambergate = (orgs.organizations ?? orgs).find((o) => o.name === 'Ambergate Provisions');
  assert(ambergate, 'no Ambergate Provisions organization in the demo');
  const invite = await page.request.post(`${baseUrl}/api/invitations`, {
    data: { email: person.email, name: person.name, role: 'viewer', organizationId: ambergate.id },
    headers: sameOrigin(baseUrl),
  });
  assert(invite.status() === 201, `inviting answered ${invite.status()}`);
  const token = (await invite.json()).link.split('/').pop();
  const accept = await page.request.post(`${baseUrl}/api/invitations/token/${token}/accept`, { data: { password: person.password }, headers: sameOrigin(baseUrl) });
  assert(accept.ok(), `accepting the invitation answered ${accept.status()}`);
  await context.clearCookies();
}

/** Reads the newest reset link mailed to the person from the admin's outbox (captured over SMTP); leaves the browser signed out. */
async function resetLinkFromOutbox(page, context, baseUrl) {
  await apiSignIn(page, baseUrl, accounts.admin);
  try {
    // Sent right after queueing; allow a few seconds.
    for (let i = 0; i < 40; i++) {
      const { messages } = await getJson(page.request, `${baseUrl}/api/outbox`);
      const mail = messages.find((m) => m.subject === 'Reset your Driftline password' && m.to.includes(person.email));
      if (mail) {
        const { message } = await getJson(page.request, `${baseUrl}/api/outbox/${mail.id}`);
        const link = /https?:\/\/\S+\/reset\/[A-Za-z0-9_-]+/.exec(message.text)?.[0];
        assert(link, 'the reset mail has no reset link in its text');
        assert(message.text.includes('The link works once, for one hour'), 'the reset mail does not say the link works for one hour');
        return new URL(link).pathname;
      }
      await page.waitForTimeout(250);
    }
    throw new Error(`no reset mail to ${person.email} reached the outbox`);
  } finally {
    await context.clearCookies();
  }
}

export const tests = [
  {
    name: 'when someone forgets their password, then the mailed link lets them choose a new one once, and they sign in with it',
    async run({ page, context, baseUrl, screenshot }) {
      await joinPerson(page, context, baseUrl);

      // Sign-in page → Forgot password?, with the address typed there carried over.
      await page.goto(`${baseUrl}/sign-in`);
      await page.locator('#sign-in-email').fill(person.email);
      await page.getByRole('link', { name: 'Forgot password?' }).click();
      await page.getByRole('heading', { name: 'Forgot your password?' }).waitFor();
      const carried = await page.locator('#forgot-email').inputValue();
      assert(carried === person.email, `the reset form should start with the typed address, has “${carried}”`);
      await screenshot('password-reset-request.png');
      await page.getByRole('button', { name: 'Send reset link' }).click();
      await expectText(page, 'If an account exists for that address, we have sent a link to reset its password. It works for one hour.');
      await screenshot('password-reset-sent.png');

      const path = await resetLinkFromOutbox(page, context, baseUrl);
      await page.goto(`${baseUrl}${path}`);
      await page.getByRole('heading', { name: 'Choose a new password' }).waitFor();
      await page.locator('#reset-password-new').fill(NEW_PASSWORD);
      await page.locator('#reset-password-repeat').fill(`${NEW_PASSWORD}x`);
      await page.getByRole('button', { name: 'Set new password' }).click();
      await expectText(page, 'The two passwords are not the same.');
      await page.locator('#reset-password-repeat').fill(NEW_PASSWORD);
      await screenshot('password-reset-form.png');
      await page.getByRole('button', { name: 'Set new password' }).click();

      await page.waitForURL(/\/sign-in\?notice=password-reset/);
      await expectText(page, 'Your password has been changed and every device was signed out.');
      await screenshot('password-reset-done.png');

      // Single use: the same link now says it is dead and offers a new one.
      await page.goto(`${baseUrl}${path}`);
      await expectText(page, 'This reset link is not valid or has expired.');
      await page.getByRole('link', { name: 'Ask for a new link' }).waitFor();
      await screenshot('password-reset-dead-link.png');

      // The old password no longer opens the account; the new one does.
      await page.goto(`${baseUrl}/sign-in`);
      await page.locator('#sign-in-email').fill(person.email);
      await page.locator('#sign-in-password').fill(person.password);
      await page.getByRole('button', { name: 'Sign in' }).click();
      await expectText(page, 'The e-mail or password is not correct.');
      await signIn(page, baseUrl, { email: person.email, password: NEW_PASSWORD });
    },
  },
];
