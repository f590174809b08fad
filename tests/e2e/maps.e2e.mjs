// Browser tests of the Map versions and Scan logs pages, as the demo mapper: map uploads with
// progress, a refused metadata pair, and a recorded scan log with one broken line.
import { accounts, assert, expectText, getJson, openSite, openTab, signIn } from './helpers.mjs';

/**
 * A binary PGM (Netpbm P5, maxval 255) of a small invented hall: dark outer walls and three rack
 * rows, light free space, and a grey unknown strip along the top. P5 layout: "P5\n<w> <h>\n255\n"
 * then one byte per pixel, top row first (Netpbm PGM format, from memory).
 */
function hallPgm(width, height) {
  const header = Buffer.from(`P5\n${width} ${height}\n255\n`, 'ascii');
  const pixels = Buffer.alloc(width * height, 254);
  for (let row = 0; row < height; row++) {
    for (let col = 0; col < width; col++) {
      const wall = row < 2 || row >= height - 2 || col < 2 || col >= width - 2;
      // Three rack rows, 0.3 m deep, across the middle half of the hall.
      const rack = [0.35, 0.55, 0.75].some((f) => Math.abs(row - f * height) < 3) && col >= width / 4 && col < (3 * width) / 4;
      // 205 reads as p ≈ 0.2, between the default thresholds: unknown space.
      if (row >= 2 && row < 12 && !wall) pixels[row * width + col] = 205;
      if (wall || rack) pixels[row * width + col] = 0;
    }
  }
  return Buffer.concat([header, pixels]);
}

/** Map metadata YAML in the PGM + YAML convention for `image`, at 5 cm per cell. */
function metadataYaml(image) {
  return ['image: ' + image, 'resolution: 0.05', 'origin: [-1.0, -1.0, 0.0]', 'negate: 0', 'occupied_thresh: 0.65', 'free_thresh: 0.196', 'mode: trinary', ''].join('\n');
}

/** Slows the browser's uploads so that the progress bar is on screen long enough to be seen (Chromium DevTools protocol). */
async function throttleUploads(context, page, bytesPerSecond) {
  const cdp = await context.newCDPSession(page);
  await cdp.send('Network.enable');
  await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 20, downloadThroughput: -1, uploadThroughput: bytesPerSecond });
  return async () => {
    await cdp.send('Network.emulateNetworkConditions', { offline: false, latency: 0, downloadThroughput: -1, uploadThroughput: -1 });
    await cdp.detach();
  };
}

/**
 * Returns a site whose active floor map is in place. The demo loads its maps and scans in the
 * background while the server already answers, so the test waits for one site to be ready
 * rather than assuming any particular one.
 */
async function siteWithActiveMap(page, baseUrl, timeoutMs = 180_000) {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const { sites } = await getJson(page.request, `${baseUrl}/api/sites`);
    for (const site of sites) {
      const { mapVersions } = await getJson(page.request, `${baseUrl}/api/sites/${site.id}/map-versions`);
      if (mapVersions.some((v) => v.kind === 'floor' && v.status === 'active')) return site;
    }
    assert(Date.now() < deadline, `no demo site had an active floor map within ${timeoutMs / 1000} s`);
    await page.waitForTimeout(2000);
  }
}

/** Signs in as the mapper and opens a ready demo site on the given tab; returns the site's id. */
async function openSiteTab(page, baseUrl, tab) {
  await signIn(page, baseUrl, accounts.mapper);
  const site = await siteWithActiveMap(page, baseUrl);
  await openSite(page, site.name);
  await openTab(page, tab);
  return site.id;
}

export const tests = [
  {
    name: 'when the mapper uploads a PGM with its YAML, then a progress bar runs and the new draft is shown with its size; a YAML naming another image is refused in words',
    async run({ page, context, baseUrl, screenshot }) {
      const siteId = await openSiteTab(page, baseUrl, 'Map versions');
      await page.getByRole('table', { name: 'Map versions' }).waitFor();
      const before = (await getJson(page.request, `${baseUrl}/api/sites/${siteId}/map-versions`)).mapVersions;
      const nextVersion = Math.max(0, ...before.filter((v) => v.kind === 'floor').map((v) => v.version)) + 1;

      const [width, height] = [800, 600];
      const image = `e2e-hall-${Date.now()}.pgm`;
      await page.getByRole('button', { name: 'Upload a map version' }).click();
      await page.locator('#map-label').fill('Browser test hall');
      await page.locator('#map-image').setInputFiles({ name: image, mimeType: 'image/x-portable-graymap', buffer: hallPgm(width, height) });
      await page.locator('#map-metadata').setInputFiles({ name: image.replace('.pgm', '.yaml'), mimeType: 'application/yaml', buffer: Buffer.from(metadataYaml(image)) });
      const unthrottle = await throttleUploads(context, page, 160_000);
      await page.getByRole('button', { name: 'Upload as draft' }).click();
      await page.getByRole('status', { name: `Sending ${image}` }).locator('.p-progressbar').waitFor({ timeout: 5000 });
      await unthrottle();

      const detail = page.getByRole('article', { name: new RegExp(`Floor map version ${nextVersion}`) });
      await detail.waitFor({ timeout: 15_000 });
      await detail.getByText('draft', { exact: true }).waitFor();
      await detail.getByText(`${width} × ${height}`, { exact: true }).waitFor();
      await detail.getByText('40.00 × 30.00', { exact: true }).waitFor();
      await detail.getByRole('button', { name: 'Activate' }).waitFor();
      const row = page.getByRole('table', { name: 'Map versions' }).getByRole('row', { name: new RegExp(`v${nextVersion}`) });
      await row.getByText(`${width} × ${height} cells`).waitFor();
      await row.getByText('Browser test hall').waitFor();
      const preview = detail.locator('img').first();
      await preview.evaluate((img) => (img.complete ? null : new Promise((resolve) => img.addEventListener('load', resolve, { once: true }))));
      assert((await preview.evaluate((img) => img.naturalWidth)) > 0, 'the new draft’s preview did not load');

      // A metadata file that names another image: the server refuses it and stores nothing.
      await page.getByRole('button', { name: 'Upload a map version' }).click();
      await page.locator('#map-image').setInputFiles({ name: 'e2e-hall-b.pgm', mimeType: 'image/x-portable-graymap', buffer: hallPgm(200, 150) });
      await page.locator('#map-metadata').setInputFiles({ name: 'e2e-hall-b.yaml', mimeType: 'application/yaml', buffer: Buffer.from(metadataYaml('e2e-hall-a.pgm')) });
      await page.getByRole('button', { name: 'Upload as draft' }).click();
      await expectText(page, 'The map metadata names the image "e2e-hall-a.pgm" but the uploaded image is "e2e-hall-b.pgm".');
      await expectText(page, 'The map was not stored.');
      const after = (await getJson(page.request, `${baseUrl}/api/sites/${siteId}/map-versions`)).mapVersions;
      assert(after.length === before.length + 1, `expected ${before.length + 1} versions after one good and one refused upload, found ${after.length}`);
      await page.locator('.p-toast-message').first().waitFor({ state: 'detached', timeout: 10_000 }).catch(() => {});
      await screenshot('maps.png');
    },
  },
  {
    name: 'when the mapper uploads a scan log with one broken line, then the batch is counted and the broken line is listed with its reason',
    async run({ page, baseUrl, screenshot }) {
      const siteId = await openSiteTab(page, baseUrl, 'Scan logs');
      const { robots } = await getJson(page.request, `${baseUrl}/api/sites/${siteId}/robots`);
      const { mapVersions } = await getJson(page.request, `${baseUrl}/api/sites/${siteId}/map-versions`);
      const robot = robots[0];
      const map = mapVersions.find((v) => v.kind === 'floor' && v.status === 'active');
      assert(robot && map, 'the demo site needs a robot and an active floor map for this test');
      // Stand the robot in the middle of the active map, so that its beams land on the map.
      const x = map.origin.x + map.widthM / 2;
      const y = map.origin.y + map.heightM / 2;
      const scanner = robot.mounts[0]?.name ?? 'front';
      const start = Date.now() - 60 * 60 * 1000;
      const scan = (k) =>
        JSON.stringify({
          t: new Date(start + k * 100).toISOString(),
          robot: robot.name,
          scanner,
          pose: [x, y, 0.1 * k],
          angleMin: -1.5708,
          angleIncrement: 0.0174533,
          rangeMin: 0.05,
          rangeMax: 30,
          ranges: Array.from({ length: 181 }, (_, b) => (b % 10 === 0 ? null : 2 + (b % 7) * 0.25)),
        });
      const lines = [scan(0), scan(1), scan(2), '{"t": "2026-11-03T08:15:02Z", "robot": ', scan(3)];
      const fileName = `e2e-commissioning-${Date.now()}.jsonl`;

      await page.getByRole('table', { name: 'Recent scan batches' }).or(page.getByText('No scans received yet')).first().waitFor();
      await page.locator('#scan-log').setInputFiles({ name: fileName, mimeType: 'application/x-ndjson', buffer: Buffer.from(lines.join('\n') + '\n') });
      await page.getByRole('button', { name: 'Upload and count' }).click();

      const result = page.getByRole('region', { name: new RegExp(fileName) });
      await result.waitFor({ timeout: 20_000 });
      await result.getByText('counted', { exact: true }).waitFor();
      await result.getByText('1 refused line').waitFor();
      const refused = result.getByRole('table', { name: /Refused lines/ }).getByRole('row', { name: /^4 / });
      await refused.waitFor();
      const reason = (await refused.locator('td').innerText()).trim();
      assert(reason.length > 10, `expected a reason for the broken line, got “${reason}”`);
      const figures = await result.locator('dl').first().innerText();
      assert(/Scans counted\s*4\b/i.test(figures), `expected 4 scans counted, the figures read: ${figures}`);

      const row = page.getByRole('table', { name: 'Recent scan batches' }).getByRole('row', { name: new RegExp(fileName) });
      await row.waitFor();
      await row.getByRole('button', { name: 'Show refused lines and days' }).click();
      await page.getByRole('table', { name: new RegExp(`Refused lines of ${fileName}`) }).nth(1).waitFor();
      await screenshot('scans.png');
    },
  },
];
