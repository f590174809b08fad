// The docking step of the robot journey (JOURNEYS.md "Robot / integration" 2) on the demo data:
// a site manager opens the Docking tab of Fennick Cross DC, sees Charger bay 2 flagged as drifting
// (the demo knocks it five days before its last day), opens it and sees the verdict with its test,
// the chart of offsets against the tolerance band, and the station model drawn at 5 mm per cell.
// Then a robot posts a docking with its token and the station's count grows by one.
import { accounts, assert, expectText, openSite, openTab, sameOrigin, signIn, watchRequests } from './helpers.mjs';

const site = 'Fennick Cross DC';
const drifting = 'Charger bay 2';

/** Waits until the demo's docking stations of the site are seeded (they come first in the background seed). */
async function waitForStations(page, baseUrl) {
  const deadline = Date.now() + 3 * 60_000;
  let last = 'no answer yet';
  while (Date.now() < deadline) {
    const health = await (await page.request.get(`${baseUrl}/api/health`)).json();
    if (health.demo?.state === 'failed') throw new Error('the demo seeding failed (GET /api/health says demo.state "failed")');
    const sites = (await (await page.request.get(`${baseUrl}/api/sites`)).json()).sites ?? [];
    const fennick = sites.find((s) => s.name === site);
    if (fennick) {
      const list = await (await page.request.get(`${baseUrl}/api/sites/${fennick.id}/stations`)).json();
      const names = (list.stations ?? []).filter((s) => s.verdict.results > 0).map((s) => s.name);
      if (names.length >= 3) return fennick.id;
      last = `${names.length} stations with dockings so far`;
    }
    await page.waitForTimeout(2000);
  }
  throw new Error(`the demo's docking stations were not seeded within 3 minutes (${last})`);
}

export const tests = [
  {
    name: 'when a site manager opens the Docking tab of a demo site, then the drifting station is flagged and its page shows the verdict, the chart and the model',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.siteManager);
      const siteId = await waitForStations(page, baseUrl);
      const watch = watchRequests(page);

      // The tab, from the site's page.
      await openSite(page, site);
      // The site's overview counts the drifting stations and names the one.
      const card = page.locator('[data-card="docking"]');
      await card.getByText('of 3 stations drifting').waitFor();
      const cardText = (await card.innerText()).replace(/\s+/g, ' ');
      assert(cardText.includes('1 of 3 stations drifting') && cardText.includes(`${drifting} drifting Moved about`), `the overview's docking card reads “${cardText}”`);
      await card.scrollIntoViewIfNeeded();
      await screenshot('docking-overview.png', { fullPage: false });
      await openTab(page, 'Docking');
      const table = page.getByRole('table', { name: 'Docking stations' });
      await table.waitFor();
      await expectText(page, '1 of 3 stations drifting');
      const rows = table.locator('tbody tr');
      assert((await rows.count()) === 3, `the table lists ${await rows.count()} stations, not the demo's 3`);
      // Drifting stations come first, with their tag.
      const first = rows.first();
      assert((await first.getByRole('link').innerText()).trim() === drifting, `the first row is “${await first.getByRole('link').innerText()}”, not ${drifting}`);
      assert((await first.locator('[data-verdict]').getAttribute('data-verdict')) === 'drifting', `${drifting} is not tagged drifting`);
      assert((await rows.nth(1).locator('[data-verdict]').getAttribute('data-verdict')) === 'steady', 'the second station is not steady');
      await screenshot('docking-stations.png', { fullPage: false });

      // The station page.
      await first.getByRole('link', { name: drifting }).click();
      await page.getByRole('heading', { level: 2, name: drifting }).waitFor();
      assert(page.url().includes(`/sites/${siteId}/docking/`), `the station page has the address ${page.url()}`);
      const sentence = (await page.locator('[data-verdict-sentence]').innerText()).trim();
      assert(/^Moved about 1\d mm around \d{1,2} \w{3} \(Pettitt change-point test, p < 0\.001\): the median offset since then is 1\d mm, beyond the 10 mm tolerance\.$/.test(sentence), `the verdict reads “${sentence}”`);
      await expectText(page, 'product default: common practice for charging contacts (from memory)');
      // The chart: a drawn canvas with the tolerance band and the step in its legend.
      // PrimeVue's Chart loads Chart.js on demand; the figure says when it has drawn.
      await page.locator('[data-chart="docking-offsets"][data-chart-state="ready"]').waitFor({ timeout: 30_000 });
      const canvas = page.locator('[data-chart="docking-offsets"] canvas');
      const box = await canvas.boundingBox();
      assert(box && box.width > 400 && box.height > 200, `the chart canvas is ${box?.width}×${box?.height}`);
      const inked = await canvas.evaluate((el) => {
        const ctx = el.getContext('2d');
        const { data } = ctx.getImageData(0, 0, el.width, el.height);
        let n = 0;
        for (let k = 3; k < data.length; k += 4) if (data[k] > 0) n++;
        return n / (el.width * el.height);
      });
      assert(inked > 0.02, `the chart canvas is almost empty (${(inked * 100).toFixed(1)} % of pixels drawn)`);
      // The model: the preview image loaded at one pixel per cell, drawn 3 px per cell with a mm scale, and a close-up of its cells.
      const image = page.locator('[data-model="station"] img');
      await image.waitFor();
      await page.waitForFunction(() => {
        const img = document.querySelector('[data-model="station"] img');
        return img && img.complete && img.naturalWidth > 0;
      });
      const natural = await image.evaluate((img) => [img.naturalWidth, img.naturalHeight, img.width, img.height]);
      assert(natural[0] === 160 && natural[1] === 120, `the station model image is ${natural[0]}×${natural[1]}, not 160×120 cells`);
      assert(natural[2] === 480 && natural[3] === 360, `the station model is drawn ${natural[2]}×${natural[3]}, not 3 px per cell`);
      await expectText(page, 'each square is one 5 mm cell of the model');
      const dots = await page.locator('[data-model="closeup"] circle').count();
      assert(dots > 20, `the close-up shows ${dots} circles, not the tolerance and the last week's dockings`);
      await expectText(page, 'at 5 mm per cell (160 × 120 cells');
      assert(((await page.locator('[data-model="station"] svg text').first().textContent()) ?? '').endsWith(' mm'), 'the model has no millimetre scale');
      // Site managers may rename, not attach models or set tolerances.
      assert((await page.locator('#station-name').count()) === 1, 'the site manager cannot rename the station');
      assert((await page.locator('#station-model').count()) === 0, 'the site manager is offered to attach a model');
      await screenshot('docking-station.png', { fullPage: true });
      // The other two readings of the same dockings: x and y apart, and the heading, each with its band.
      for (const [label, file] of [['Along x and y', 'docking-station-axes.png'], ['Heading', 'docking-station-heading.png']]) {
        await page.getByRole('button', { name: label }).click();
        await page.locator('[data-chart="docking-offsets"][data-chart-state="ready"]').waitFor();
        await page.waitForTimeout(300);
        await page.locator('section[aria-labelledby="station-chart-title"]').screenshot({ path: new URL(`./screenshots/${file}`, import.meta.url).pathname, animations: 'disabled' });
      }
      await page.getByRole('button', { name: 'Position error' }).click();
      assert(watch.refused.length === 0, `API calls were refused: ${watch.refused.join(', ')}`);

      // A robot posts one more docking with its own token: the station's page counts it.
      const countText = async () => Number(/^(\d+) dockings in 28 days/.exec((await page.locator('.docking-chart__bar .dl-muted').innerText()).trim())?.[1]);
      const before = await countText();
      const robots = (await (await page.request.get(`${baseUrl}/api/sites/${siteId}/robots`)).json()).robots;
      const robot = robots.find((r) => r.name === 'AMR-01');
      const headers = sameOrigin(baseUrl);
      const token = await page.request.post(`${baseUrl}/api/sites/${siteId}/robots/${robot.id}/tokens`, { data: { label: 'docking browser test' }, headers });
      assert(token.status() === 201, `creating a robot token answered ${token.status()}`);
      const { secret } = await token.json();
      assert(typeof secret === 'string' && secret.length > 16, 'the new robot token has no secret');
      const line = JSON.stringify({ t: new Date(Date.now() - 60_000).toISOString(), station: drifting, dx: 0.0191, dy: -0.0042, dyaw: 0.0021 });
      const posted = await page.request.post(`${baseUrl}/api/ingest/docking`, { data: line, headers: { Authorization: `Bearer ${secret}`, 'Content-Type': 'application/x-ndjson', 'Idempotency-Key': `browser-${Date.now()}` } });
      const receipt = await posted.json();
      assert(posted.status() === 201 && receipt.batch.counted === 1, `the docking post answered ${posted.status()}: ${JSON.stringify(receipt)}`);
      await page.reload();
      await page.getByRole('heading', { level: 2, name: drifting }).waitFor();
      await page.locator('.docking-chart__bar').waitFor();
      assert((await countText()) === before + 1, `the station shows ${await countText()} dockings after the post, not ${before + 1}`);
      assert((await page.locator('[data-verdict-sentence]').innerText()).startsWith('Moved about'), 'the station is no longer flagged after one more far-off docking');
      // Leave the demo robot as it was: the test's token is revoked.
      const tokenId = (await token.json()).token.id;
      const revoked = await page.request.delete(`${baseUrl}/api/sites/${siteId}/robots/${robot.id}/tokens/${tokenId}`, { headers });
      assert(revoked.status() === 204, `revoking the test's robot token answered ${revoked.status()}`);
    },
  },
];
