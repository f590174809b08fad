// The site's Map tab in the browser, on the demo's simulated scans (site manager journey, steps 2–4):
// grid tiles in map metres with no failed request, the scale bar and the cursor readout against the
// tile pyramid and a landmark of the demo building, a zone's panel opened from its polygon and
// acknowledged (its outline turns dashed), the measuring tool, the other layers, the empty and
// error states, and a viewer who sees the map and the panel without actions.
//
// Landmark: the building column "pillar-12-7" of the demo warehouse (shared/sim/warehouse.ts: a row
// of 0.4 m columns every 12 m along y = 7 m through the staging band), centred at x 12.00 m,
// y 7.00 m in the map frame. The demo's stored map (shared/sim/scenario.ts, stored-map.ts) has its
// origin at (−1 m, −1 m), no yaw and 0.05 m cells, and marks a solid's outer ring of cells as
// structure and its inside as unknown: across the column's centre the tiles show unknown, then a
// structure ring 0.15–0.20 m out, then free floor.
import { accounts, apiSignIn, assert, expectText, openSite, openTab, signIn, waitForDetection, watchRequests } from './helpers.mjs';

const site = 'Fennick Cross DC';
const landmark = { name: 'pillar-12-7', x: 12, y: 7 };
/** Side of a tile in pixels (shared/render/tiles.ts). */
const TILE_SIZE = 256;

/** Opens the site's Map tab from the fleet overview and waits for the grid tiles and the zones. */
async function openMap(page) {
  await openSite(page, site);
  await openTab(page, 'Map');
  await page.locator('.map-canvas[data-tiles="ready"] img.leaflet-tile-loaded').first().waitFor({ timeout: 20_000 });
  await page.locator('.map-canvas[data-tiles="ready"]').waitFor({ timeout: 20_000 });
  await page.locator('path.dl-zone').first().waitFor({ timeout: 20_000 });
  // The whole map in the viewport: mouse and wheel events only reach what is on screen.
  await page.locator('.map-canvas').evaluate((el) => el.scrollIntoView({ block: 'end' }));
}

/** Returns the site's active floor version (geometry) from the API, as the browser's session sees it. */
async function activeFloor(page, baseUrl) {
  const siteId = new URL(page.url()).pathname.split('/')[2];
  const versions = (await (await page.request.get(`${baseUrl}/api/sites/${siteId}/map-versions`)).json()).mapVersions;
  const version = versions.find((v) => v.kind === 'floor' && v.status === 'active');
  assert(version, 'the site has no active floor version');
  return { siteId, version };
}

/** Zoom-0 shift k of the tile pyramid (shared/render/tiles.ts): the smallest k with the longer side ≤ 512 · 2^k cells. */
function zoom0Shift(version) {
  let k = 0;
  while (Math.max(version.width, version.height) > 2 * TILE_SIZE * 2 ** k) k++;
  return k;
}

/**
 * Returns where a map point (metres) lies on screen, found from the grid tiles themselves: the
 * pyramid pixel of the point (tiles.ts and DESIGN §4.1 for a map without yaw), the loaded tile that
 * holds it, and that tile's place on screen. Independent of the app's CRS code, which it checks.
 */
async function screenPointOf(page, version, x, y) {
  assert(version.origin.yaw === 0, 'this check assumes a map without yaw, as the demo maps are');
  const k = zoom0Shift(version);
  const tiles = await page.locator('.map-canvas__grid img.leaflet-tile-loaded').evaluateAll((imgs) =>
    imgs.map((img) => {
      const r = img.getBoundingClientRect();
      return { src: img.src, left: r.left, top: r.top };
    }),
  );
  const parsed = tiles.map((t) => ({ ...t, zxy: /\/tiles\/(\d+)\/(\d+)\/(\d+)\.png/.exec(t.src)?.slice(1).map(Number) })).filter((t) => t.zxy);
  // Tiles of the zoom now shown (the deepest loaded: Leaflet keeps the level it leaves until the new one is in).
  const z = Math.max(...parsed.map((t) => t.zxy[0]));
  const pixelsPerCell = 2 ** (z - k);
  const px = ((x - version.origin.x) / version.resolution) * pixelsPerCell;
  const py = (version.height - (y - version.origin.y) / version.resolution) * pixelsPerCell;
  const tx = Math.floor(px / TILE_SIZE);
  const ty = Math.floor(py / TILE_SIZE);
  const tile = parsed.find((t) => t.zxy[0] === z && t.zxy[1] === tx && t.zxy[2] === ty);
  assert(tile, `no loaded tile ${z}/${tx}/${ty} holds the map point (${x}, ${y})`);
  // Screen pixels per tile pixel: 2^(map zoom − tile zoom), from the map's zoom rather than an image's rounded box.
  const mapZoom = Number(await page.locator('.map-canvas').getAttribute('data-zoom'));
  const scale = 2 ** (mapZoom - z);
  const metresPerTile = (TILE_SIZE / pixelsPerCell) * version.resolution;
  return { x: tile.left + (px - tx * TILE_SIZE) * scale, y: tile.top + (py - ty * TILE_SIZE) * scale, z, scale, pxPerMetre: (TILE_SIZE * scale) / metresPerTile };
}

/**
 * Returns the grid colour [r, g, b] that the server's tile of zoom z shows at a screen point (read
 * from the tile image, beneath every overlay); `scale` is screen pixels per tile pixel.
 */
async function tileColourAt(page, point, z, scale) {
  return page.evaluate(({ x, y, z, scale }) => {
    const img = [...document.querySelectorAll('.map-canvas__grid img.leaflet-tile-loaded')].find((i) => {
      const r = i.getBoundingClientRect();
      return i.src.includes(`/tiles/${z}/`) && x >= r.left && x < r.right && y >= r.top && y < r.bottom;
    });
    if (!img) return null;
    const r = img.getBoundingClientRect();
    const canvas = document.createElement('canvas');
    canvas.width = img.naturalWidth;
    canvas.height = img.naturalHeight;
    const ctx = canvas.getContext('2d');
    ctx.drawImage(img, 0, 0);
    const d = ctx.getImageData(Math.floor((x - r.left) / scale), Math.floor((y - r.top) / scale), 1, 1).data;
    return [d[0], d[1], d[2]];
  }, { ...point, z, scale });
}

/** Reads the cursor readout ("x 12.34 m · y 5.67 m") as numbers in metres. */
async function readCursor(page) {
  const text = await page.getByTestId('map-cursor-xy').innerText();
  const match = /^x (−?\d+\.\d\d) m · y (−?\d+\.\d\d) m$/.exec(text.trim());
  assert(match, `the cursor readout reads “${text}”`);
  return { x: Number(match[1].replace('−', '-')), y: Number(match[2].replace('−', '-')), text };
}

/** Waits until the map has stopped zooming and its tiles are in. */
async function settle(page) {
  let last = '';
  for (let k = 0; k < 40; k++) {
    await page.locator('.map-canvas[data-tiles="ready"]').waitFor({ timeout: 10_000 });
    const zoom = await page.locator('.map-canvas').getAttribute('data-zoom');
    if (zoom === last) return Number(zoom);
    last = zoom;
    await page.waitForTimeout(350);
  }
  throw new Error('the map kept moving');
}

/** Returns a screen point inside a zone's polygon that the polygon itself receives (not an overlay). */
async function pointInside(page, zonePath) {
  const point = await zonePath.evaluate((path) => {
    const box = path.getBoundingClientRect();
    const toUser = path.getScreenCTM().inverse();
    const svg = path.ownerSVGElement;
    // Centre first, then a grid over the bounding box: an L-shaped outline may leave its centre outside.
    const candidates = [[box.left + box.width / 2, box.top + box.height / 2]];
    for (let fy = 0.1; fy < 1; fy += 0.1) for (let fx = 0.1; fx < 1; fx += 0.1) candidates.push([box.left + fx * box.width, box.top + fy * box.height]);
    for (const [x, y] of candidates) {
      const p = svg.createSVGPoint();
      p.x = x;
      p.y = y;
      if (path.isPointInFill(p.matrixTransform(toUser)) && document.elementFromPoint(x, y) === path) return { x, y };
    }
    return null;
  });
  assert(point, 'found no point inside the zone polygon that is not covered');
  return point;
}

/** The open zone with the largest outline on screen, as a locator with its id and label. */
async function largestZone(page, status) {
  const zones = page.locator(`path.dl-zone[data-zone-status="${status}"]`);
  const boxes = await zones.evaluateAll((paths) => paths.map((p) => ({ id: p.getAttribute('data-zone-id'), label: p.getAttribute('aria-label'), area: p.getBoundingClientRect().width * p.getBoundingClientRect().height })));
  assert(boxes.length > 0, `no ${status} zone is drawn on the map`);
  const best = boxes.sort((a, b) => b.area - a.area)[0];
  return { ...best, locator: page.locator(`path.dl-zone[data-zone-id="${best.id}"]`) };
}

export const tests = [
  {
    name: 'when a site manager opens the Map tab, then the grid tiles load with no failed request and the zones are drawn by kind',
    async run({ page, baseUrl, screenshot }) {
      await apiSignIn(page, baseUrl, accounts.admin);
      await waitForDetection(page.request, baseUrl);
      await page.context().clearCookies();

      await signIn(page, baseUrl, accounts.siteManager);
      // Watched from here: the sign-in page's "who am I?" answers 401 on purpose before signing in.
      const watch = watchRequests(page);
      let tileAnswers = 0;
      page.on('response', (r) => {
        if (/\/tiles\/\d+\/\d+\/\d+\.png/.test(r.url()) && r.ok()) tileAnswers++;
      });
      await openMap(page);
      await expectText(page, 'zones,');
      await page.locator('.layer-toggles').getByText(/2 m blocks/).waitFor();
      watch.stopWatchingFailures();
      assert(watch.failed.length === 0, `requests failed while the map loaded: ${watch.failed.join('; ')}`);
      assert(watch.refused.length === 0, `API answers of 400 or more while the map loaded: ${watch.refused.join('; ')}`);
      assert(tileAnswers > 0, 'no grid tile was loaded');

      // Zones of every kind the demo has, each outlined in its kind colour (DESIGN §5: new amber, missing violet, unmapped teal).
      const strokes = await page.locator('path.dl-zone').evaluateAll((paths) => paths.map((p) => `${p.getAttribute('aria-label')}|${p.getAttribute('stroke')}`));
      const colours = { new: '#e38b1b', missing: '#6a4bd6', unmapped: '#1c9a8a' };
      for (const entry of strokes) {
        const [label, stroke] = entry.split('|');
        const kind = /: (new|missing|unmapped) structure/.exec(label)?.[1];
        assert(kind && stroke === colours[kind], `zone “${label}” is outlined in ${stroke}`);
      }
      // Intermittent zones are hatched: their fill is the pattern, persistent ones a plain colour.
      const fills = await page.locator('path.dl-zone').evaluateAll((paths) => paths.map((p) => ({ label: p.getAttribute('aria-label'), fill: p.getAttribute('fill') })));
      assert(fills.some((f) => f.label.includes('intermittent')), 'the demo should show an intermittent zone (pallets in the staging lane)');
      for (const f of fills) assert(f.label.includes('intermittent') === f.fill.startsWith('url(#'), `zone “${f.label}” has fill ${f.fill}`);
      const box = await page.locator('.map-canvas').boundingBox();
      await page.mouse.move(box.x + box.width * 0.4, box.y + box.height * 0.55);
      await screenshot('site-map.png');
    },
  },
  {
    name: 'when the map shows the site, then the scale bar and the cursor readout agree with the tiles and the building’s pillar at x 12, y 7',
    async run({ page, baseUrl }) {
      await signIn(page, baseUrl, accounts.siteManager);
      const watch = watchRequests(page);
      await openMap(page);
      const { version } = await activeFloor(page, baseUrl);
      await settle(page);

      // Scale bar: its width in pixels is its length in metres times the pixels per metre the tiles show.
      const first = await screenPointOf(page, version, landmark.x, landmark.y);
      const bar = page.locator('.leaflet-control-scale-line');
      const barText = (await bar.innerText()).trim();
      const barMetres = Number(/^(\d+(?:\.\d+)?) m$/.exec(barText)?.[1]);
      assert(barMetres > 0, `the scale bar reads “${barText}”`);
      const barWidth = await bar.evaluate((el) => parseFloat(el.style.width));
      const expectedWidth = barMetres * first.pxPerMetre;
      assert(Math.abs(barWidth - expectedWidth) <= 1.5, `the scale bar's ${barMetres} m are ${barWidth} px wide, the tiles show ${expectedWidth.toFixed(1)} px`);

      // Zoom in on the pillar with the wheel (Leaflet zooms about the pointer), down to a few pixels per cell.
      let zoom = await settle(page);
      for (let k = 0; k < 10 && zoom < 3.75; k++) {
        const here = await screenPointOf(page, version, landmark.x, landmark.y);
        await page.mouse.move(here.x, here.y);
        await page.mouse.wheel(0, -240);
        zoom = await settle(page);
      }
      assert(zoom >= 3.75, `the wheel did not zoom in to single cells (zoom ${zoom})`);
      const p = await screenPointOf(page, version, landmark.x, landmark.y);

      // The tiles show the pillar there: unknown inside, a ring of structure 0.15–0.20 m out, free floor beyond.
      const unknown = [0xd5, 0xda, 0xe3];
      const ink = [0x1e, 0x2a, 0x3f];
      const paper = [0xf6, 0xf3, 0xea];
      const near = (c, ref) => c && c.every((v, i) => Math.abs(v - ref[i]) <= 6);
      const at = (dx, dy) => tileColourAt(page, { x: p.x + dx * p.pxPerMetre, y: p.y - dy * p.pxPerMetre }, p.z, p.scale);
      assert(near(await at(0, 0), unknown), `the tile at the pillar's centre is ${await at(0, 0)}, not unknown`);
      for (const [dx, dy] of [[0.175, 0], [-0.175, 0], [0, 0.175], [0, -0.175]]) {
        assert(near(await at(dx, dy), ink), `the tile ${dx} m, ${dy} m from the pillar's centre is ${await at(dx, dy)}, not structure`);
      }
      for (const [dx, dy] of [[0.4, 0], [-0.4, 0], [0, 0.4], [0, -0.4]]) {
        assert(near(await at(dx, dy), paper), `the tile ${dx} m, ${dy} m from the pillar's centre is ${await at(dx, dy)}, not free floor`);
      }

      // Hovering the pillar's centre shows its coordinates in metres, within a centimetre or two (one screen pixel is 1/pxPerMetre m).
      await page.mouse.move(p.x, p.y);
      const readout = await readCursor(page);
      const tolerance = 0.01 + 1 / p.pxPerMetre;
      assert(Math.abs(readout.x - landmark.x) <= tolerance && Math.abs(readout.y - landmark.y) <= tolerance, `over the centre of ${landmark.name} the readout says “${readout.text}”`);
      // The cell up and right of the centre, (12.025, 7.025) m, is cell (260, 160): 13 m and 8 m from the origin at 0.05 m.
      const cell = await screenPointOf(page, version, landmark.x + 0.025, landmark.y + 0.025);
      await page.mouse.move(cell.x, cell.y);
      await page.getByTestId('map-cursor-readout').getByText('cell 260, 160').waitFor();

      // The measuring tool: two points 3 m apart along x read 3.00 m (within a pixel's worth).
      await page.getByRole('button', { name: 'Measure' }).click();
      const a = await screenPointOf(page, version, landmark.x - 1, landmark.y + 0.6);
      await page.mouse.click(a.x, a.y);
      await page.mouse.click(a.x + 3 * a.pxPerMetre, a.y);
      const length = await page.getByTestId('map-measure-length').innerText();
      const measured = Number(/(\d+\.\d\d) m/.exec(length)?.[1]);
      assert(Math.abs(measured - 3) <= 2 / a.pxPerMetre + 0.01, `two points 3 m apart measure “${length}”`);
      assert(/2 points/.test(length), `the measure says “${length}”`);
      await page.keyboard.press('Escape');
      await page.getByTestId('map-measure-length').waitFor({ state: 'detached' });
      await page.getByRole('button', { name: 'Measure' }).waitFor();

      // Fit the whole site again.
      await page.getByRole('button', { name: 'Fit the whole site' }).click();
      assert((await settle(page)) < zoom, 'fitting the site did not zoom out');
      assert(watch.refused.length === 0, `API answers of 400 or more: ${watch.refused.join('; ')}`);
    },
  },
  {
    name: 'when a site manager clicks a zone on the map and acknowledges it, then its panel shows kind, persistence and area and the outline turns dashed',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.siteManager);
      await openMap(page);
      await settle(page);
      const zone = await largestZone(page, 'open');
      const kind = /^Zone (Z-\d+): (new|missing|unmapped) structure, (persistent|intermittent)/.exec(zone.label);
      assert(kind, `the zone's label reads “${zone.label}”`);
      assert((await zone.locator.getAttribute('stroke-dasharray')) === null, 'an open zone has a dashed outline');
      const inside = await pointInside(page, zone.locator);
      await page.mouse.click(inside.x, inside.y);

      const panel = page.getByRole('dialog');
      await panel.waitFor();
      const sentence = await panel.getByTestId('zone-sentence').innerText();
      assert(new RegExp(`^${kind[2]} structure, ${kind[3]}, \\d+(\\.\\d)? m², seen on \\d+ of \\d+ days? since`).test(sentence), `the panel of “${zone.label}” says “${sentence}”`);
      await panel.getByText('Area').waitFor();
      assert(new URL(page.url()).searchParams.get('zone') === zone.id, 'the open zone is not in the address');
      // The clicked zone is drawn thicker while its panel is open.
      assert(Number(await zone.locator.getAttribute('stroke-width')) > 3, 'the selected zone is not highlighted');
      await panel.locator('canvas').waitFor();
      await screenshot('site-map-zone-panel.png', { fullPage: false });

      await panel.getByRole('button', { name: 'Acknowledge', exact: true }).click();
      await panel.locator('#zone-ack-note').fill('New racking on purpose; remap after the peak.');
      await panel.getByRole('button', { name: 'Acknowledge zone' }).click();
      await expectText(page, `${kind[1]} acknowledged`);
      await panel.getByText('“New racking on purpose; remap after the peak.”').waitFor();
      await page.locator(`path.dl-zone[data-zone-id="${zone.id}"][data-zone-status="acknowledged"]`).waitFor();
      const dashes = await zone.locator.getAttribute('stroke-dasharray');
      assert(dashes && dashes.trim().length > 0, 'the acknowledged zone is not outlined dashed');
      assert((await zone.locator.getAttribute('aria-label')).endsWith('acknowledged'), 'the zone’s label does not say acknowledged');
      await page.keyboard.press('Escape');
      await panel.waitFor({ state: 'hidden' });
      assert(!new URL(page.url()).searchParams.has('zone'), 'closing the panel left the zone in the address');
    },
  },
  {
    name: 'when a site manager switches layers, then traffic and robot paths show with their legends and the legend says what outlines mean',
    async run({ page, baseUrl }) {
      await signIn(page, baseUrl, accounts.siteManager);
      const watch = watchRequests(page);
      await openMap(page);
      const legend = page.getByRole('region', { name: 'Legend' });
      for (const words of ['hatched: intermittent', 'solid: open', 'dashed: acknowledged', 'dotted: remap planned', 'new structure', 'missing structure', 'unmapped structure']) {
        await legend.getByText(words).first().waitFor();
      }
      await legend.getByRole('img', { name: /^Agreement heat: ≥ 99 %, 97–99 %, 95–97 %, 90–95 %, 80–90 %, < 80 % % of returns explained/ }).waitFor();

      await page.getByLabel('Traffic', { exact: true }).check();
      await legend.getByText('returns/m²/day').waitFor();
      await legend.getByRole('img', { name: /^Traffic: < \d/ }).waitFor();
      const trafficTiles = await page.locator('.leaflet-dl-blocks-pane canvas').count();
      assert(trafficTiles > 0, 'no block tile is drawn');

      await page.getByLabel('Robot paths', { exact: true }).check();
      const note = page.locator('.layer-toggles').getByText(/robots?, 24 h up to|No robot sent scans/);
      await note.waitFor({ timeout: 15_000 });
      const text = await note.innerText();
      assert(/\d+ robots?, 24 h up to/.test(text), `the paths layer says “${text}”; the demo's robots drove until yesterday's shift ended`);
      await legend.getByText('AMR-01').waitFor();
      assert((await page.locator('.leaflet-dl-paths-pane canvas').count()) === 1, 'the paths are not drawn on a canvas');
      assert(watch.refused.length === 0, `API answers of 400 or more: ${watch.refused.join('; ')}`);
    },
  },
  {
    name: 'when the map versions cannot be loaded, then the Map tab says so and “Try again” shows the map; without an active map it says who uploads one',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.siteManager);
      await page.route('**/api/sites/*/map-versions', (route) => route.fulfill({ status: 503, contentType: 'application/json', body: JSON.stringify({ error: { code: 'unavailable', message: 'The database is busy; please try again.' } }) }), { times: 1 });
      await page.getByRole('link', { name: site }).first().click();
      await openTab(page, 'Map');
      await expectText(page, 'The map could not be loaded');
      await expectText(page, 'The database is busy; please try again.');
      await page.getByRole('button', { name: 'Try again' }).click();
      await page.locator('.map-canvas[data-tiles="ready"]').waitFor({ timeout: 20_000 });

      await page.route('**/api/sites/*/map-versions', (route) => route.fulfill({ status: 200, contentType: 'application/json', body: JSON.stringify({ mapVersions: [] }) }), { times: 1 });
      await page.reload();
      await expectText(page, 'This site has no active floor map yet');
      await expectText(page, 'The mapping team uploads and activates the site’s grid map');
      assert((await page.getByRole('link', { name: 'Go to Map versions' }).count()) === 0, 'a site manager is sent to upload a map');
      await screenshot('site-map-empty.png', { fullPage: false });

      // An admin, who may upload and activate maps, is sent to the Map versions tab instead.
      await page.context().clearCookies();
      await signIn(page, baseUrl, accounts.admin);
      await page.route('**/api/sites/*/map-versions', (route) => route.fulfill({ status: 200, contentType: 'application/json', body: JSON.stringify({ mapVersions: [] }) }), { times: 1 });
      await page.getByRole('link', { name: site }).first().click();
      await openTab(page, 'Map');
      await expectText(page, 'Upload the grid map of the site’s mapping run and activate it');
      await page.getByRole('link', { name: 'Go to Map versions' }).click();
      await page.getByRole('table', { name: 'Map versions' }).waitFor();
    },
  },
  {
    name: 'when a viewer opens the map and a zone, then the panel shows the zone without acknowledge or dismiss',
    async run({ page, baseUrl }) {
      await signIn(page, baseUrl, accounts.viewer);
      await openMap(page);
      await settle(page);
      const zone = await largestZone(page, 'open');
      const inside = await pointInside(page, zone.locator);
      await page.mouse.click(inside.x, inside.y);
      const panel = page.getByRole('dialog');
      await panel.getByTestId('zone-sentence').waitFor();
      for (const name of ['Acknowledge', 'Dismiss', 'Acknowledge zone', 'Dismiss zone']) {
        assert((await panel.getByRole('button', { name, exact: true }).count()) === 0, `a viewer sees “${name}”`);
      }
    },
  },
];
