// The customer-reader journey's monthly report from the admin's side (JOURNEYS.md "Customer reader"):
// once the demo's detection has run, an admin opens Reports, previews last month's report of the demo
// customer Ambergate Provisions in its sandboxed frame, adds a recipient and sends the report now.
import { accounts, assert, signIn, waitForDetection } from './helpers.mjs';

export const tests = [
  {
    name: 'when an admin previews last month’s report of a demo customer and sends it, then the frame shows its sites and the send is queued',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.admin);
      await waitForDetection(page.request, baseUrl);
      const errors = [];
      page.on('pageerror', (e) => errors.push(e.message));
      page.on('console', (m) => m.type() === 'error' && errors.push(m.text()));
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Reports' }).click();
      await page.waitForURL(/\/reports$/, { timeout: 10_000 }).catch(() => { throw new Error(`the Reports link did not open /reports (${page.url()}; ${errors.join(' | ')})`); });
      await page.getByRole('heading', { level: 1, name: 'Monthly reports' }).waitFor();

      const frame = page.frameLocator('[data-testid="report-frame"]');
      await frame.getByText('Map health in').first().waitFor({ timeout: 60_000 });
      const body = (await frame.locator('body').innerText()).replace(/\s+/g, ' ');
      assert(body.includes('Fennick Cross DC') && body.includes('Tarrow Heath Cold Store'), `the preview names Ambergate's two sites: “${body.slice(0, 300)}”`);
      assert(body.includes('does not certify anything'), 'the preview ends with the safety caution');
      const sandbox = await page.locator('[data-testid="report-frame"]').getAttribute('sandbox');
      assert(sandbox === '', `the preview frame is sandboxed without scripts (sandbox="${sandbox}")`);
      const map = frame.locator('img[alt^="Map of Fennick Cross DC"]');
      await map.waitFor();
      assert((await map.evaluate((img) => img.naturalWidth)) > 100, 'the map picture of Fennick Cross DC is drawn');

      await page.getByLabel('E-mail address to add').fill('night.lead@ambergate.example');
      await page.getByRole('button', { name: 'Add' }).click();
      await page.getByTestId('report-recipients').getByText('night.lead@ambergate.example').waitFor();
      await page.getByTestId('report-send').click();
      const note = page.getByTestId('report-sent-note');
      await note.waitFor();
      const said = await note.innerText();
      assert(/Queued for 1 recipient\./.test(said), `the send says “${said}”`);
      // The newest row is last month's (other files may have sent earlier months on the shared demo server).
      await page.getByTestId('report-history').getByRole('listitem').first().filter({ hasText: '· Sent' }).waitFor();
      await screenshot('reports-preview.png', { fullPage: false });
    },
  },
];
