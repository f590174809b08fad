// The customer-reader journey (JOURNEYS.md "Customer reader", with "Admin 3. Outbox"), on the demo data:
// an admin sends last month's report of Ambergate Provisions and reads the finished e-mail in the
// outbox; the reader, the demo viewer Owen, follows the e-mail's link into the app and reads the same
// figures read-only, then follows its unsubscribe link and unsubscribes with one click; the admin sees
// him unsubscribed and a later send leaves him out. (Running the monthly job twice is tested over SMTP in
// tests/api/report-smtp.test.ts: the browser has no "run now" for the report job.)
import { accounts, apiSignIn, assert, getJson, sameOrigin, signIn, waitForDetection } from './helpers.mjs';

const READER = accounts.viewer.email;
// A second recipient who stays subscribed, so that the later send shows who is left out; removed at the end.
const OTHER = 'dock.office@ambergate.example';

/** The captured-mail rows of the delivery queue to `email`, through the admin's session. */
async function reportMailTo(api, baseUrl, email) {
  const { mail } = await getJson(api, `${baseUrl}/api/mail?limit=200`);
  return mail.filter((m) => m.kind === 'report' && m.to.email === email);
}

/** Waits until every queued report mail to `email` is sent; returns them. */
async function waitForSent(page, baseUrl, email, count) {
  for (let i = 0; i < 80; i++) {
    const rows = await reportMailTo(page.request, baseUrl, email);
    if (rows.length >= count && rows.every((m) => m.status === 'sent')) return rows;
    await page.waitForTimeout(250);
  }
  throw new Error(`the report mail to ${email} was not delivered (${JSON.stringify(await reportMailTo(page.request, baseUrl, email))})`);
}

/** Picks the option `label` of the PrimeVue select with the test id. */
async function choose(page, testId, label) {
  await page.getByTestId(testId).click();
  await page.getByRole('listbox').getByRole('option', { name: label, exact: true }).click();
  await page.getByRole('listbox').waitFor({ state: 'detached' });
}

export const tests = [
  {
    name: 'when an admin sends last month’s report of a demo customer, then the outbox shows the finished e-mail, its reader reads the same figures in the app and unsubscribes with one click, and a later send leaves him out',
    async run({ page, context, baseUrl, screenshot }) {
      // The admin sends last month's report of Ambergate Provisions to the viewer and a second address.
      await signIn(page, baseUrl, accounts.admin);
      await waitForDetection(page.request, baseUrl);
      const { organizations } = await getJson(page.request, `${baseUrl}/api/organizations`);
      const ambergate = organizations.find((o) => o.name === 'Ambergate Provisions');
      assert(ambergate, 'no Ambergate Provisions organization in the demo');
      for (const email of [READER, OTHER]) {
        const added = await page.request.post(`${baseUrl}/api/organizations/${ambergate.id}/recipients`, { data: { email }, headers: sameOrigin(baseUrl) });
        assert(added.status() === 201, `adding ${email} answered ${added.status()}`);
      }
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Reports' }).click();
      await page.getByRole('heading', { level: 1, name: 'Monthly reports' }).waitFor();
      await choose(page, 'report-org', 'Ambergate Provisions');
      const lastMonth = (await page.getByTestId('report-month').innerText()).trim();
      await page.frameLocator('[data-testid="report-frame"]').getByText(`Map health in ${lastMonth}`).first().waitFor({ timeout: 60_000 });
      await page.getByTestId('report-send').click();
      const note = page.getByTestId('report-sent-note');
      await note.waitFor();
      assert(/Queued for/.test(await note.innerText()), `the send says “${await note.innerText()}”`);
      await waitForSent(page, baseUrl, READER, 1);
      const subject = `Map health in ${lastMonth} · Ambergate Provisions`;

      // Admin → Outbox: the reader's copy, rendered, with its map picture, text part and attachments.
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Admin' }).click();
      await page.getByRole('navigation', { name: 'Admin sections' }).getByRole('link', { name: 'Outbox' }).click();
      const item = page.getByRole('list', { name: 'Captured mail' }).getByRole('button').filter({ hasText: subject }).filter({ hasText: READER });
      await item.first().click();
      await page.getByRole('heading', { level: 2, name: subject }).waitFor();
      const frame = page.frameLocator('iframe[title="Message as HTML"]');
      await frame.getByText('does not certify anything').waitFor();
      const mailText = (await frame.locator('body').innerText()).replace(/\s+/g, ' ');
      for (const site of ['Fennick Cross DC', 'Tarrow Heath Cold Store']) assert(mailText.includes(site), `the e-mail names ${site}: “${mailText.slice(0, 300)}”`);
      const map = frame.locator('img[alt="Map of Fennick Cross DC with its open zones outlined"]');
      await map.waitFor();
      await map.evaluate((img) => (img.complete ? null : new Promise((resolve) => img.addEventListener('load', resolve, { once: true }))));
      assert((await map.evaluate((img) => img.naturalWidth)) > 100, 'the map picture of Fennick Cross DC did not load in the outbox');
      const attachments = await page.getByRole('list', { name: 'Attachments' }).innerText();
      assert(/fennick-cross-dc-map\.png/.test(attachments) && /image\/png/.test(attachments) && /inline/.test(attachments), `the attachments list reads “${attachments}”`);
      await page.getByText('Plain text', { exact: true }).click();
      const textPart = await page.locator('.outbox-view__text pre').innerText();
      assert(textPart.includes('== Fennick Cross DC ==') && textPart.includes('Unsubscribe: '), 'the plain-text part is listed with the sites and the unsubscribe link');
      // The score of the e-mail's first site block, as the reader sees it.
      const mailScore = /Fennick Cross DC\s+(\d+\.\d) %/.exec(mailText)?.[1];
      assert(mailScore, `no score for Fennick Cross DC in the e-mail: “${mailText.slice(0, 400)}”`);
      const reportHref = await frame.getByRole('link', { name: 'Read these figures in Driftline' }).getAttribute('href');
      const unsubscribeHref = await frame.getByRole('link', { name: 'Unsubscribe' }).getAttribute('href');
      assert(reportHref?.startsWith(`${baseUrl}/reports/${ambergate.id}/`), `the e-mail's app link is ${reportHref}`);
      assert(unsubscribeHref?.startsWith(`${baseUrl}/unsubscribe/`), `the e-mail's unsubscribe link is ${unsubscribeHref}`);
      await screenshot('customer-reader-outbox.png');

      // The reader follows the app link: sign-in first, then back to the read-only figures.
      await context.clearCookies();
      await page.goto(reportHref);
      await page.waitForURL(/\/sign-in\?next=/);
      await page.locator('#sign-in-email').fill(accounts.viewer.email);
      await page.locator('#sign-in-password').fill(accounts.viewer.password);
      await page.getByRole('button', { name: 'Sign in' }).click();
      await page.getByRole('heading', { level: 1, name: `Map health in ${lastMonth}` }).waitFor();
      assert(new URL(page.url()).pathname === new URL(reportHref).pathname, `after sign-in the reader is at ${page.url()}`);
      const fennick = page.getByRole('article', { name: 'Fennick Cross DC' });
      const appScore = (await fennick.getByTestId('report-site-score').innerText()).trim();
      assert(appScore === `${mailScore} %`, `the app shows ${appScore} for Fennick Cross DC, the e-mail ${mailScore} %`);
      await page.getByRole('article', { name: 'Tarrow Heath Cold Store' }).waitFor();
      const picture = fennick.getByRole('img', { name: 'Map of Fennick Cross DC with its open zones outlined' });
      assert((await picture.evaluate((img) => img.naturalWidth)) > 100, 'the map picture of Fennick Cross DC is not drawn on the read-only page');
      for (const control of ['Send now', 'Add']) assert((await page.getByRole('button', { name: control }).count()) === 0, `the reader sees “${control}”`);
      await screenshot('customer-reader-figures.png');

      // The reader follows the unsubscribe link: the page asks, one click unsubscribes; opening it again says so.
      await page.goto(unsubscribeHref);
      await page.getByTestId('unsubscribe').getByText(READER).waitFor();
      assert((await page.getByTestId('unsubscribe').innerText()).includes('Ambergate Provisions'), 'the unsubscribe page names the organization');
      const before = (await getJson(page.request, new URL(unsubscribeHref.replace('/unsubscribe/', '/api/unsubscribe/')).href)).unsubscribedAt;
      assert(before === null, 'opening the unsubscribe page unsubscribed already');
      await screenshot('customer-reader-unsubscribe.png');
      await page.getByTestId('unsubscribe-button').click();
      await page.getByRole('heading', { level: 1, name: 'You are unsubscribed' }).waitFor();
      assert((await page.getByTestId('unsubscribe-done').innerText()).includes('will no longer receive'), 'the page does not confirm the unsubscribe');
      await screenshot('customer-reader-unsubscribed.png');
      await page.reload();
      await page.getByRole('heading', { level: 1, name: 'Already unsubscribed' }).waitFor();

      // The admin sees him unsubscribed; a send of the month before goes to the other recipient only.
      await context.clearCookies();
      await apiSignIn(page, baseUrl, accounts.admin);
      await page.goto(`${baseUrl}/reports`);
      await choose(page, 'report-org', 'Ambergate Provisions');
      const row = page.getByTestId('report-recipients').getByRole('listitem').filter({ hasText: READER });
      await row.getByText('unsubscribed').waitFor();
      await page.getByTestId('report-month').click();
      const monthBefore = (await page.getByRole('listbox').getByRole('option').nth(1).innerText()).trim();
      await page.keyboard.press('Escape');
      await page.getByRole('listbox').waitFor({ state: 'detached' });
      await choose(page, 'report-month', monthBefore);
      await page.getByTestId('report-send').click();
      await page.getByTestId('report-sent-note').filter({ hasText: 'Queued for 1 recipient.' }).waitFor({ timeout: 30_000 });
      await waitForSent(page, baseUrl, OTHER, 2);
      const readerMail = await reportMailTo(page.request, baseUrl, READER);
      assert(readerMail.length === 1, `the unsubscribed reader has ${readerMail.length} report mails, not 1`);
      await screenshot('customer-reader-admin-after.png', { fullPage: false });

      const { recipients } = await getJson(page.request, `${baseUrl}/api/organizations/${ambergate.id}/recipients`);
      const other = recipients.find((r) => r.email === OTHER);
      const removed = await page.request.delete(`${baseUrl}/api/organizations/${ambergate.id}/recipients/${other.id}`, { headers: sameOrigin(baseUrl) });
      assert(removed.status() === 204, `removing ${OTHER} answered ${removed.status()}`);
    },
  },
];
