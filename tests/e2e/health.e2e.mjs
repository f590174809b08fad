// Map health in the browser, on the demo's simulated scans: the overview's scores and bands, the
// site header's sentence and forecast, the zones table and a zone's panel with acknowledge and
// dismiss, the robots tab's scanner flag (the demo turns AMR-02's front scanner at Fennick Cross
// by 1.4° on purpose) and the admin's job runs. The demo loads its scans in the background after
// the first start, then runs detection for every site; the first test waits for that.
import { accounts, apiSignIn, assert, expectText, openSite, openTab, signIn, waitForDetection } from './helpers.mjs';

const flaggedSite = 'Fennick Cross DC';

export const tests = [
  {
    name: 'when the demo has loaded and detection ran, then the overview shows every site’s score, band and open zones',
    async run({ page, baseUrl, screenshot }) {
      await apiSignIn(page, baseUrl, accounts.admin);
      await waitForDetection(page.request, baseUrl);
      await page.context().clearCookies();

      await signIn(page, baseUrl, accounts.siteManager);
      const table = page.getByRole('table', { name: 'Sites' });
      await table.waitFor();
      const rows = table.locator('tbody tr');
      assert((await rows.count()) === 2, `expected the site manager's 2 sites, found ${await rows.count()}`);
      for (let k = 0; k < 2; k++) {
        const text = await rows.nth(k).innerText();
        assert(/\d+\.\d %/.test(text), `row ${k + 1} shows no score: “${text.replace(/\s+/g, ' ')}”`);
        assert(/good|watch|remap advised/.test(text), `row ${k + 1} shows no band: “${text.replace(/\s+/g, ' ')}”`);
        assert(/[▲▼]|no change/.test(text), `row ${k + 1} shows no 7-day change`);
        assert(/m²/.test(text), `row ${k + 1} shows no changed area`);
      }
      assert((await table.getByText('no data yet').count()) === 0, 'a site with scans still says “no data yet”');
      assert((await table.getByRole('img', { name: /Health score per day/ }).count()) === 2, 'expected a 30-day sparkline per site');
      // Worst score first: the first row's score is not above the second's.
      const scores = await rows.evaluateAll((trs) => trs.map((tr) => Number((tr.innerText.match(/(\d+\.\d) %/) ?? [])[1])));
      assert(scores[0] <= scores[1], `expected the worst score first, got ${scores.join(' then ')}`);
      await screenshot('overview-health.png');
    },
  },
  {
    name: 'when a site manager opens the flagged site, then the header says what the score stands for and when it reaches “remap advised”',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.siteManager);
      await openSite(page, flaggedSite);
      await expectText(page, 'The map explains');
      await expectText(page, '% of laser returns over the last 7 days.');
      const header = page.locator('header.site-header');
      const forecast = await header.locator('.site-header__forecast').innerText();
      assert(/points\/day|Too few days/.test(forecast), `the forecast reads “${forecast}”`);
      assert(/remap advised|No downward trend|Too few days/.test(forecast), `the forecast names no band or trend: “${forecast}”`);
      await expectText(page, 'It does not certify that a site, a map or a robot is safe');
      await header.getByRole('img', { name: /Health score per day/ }).waitFor();
      await screenshot('site-header.png', { fullPage: false });
    },
  },
  {
    name: 'when a site manager opens a zone and acknowledges it with a note, then the table shows the new status',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.siteManager);
      await openSite(page, flaggedSite);
      await openTab(page, 'Zones');
      const table = page.getByRole('table', { name: 'Zones' });
      await table.waitFor();
      const openRow = table.locator('tbody tr').filter({ has: page.getByText('open', { exact: true }) }).first();
      await openRow.waitFor();
      const label = (await openRow.locator('td').first().innerText()).trim();
      assert(/^Z-\d+$/.test(label), `expected a zone label in the first column, got “${label}”`);
      await screenshot('zones.png');

      await openRow.click();
      const panel = page.getByRole('dialog');
      await panel.waitFor();
      const sentence = await panel.getByTestId('zone-sentence').innerText();
      assert(/^(new|missing|unmapped) structure, (persistent|intermittent), \d+(\.\d)? m², seen on \d+ of \d+ days? since \d{1,2} \w{3}( \d{4})?, hit rate \d\.\d\d \(\d\.\d\d–\d\.\d\d\)$/.test(sentence), `the zone sentence reads “${sentence}”`);
      await panel.locator('canvas').waitFor();
      await panel.getByRole('button', { name: 'Acknowledge' }).click();
      await panel.locator('#zone-ack-note').fill('Racking moved on purpose for the peak season; remap in January.');
      await screenshot('zone-panel.png', { fullPage: false });
      await panel.getByRole('button', { name: 'Acknowledge zone' }).click();
      await expectText(page, `${label} acknowledged`);
      await panel.getByText('“Racking moved on purpose for the peak season; remap in January.”').waitFor();
      await panel.getByRole('button', { name: 'Acknowledge' }).waitFor({ state: 'detached' });

      await page.keyboard.press('Escape');
      await panel.waitFor({ state: 'hidden' });
      const row = table.locator('tbody tr').filter({ has: page.getByRole('button', { name: `Open zone ${label}`, exact: true }) });
      await row.getByText('acknowledged').waitFor();
    },
  },
  {
    name: 'when a site manager opens Robots, then AMR-02’s front scanner is flagged as turned and can be cleared with a note',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.siteManager);
      await openSite(page, flaggedSite);
      await openTab(page, 'Robots');
      const card = page.locator('article').filter({ has: page.getByRole('heading', { name: 'AMR-02', exact: true }) });
      await card.waitFor();
      const summary = await card.getByTestId('flag-summary').innerText();
      assert(summary.startsWith('Scanner check advised'), `the flag reads “${summary}”`);
      assert(/turned \d+(\.\d)?°/.test(summary), `the flag does not say the mount appears turned: “${summary}”`);
      await card.getByRole('table').filter({ hasText: 'Fleet median' }).waitFor();
      await screenshot('robots-flag.png');

      await card.getByRole('button', { name: 'Clear after maintenance' }).click();
      await card.getByRole('button', { name: 'Clear flag' }).click();
      await card.getByText('Say what was done').waitFor();
      await card.getByLabel('What was done').fill('Front window cleaned, mount re-aligned to the bracket marks.');
      await card.getByRole('button', { name: 'Clear flag' }).click();
      await expectText(page, 'Scanner flag cleared');
      await card.getByTestId('flag-summary').waitFor({ state: 'detached' });
      await card.getByText('“Front window cleaned, mount re-aligned to the bracket marks.”').waitFor();
      await card.getByText(/front scanner cleared .* by Nadia/).waitFor();
    },
  },
  {
    name: 'when a viewer opens the zones and a zone, then there is no action button',
    async run({ page, baseUrl }) {
      await signIn(page, baseUrl, accounts.viewer);
      await openSite(page, flaggedSite);
      await openTab(page, 'Zones');
      const table = page.getByRole('table', { name: 'Zones' });
      await table.locator('tbody tr').first().waitFor();
      await table.locator('tbody tr').first().click();
      const panel = page.getByRole('dialog');
      await panel.getByTestId('zone-sentence').waitFor();
      for (const name of ['Acknowledge', 'Dismiss', 'Acknowledge zone', 'Dismiss zone']) {
        assert((await panel.getByRole('button', { name, exact: true }).count()) === 0, `a viewer sees “${name}”`);
      }
    },
  },
  {
    name: 'when a mapper filters the overview to “remap advised” and dismisses a zone as a volatile area, then it shows as dismissed',
    async run({ page, baseUrl }) {
      await signIn(page, baseUrl, accounts.mapper);
      await page.getByRole('combobox', { name: 'Filter by health band' }).click();
      await page.getByRole('option', { name: 'remap advised' }).click();
      const table = page.getByRole('table', { name: 'Sites' });
      const empty = page.getByText('No site matches these filters');
      await table.or(empty).first().waitFor();
      if (await table.isVisible()) {
        const texts = await table.locator('tbody tr').allInnerTexts();
        assert(texts.length > 0 && texts.every((t) => t.includes('remap advised')), `the filter lets other bands through: ${texts.map((t) => t.replace(/\s+/g, ' ')).join(' | ')}`);
      } else {
        await expectText(page, 'No site is in the ‘remap advised’ band right now');
      }

      await page.goto(`${baseUrl}/`);
      await openSite(page, flaggedSite);
      await openTab(page, 'Zones');
      const zones = page.getByRole('table', { name: 'Zones' });
      const row = zones.locator('tbody tr').filter({ has: page.getByText('open', { exact: true }) }).first();
      await row.waitFor();
      const label = (await row.locator('td').first().innerText()).trim();
      await row.click();
      const panel = page.getByRole('dialog');
      await panel.getByTestId('zone-sentence').waitFor();
      assert((await panel.getByRole('button', { name: 'Acknowledge', exact: true }).count()) === 0, 'a mapper sees “Acknowledge”');
      await panel.getByRole('button', { name: 'Dismiss', exact: true }).click();
      await panel.getByRole('button', { name: 'volatile area' }).click();
      assert((await panel.locator('#zone-dismiss-reason').inputValue()) === 'volatile area', 'the suggestion did not fill in the reason');
      await panel.getByRole('button', { name: 'Dismiss zone' }).click();
      await expectText(page, `${label} dismissed`);
      await page.keyboard.press('Escape');
      // The default filter lists zones still to deal with, so the dismissed zone leaves it; show dismissed ones.
      await page.locator('#zone-filter-status').click();
      await page.getByRole('option', { name: 'dismissed' }).click();
      await zones.locator('tbody tr').filter({ has: page.getByRole('button', { name: `Open zone ${label}`, exact: true }) }).getByText('dismissed').waitFor();
    },
  },
  {
    name: 'when an admin opens Job runs, then every site’s detection run is listed with its figures',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.admin);
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Admin' }).click();
      await page.getByRole('navigation', { name: 'Admin sections' }).getByRole('link', { name: 'Job runs' }).click();
      const table = page.getByRole('table', { name: 'Job runs' });
      await table.waitFor();
      await table.getByText('Change detection').first().waitFor();
      await table.getByText(flaggedSite).first().waitFor();
      await table.getByText(/\d+ days? on map v\d+: (\d+ zones? found|no changed zone found)/).first().waitFor();
      await table.getByText(/scanner check advised for AMR-02/).first().waitFor();
      await screenshot('job-runs.png');

      await page.getByRole('button', { name: 'Run retention now' }).click();
      await expectText(page, 'Evidence retention started');
      await table.getByText('Evidence retention').first().waitFor({ timeout: 20_000 });
      await table.locator('tbody tr').filter({ hasText: 'Evidence retention' }).first().getByText(/succeeded|failed/).waitFor({ timeout: 20_000 });
    },
  },
];
