// Browser test of the map difference and roll back on the Map versions page, as the demo mapper:
// a new version of a demo site's map (the active map with known edits, same geometry) is uploaded,
// compared with the active one in figures and as an overlay, activated after the dialog shows the
// difference, and rolled back, so the demo's active map is the same again for the tests after it.
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { FREE, OCCUPIED, UNKNOWN, accounts, apiSignIn, assert, cellsOf, expectText, getJson, openSite, openTab, pgmOf, signIn, waitForDetection } from './helpers.mjs';

const screenshotDir = path.join(path.dirname(fileURLToPath(import.meta.url)), 'screenshots');

/** Returns the lower-left cell of the first w × h window (scanned from the map's middle outwards, in steps) that `fits`, or null. */
function findWindow(width, height, w, h, fits) {
  const candidates = [];
  for (let j = 0; j + h <= height; j += 8) for (let i = 0; i + w <= width; i += 8) candidates.push([i, j]);
  candidates.sort((a, b) => Math.hypot(a[0] - width / 2, a[1] - height / 2) - Math.hypot(b[0] - width / 2, b[1] - height / 2));
  return candidates.find(([i, j]) => fits(i, j)) ?? null;
}

/**
 * The active map with known edits, as after a remap: a 3 m × 0.8 m rack where the floor was free,
 * the structure of one 2 m × 2 m patch gone, a free 1.5 m square unscanned, and any unknown cells of
 * one 2 m × 2 m patch mapped as free. Returns the edited states and the windows used.
 */
function editedCells(base, width, height) {
  const cells = Uint8Array.from(base);
  const count = (i0, j0, w, h, state) => {
    let n = 0;
    for (let j = j0; j < j0 + h; j++) for (let i = i0; i < i0 + w; i++) if (base[j * width + i] === state) n++;
    return n;
  };
  const used = [];
  const apart = (i, j, w, h) => used.every(([a, b, c, d]) => i + w + 10 < a || a + c + 10 < i || j + h + 10 < b || b + d + 10 < j);
  const take = (w, h, fits) => {
    const at = findWindow(width, height, w, h, (i, j) => apart(i, j, w, h) && fits(i, j));
    if (at) used.push([at[0], at[1], w, h]);
    return at;
  };
  const paint = ([i0, j0], w, h, paintCell) => {
    for (let j = j0; j < j0 + h; j++) for (let i = i0; i < i0 + w; i++) cells[j * width + i] = paintCell(cells[j * width + i]);
  };
  const rack = take(60, 16, (i, j) => count(i, j, 60, 16, FREE) === 60 * 16);
  assert(rack, 'the active map has no free 3 m × 0.8 m floor for the new rack');
  paint(rack, 60, 16, () => OCCUPIED);
  // The 2 m × 2 m patch holding the most structure away from the outer walls loses it (a rack end, say).
  let best = null;
  for (let j = Math.round(height * 0.15); j + 40 <= height * 0.85; j += 20) for (let i = Math.round(width * 0.15); i + 40 <= width * 0.85; i += 20) {
    if (!apart(i, j, 40, 40)) continue;
    const n = count(i, j, 40, 40, OCCUPIED);
    if (!best || n > best.n) best = { at: [i, j], n };
  }
  assert(best && best.n > 0, 'the active map has no structure to take away');
  used.push([...best.at, 40, 40]);
  paint(best.at, 40, 40, (s) => (s === OCCUPIED ? FREE : s));
  const unscanned = take(30, 30, (i, j) => count(i, j, 30, 30, FREE) === 900);
  assert(unscanned, 'the active map has no free 1.5 m square to leave unscanned');
  paint(unscanned, 30, 30, () => UNKNOWN);
  const mapped = take(40, 40, (i, j) => count(i, j, 40, 40, UNKNOWN) > 0);
  if (mapped) paint(mapped, 40, 40, (s) => (s === UNKNOWN ? FREE : s));
  return { cells, rack };
}

/** The figures the page must show, counted here cell by cell on one shared geometry (the class definitions). */
function expectedCounts(base, other) {
  const n = { added: 0, removed: 0, revealed: 0, hidden: 0 };
  for (let k = 0; k < base.length; k++) {
    const a = base[k];
    const b = other[k];
    if (b === OCCUPIED && a !== OCCUPIED) n.added++;
    if (a === OCCUPIED && b === FREE) n.removed++;
    if (a === UNKNOWN && b !== UNKNOWN) n.revealed++;
    if (a !== UNKNOWN && b === UNKNOWN) n.hidden++;
  }
  return n;
}

const cellWords = (n) => `${n.toLocaleString('en-GB')} ${n === 1 ? 'cell' : 'cells'}`;

/** Checks that a figures list shows the four expected cell counts. */
async function expectFigures(figures, expected) {
  for (const [key, n] of Object.entries(expected)) {
    const text = (await figures.locator(`[data-class="${key}"] dd`).innerText()).replace(/\s+/g, ' ');
    assert(text.includes(cellWords(n)), `“${key}” reads “${text}”, expected ${cellWords(n)}`);
  }
}

export const tests = [
  {
    name: 'when the mapper uploads a remapped version, then its difference to the active map shows in m² and as an overlay; activating shows it again, and rolling back restores the active map',
    async run({ page, baseUrl, screenshot }) {
      // Demo seeded and detection done first, so that no seeded scan and no detection run meets the new version while it is briefly the active map.
      await apiSignIn(page, baseUrl, accounts.admin);
      await waitForDetection(page.request, baseUrl);
      await page.context().clearCookies();
      await signIn(page, baseUrl, accounts.mapper);

      const { sites } = await getJson(page.request, `${baseUrl}/api/sites`);
      let site = null;
      let active = null;
      for (const s of sites) {
        const { mapVersions } = await getJson(page.request, `${baseUrl}/api/sites/${s.id}/map-versions`);
        active = mapVersions.find((v) => v.kind === 'floor' && v.status === 'active');
        if (active) {
          site = s;
          break;
        }
      }
      assert(site && active, 'no demo site has an active floor map');
      const before = (await getJson(page.request, `${baseUrl}/api/sites/${site.id}/map-versions`)).mapVersions;
      const nextVersion = Math.max(...before.filter((v) => v.kind === 'floor').map((v) => v.version)) + 1;

      // The new version: the active map's cells with known edits, in the active map's geometry.
      const base = await cellsOf(page.request, baseUrl, site.id, active);
      const { cells, rack } = editedCells(base, active.width, active.height);
      const expected = expectedCounts(base, cells);
      assert(expected.added >= 960 && expected.removed > 0 && expected.hidden >= 900, `the edits should change the map: ${JSON.stringify(expected)}`);
      const image = `e2e-remap-${Date.now()}.pgm`;
      const yaml = [`image: ${image}`, `resolution: ${active.resolution}`, `origin: [${active.origin.x}, ${active.origin.y}, ${active.origin.yaw}]`, 'negate: 0', 'occupied_thresh: 0.65', 'free_thresh: 0.196', 'mode: trinary', ''].join('\n');

      await openSite(page, site.name);
      await openTab(page, 'Map versions');
      await page.getByRole('table', { name: 'Map versions' }).waitFor();

      const diffTiles = [];
      page.on('response', (response) => {
        if (response.url().includes('/diff-tiles/')) diffTiles.push(response.status());
      });
      await page.getByRole('button', { name: 'Upload a map version' }).click();
      await page.locator('#map-label').fill('Remap after the rack move');
      await page.locator('#map-image').setInputFiles({ name: image, mimeType: 'image/x-portable-graymap', buffer: pgmOf(cells, active.width, active.height) });
      await page.locator('#map-metadata').setInputFiles({ name: image.replace('.pgm', '.yaml'), mimeType: 'application/yaml', buffer: Buffer.from(yaml) });
      await page.getByRole('button', { name: 'Upload as draft' }).click();
      await page.getByRole('article', { name: new RegExp(`Floor map version ${nextVersion}`) }).waitFor({ timeout: 20_000 });

      // The comparison: against the active version by default, figures and overlay.
      const panel = page.getByRole('region', { name: `What version ${nextVersion} changes` });
      await panel.waitFor();
      const choice = await panel.getByRole('combobox', { name: 'Compare with' }).innerText();
      assert(choice.includes(`version ${active.version} (active)`), `the comparison should default to the active version, it reads “${choice}”`);
      const figuresName = (other, against) => `Differences of version ${other} against version ${against}`;
      const figures = panel.getByLabel(figuresName(nextVersion, active.version), { exact: true });
      await figures.waitFor({ timeout: 20_000 });
      await expectFigures(figures, expected);
      // Areas: cells × resolution², e.g. the rack alone is 60 × 16 cells × 0.05² = 2.4 m².
      const addedArea = (await figures.locator('[data-class="added"] .diff-figures__area').innerText()).trim();
      const wantArea = expected.added * active.resolution ** 2;
      assert(Math.abs(parseFloat(addedArea.replace(/,/g, '')) - wantArea) <= 0.05 * Math.max(1, wantArea), `structure added reads “${addedArea}”, expected about ${wantArea.toFixed(2)} m²`);

      const canvas = panel.locator('.map-canvas');
      await panel.locator('.diff-overlay[data-tiles="ready"]').waitFor({ timeout: 20_000 });
      await panel.locator('.map-canvas[data-tiles="ready"]').waitFor({ timeout: 20_000 });
      assert(diffTiles.length > 0 && diffTiles.every((s) => s === 200 || s === 304), `diff tiles answered ${diffTiles.join(', ') || 'nothing'}`);
      // The rack's middle, on screen: the overlay paints it amber (#e38b1b).
      const box = await canvas.boundingBox();
      assert(box, 'the comparison map has no size');
      // The upload's toast would cover part of the map in the pictures.
      await page.locator('.p-toast-message').first().waitFor({ state: 'detached', timeout: 10_000 }).catch(() => {});
      await panel.scrollIntoViewIfNeeded();
      await page.waitForTimeout(300);
      await screenshot('map-diff.png');
      await panel.screenshot({ path: path.join(screenshotDir, 'map-diff-panel.png'), animations: 'disabled' });
      const amber = await canvas.evaluate(async (el) => {
        // Count amber pixels among the overlay's loaded tile images.
        let n = 0;
        for (const img of el.querySelectorAll('.dl-diff-tiles img.leaflet-tile-loaded')) {
          const c = document.createElement('canvas');
          c.width = img.naturalWidth;
          c.height = img.naturalHeight;
          const g = c.getContext('2d');
          g.drawImage(img, 0, 0);
          const d = g.getImageData(0, 0, c.width, c.height).data;
          for (let k = 0; k < d.length; k += 4) if (d[k] === 0xe3 && d[k + 1] === 0x8b && d[k + 2] === 0x1b && d[k + 3] === 255) n++;
        }
        return n;
      });
      assert(amber > 0, `the overlay shows no amber pixel for the new rack at cells ${rack.join(', ')}`);
      // Switching the overlay off shows the base grid alone.
      await panel.getByLabel('Show differences').uncheck();
      assert((await canvas.locator('.dl-diff-tiles').count()) === 0, 'the overlay stayed on after switching it off');
      await panel.getByLabel('Show differences').check();

      // Activation shows the same difference against the active version before confirming.
      const detail = page.getByRole('article', { name: new RegExp(`Floor map version ${nextVersion}`) });
      await detail.getByRole('button', { name: 'Activate' }).click();
      const dialog = page.getByRole('dialog', { name: `Activate floor map version ${nextVersion}?` });
      await dialog.waitFor();
      await dialog.getByText(`Version ${active.version}, the active map until now, will be archived`).waitFor();
      const dialogFigures = dialog.getByLabel(figuresName(nextVersion, active.version), { exact: true });
      await dialogFigures.waitFor({ timeout: 20_000 });
      await expectFigures(dialogFigures, expected);
      await screenshot('map-diff-activate.png', { fullPage: false });
      await dialog.getByRole('button', { name: `Activate version ${nextVersion}` }).click();
      await dialog.waitFor({ state: 'detached' });
      await expectText(page, `Version ${nextVersion} is the active map`);

      // Roll back: the archived commissioning version is activated again, with its own wording.
      await page.getByRole('table', { name: 'Map versions' }).getByRole('row', { name: new RegExp(`\\bv${active.version}\\b`) }).first().click();
      const oldDetail = page.getByRole('article', { name: new RegExp(`Floor map version ${active.version}\\b`) });
      await oldDetail.getByText('archived', { exact: true }).waitFor();
      await oldDetail.getByRole('button', { name: 'Roll back to this version' }).click();
      const rollBack = page.getByRole('dialog', { name: `Roll back to floor map version ${active.version}?` });
      await rollBack.waitFor();
      await rollBack.getByText(`what the robots saw while version ${nextVersion} was active stays with version ${nextVersion}`).waitFor();
      // Against the active (new) version now: what the old one changes back, the edits reversed.
      const back = rollBack.getByLabel(figuresName(active.version, nextVersion), { exact: true });
      await back.waitFor({ timeout: 20_000 });
      await expectFigures(back, expectedCounts(cells, base));
      await screenshot('map-rollback.png', { fullPage: false });
      await rollBack.getByRole('button', { name: `Roll back to version ${active.version}` }).click();
      await rollBack.waitFor({ state: 'detached' });
      await expectText(page, `Rolled back to version ${active.version}`);

      const after = (await getJson(page.request, `${baseUrl}/api/sites/${site.id}/map-versions`)).mapVersions;
      const status = (version) => after.find((v) => v.kind === 'floor' && v.version === version)?.status;
      assert(status(active.version) === 'active', `version ${active.version} should be active again, it is ${status(active.version)}`);
      assert(status(nextVersion) === 'archived', `version ${nextVersion} should be archived, it is ${status(nextVersion)}`);
    },
  },
];
