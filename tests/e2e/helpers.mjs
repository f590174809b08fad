// Small helpers shared by the browser tests: signing in, waiting for the demo, opening a site's
// tabs, watching the page's requests, reading and writing map cells, and plain assertions with
// readable messages.
import pngjs from 'pngjs';

const { PNG } = pngjs;

/** The seeded demo accounts (see the API contract); invented people at .example domains. */
export const accounts = {
  admin: { email: 'iris.admin@kestrelway.example', password: 'demo-admin-2026' },
  siteManager: { email: 'nadia.manager@ambergate.example', password: 'demo-manager-2026' },
  viewer: { email: 'owen.viewer@ambergate.example', password: 'demo-viewer-2026' },
  mapper: { email: 'tomas.mapper@kestrelway.example', password: 'demo-mapper-2026' },
};

/** Signs in through the sign-in form and waits for the fleet overview. */
export async function signIn(page, baseUrl, account) {
  await page.goto(`${baseUrl}/sign-in`);
  await page.locator('#sign-in-email').fill(account.email);
  await page.locator('#sign-in-password').fill(account.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.getByRole('heading', { level: 1 }).filter({ hasText: /sites/i }).waitFor({ timeout: 10_000 });
}

/** Throws with `message` unless `condition` holds. */
export function assert(condition, message) {
  if (!condition) throw new Error(message);
}

/** Throws unless the page shows `text` within the timeout. */
export async function expectText(page, text, timeout = 10_000) {
  try {
    await page.getByText(text, { exact: false }).first().waitFor({ state: 'visible', timeout });
  } catch {
    throw new Error(`expected the page to show “${text}”`);
  }
}

/** The headers that let an unsafe API request through the server's cross-site check (same origin as the app). */
export const sameOrigin = (baseUrl) => ({ Origin: baseUrl, 'Sec-Fetch-Site': 'same-origin' });

/** Returns the JSON answer of GET `url` through `api` (a page's `page.request` or a context of its own); throws unless it is 2xx. */
export async function getJson(api, url) {
  const response = await api.get(url);
  assert(response.ok(), `GET ${url} answered ${response.status()}`);
  return response.json();
}

/** Signs in through the API (same-origin, so the session cookie lands in the browser context). */
export async function apiSignIn(page, baseUrl, account) {
  const response = await page.request.post(`${baseUrl}/api/auth/sign-in`, { data: account, headers: sameOrigin(baseUrl) });
  assert(response.ok(), `signing in as ${account.email} through the API answered ${response.status()}`);
}

/**
 * Waits until the demo is seeded and every site has a succeeded detection run, through `api` signed
 * in as an admin (job runs are the admin's); returns the sites. Generous: seeding five sites'
 * simulated scans takes 1–3 minutes on a shared two-core machine, detection a few seconds per site.
 */
export async function waitForDetection(api, baseUrl) {
  const deadline = Date.now() + 6 * 60_000;
  let last = 'no answer yet';
  while (Date.now() < deadline) {
    // While the demo loads, the busy server may answer late: a slow answer is "not ready yet", not a failure.
    const health = await getJson(api, `${baseUrl}/api/health`).catch((error) => ({ error }));
    if (health.error) {
      last = `the server answered slowly (${health.error.message.split('\n')[0]})`;
    } else if (health.demo?.state === 'failed') {
      throw new Error('the demo seeding failed (GET /api/health says demo.state "failed")');
    } else if (health.demo?.state === 'ready' || health.demo?.state === 'none') {
      const { sites } = await getJson(api, `${baseUrl}/api/sites`);
      const { runs } = await getJson(api, `${baseUrl}/api/job-runs?job=detection&limit=200`);
      const done = new Set(runs.filter((r) => r.status === 'succeeded').map((r) => r.siteId));
      const missing = sites.filter((s) => !done.has(s.id)).map((s) => s.name);
      if (missing.length === 0) return sites;
      last = `detection still to run for ${missing.join(', ')}`;
    } else {
      last = `demo ${health.demo?.state ?? 'unknown'}, ${health.demo?.sitesDone ?? 0} of ${health.demo?.sitesTotal ?? '?'} sites loaded`;
    }
    await new Promise((resolve) => setTimeout(resolve, 3000));
  }
  throw new Error(`the demo's detection did not finish within 6 minutes (${last})`);
}

/** Opens a site's page from the fleet overview by its name and waits for its heading. */
export async function openSite(page, name) {
  await page.getByRole('link', { name }).first().click();
  await page.getByRole('heading', { level: 1, name }).waitFor();
}

/** Opens the tab `label` of the site page on screen (exact label: "Map" is not "Map versions"). */
export async function openTab(page, label) {
  await page.getByRole('navigation', { name: 'Site sections' }).getByRole('link', { name: label, exact: true }).click();
}

/**
 * Watches the page for failed requests and API answers of 400 and above, from now on; returns the
 * lists, filled as they come, and `stopWatchingFailures()`, which ends the watch of failed requests.
 */
export function watchRequests(page) {
  const failed = [];
  const refused = [];
  let watchingFailures = true;
  page.on('requestfailed', (request) => {
    if (watchingFailures) failed.push(`${request.url()} (${request.failure()?.errorText ?? 'failed'})`);
  });
  page.on('response', (response) => {
    if (response.status() >= 400 && new URL(response.url()).pathname.startsWith('/api/')) refused.push(`${response.status()} ${response.url()}`);
  });
  return {
    failed,
    refused,
    stopWatchingFailures: () => {
      // Zooming makes Leaflet abort tiles of the zoom it leaves: expected, so a test may stop watching for that.
      watchingFailures = false;
    },
  };
}

/** Cell states of an occupancy grid as the tests write them: free, occupied (structure), unknown. */
export const FREE = 0;
export const OCCUPIED = 1;
export const UNKNOWN = 2;
// The preview's palette (DESIGN.md §5: free #f6f3ea, structure #1e2a3f, unknown #d5dae3) back to cell states.
const STATE_OF_RGB = new Map([
  [0xf6f3ea, FREE],
  [0x1e2a3f, OCCUPIED],
  [0xd5dae3, UNKNOWN],
]);
// Grey values of the PGM + YAML map convention with the default thresholds (from memory): p = (255 − v) / 255,
// occupied above 0.65, free below 0.196; 205 reads as p ≈ 0.196, between them: unknown.
const GREY_OF_STATE = [254, 0, 205];

/**
 * Reads a version's cell states through `api` from its full-size preview (one pixel per cell up to
 * 2048 cells a side); returns one state per cell, row j from the bottom.
 */
export async function cellsOf(api, baseUrl, siteId, version) {
  const response = await api.get(`${baseUrl}/api/sites/${siteId}/map-versions/${version.id}/preview.png?size=2048`);
  assert(response.ok(), `the preview of version ${version.version} answered ${response.status()}`);
  const png = PNG.sync.read(await response.body());
  assert(png.width === version.width && png.height === version.height, `the preview is ${png.width} × ${png.height} px, not one pixel per cell of ${version.width} × ${version.height}`);
  const cells = new Uint8Array(version.width * version.height);
  for (let row = 0; row < png.height; row++) {
    for (let i = 0; i < png.width; i++) {
      const o = (row * png.width + i) * 4;
      const state = STATE_OF_RGB.get((png.data[o] << 16) | (png.data[o + 1] << 8) | png.data[o + 2]);
      assert(state !== undefined, `preview pixel (${i}, ${row}) is not a map colour`);
      cells[(png.height - 1 - row) * png.width + i] = state;
    }
  }
  return cells;
}

/** Returns a P5 PGM (Netpbm, maxval 255, top row first; from memory) of cell states given row j from the bottom. */
export function pgmOf(cells, width, height) {
  const header = Buffer.from(`P5\n${width} ${height}\n255\n`, 'ascii');
  const pixels = Buffer.alloc(width * height);
  for (let j = 0; j < height; j++) for (let i = 0; i < width; i++) pixels[(height - 1 - j) * width + i] = GREY_OF_STATE[cells[j * width + i]];
  return Buffer.concat([header, pixels]);
}
