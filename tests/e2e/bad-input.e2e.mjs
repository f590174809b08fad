// Browser test of a scan log refused whole: none of its lines can be counted, so the server answers
// 422 with each line's reason, the Scan logs page shows them, and no batch is stored.
import { accounts, assert, getJson, openSite, openTab, signIn } from './helpers.mjs';

/** The first demo site (in the API's order) whose floor map is active; the demo loads its maps in the background. */
async function firstSiteWithMap(page, baseUrl) {
  for (let attempt = 0; attempt < 90; attempt++) {
    const { sites } = await getJson(page.request, `${baseUrl}/api/sites`);
    const lists = await Promise.all(sites.map((s) => getJson(page.request, `${baseUrl}/api/sites/${s.id}/map-versions?kind=floor`)));
    const k = lists.findIndex((list) => list.mapVersions.some((v) => v.status === 'active'));
    if (k >= 0) return sites[k];
    await page.waitForTimeout(2000);
  }
  throw new Error('no demo site had an active floor map within 3 minutes');
}

export const tests = [
  {
    name: 'when the mapper uploads a scan log none of whose lines can be counted, then it is refused in words with each line’s reason and no batch is stored',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.mapper);
      const site = await firstSiteWithMap(page, baseUrl);
      await openSite(page, site.name);
      await openTab(page, 'Scan logs');
      const fileName = `e2e-unreadable-${Date.now()}.jsonl`;
      const stranger = JSON.stringify({ t: new Date(Date.now() - 60_000).toISOString(), robot: 'NOT-A-ROBOT', scanner: 'front', pose: [0, 0, 0], angleMin: 0, angleIncrement: 0.01, rangeMin: 0.05, rangeMax: 30, ranges: [1] });
      const lines = ['{"t": "2026-11-03T08:15:02Z", "robot": ', '[1, 2, 3]', stranger];

      await page.getByRole('table', { name: 'Recent scan batches' }).or(page.getByText('No scans received yet')).first().waitFor();
      await page.locator('#scan-log').setInputFiles({ name: fileName, mimeType: 'application/x-ndjson', buffer: Buffer.from(lines.join('\n') + '\n') });
      await page.getByRole('button', { name: 'Upload and count' }).click();

      await page.getByText("None of the file's 3 lines could be counted; nothing was stored.").waitFor({ timeout: 20_000 });
      const refused = page.getByRole('table', { name: `Refused lines of ${fileName}` });
      await refused.waitFor();
      const rows = refused.locator('tbody tr');
      assert((await rows.count()) === 3, `expected 3 refused lines, saw ${await rows.count()}`);
      const third = (await rows.nth(2).innerText()).trim();
      assert(/^3\s/.test(third) && third.includes('NOT-A-ROBOT'), `expected line 3 refused for its unregistered robot, it reads “${third}”`);
      await screenshot('scan-log-refused.png');

      const { batches } = await getJson(page.request, `${baseUrl}/api/sites/${site.id}/scan-batches`);
      assert(!batches.some((b) => b.fileName === fileName), 'the refused log must not be stored as a batch');
      const listed = await page.getByRole('table', { name: 'Recent scan batches' }).getByRole('row', { name: new RegExp(fileName) }).count();
      assert(listed === 0, 'the refused log must not be listed among the scan batches');
    },
  },
];
