// Browser tests of remap planning, the mapping team's journey (JOURNEYS.md, mapping team steps 2–5)
// on the demo's Tarrow Heath Cold Store, whose fence went up mid-scenario (zones no other browser
// test touches): the mapper picks persistent zones and proposes a remap, the site manager approves
// it, the mapper schedules it in the first quiet window with a colleague and finds it on the
// calendar, then starts it, uploads the remap run's map (the active map with the zones' structure
// drawn in), attaches and activates it; after a detection run the request waits for evidence, and
// after a recorded log of three days that agrees with the new map it is verified.
import { readFileSync } from 'node:fs';
import { request } from 'playwright-core';
import { FREE, OCCUPIED, accounts, assert, cellsOf, expectText, getJson, openSite, openTab, pgmOf, sameOrigin, signIn, waitForDetection } from './helpers.mjs';

/** An Ambergate site, so that the demo's Ambergate site manager approves. */
const siteName = 'Tarrow Heath Cold Store';
/** The colleague the mapper assigns: the demo admin (admins may drive remaps too). */
const colleague = 'Iris Achterberg';
const title = 'Fence line along the cold store (browser test)';

async function postJson(api, baseUrl, url, data) {
  const response = await api.post(url, { data, headers: sameOrigin(baseUrl) });
  assert(response.ok(), `POST ${url} answered ${response.status()}: ${await response.text()}`);
  return response.json();
}

/** An API client of its own (own cookies) signed in as `account`, so the page's session stays the user's. */
async function apiAs(baseUrl, account) {
  const api = await request.newContext({ baseURL: baseUrl });
  const response = await api.post('/api/auth/sign-in', { data: account, headers: sameOrigin(baseUrl) });
  assert(response.ok(), `signing in as ${account.email} through the API answered ${response.status()}`);
  return api;
}

/** Opens the test's site on the tab `tab` from the fleet overview. */
async function openSiteTab(page, tab) {
  await openSite(page, siteName);
  await openTab(page, tab);
}

/** Opens the request made by the first test, by its address. */
async function openRequest(page, baseUrl, remap) {
  await page.goto(`${baseUrl}/sites/${remap.siteId}/remaps/${remap.id}`);
  await page.getByRole('heading', { level: 2, name: title }).waitFor();
}

/** True when point (x, y) lies inside the polygon (even–odd rule, ray to +x). */
function inside(polygon, x, y) {
  let odd = false;
  for (let a = 0, b = polygon.length - 1; a < polygon.length; b = a++) {
    const [xa, ya] = polygon[a];
    const [xb, yb] = polygon[b];
    if (ya > y !== yb > y && x < ((xb - xa) * (y - ya)) / (yb - ya) + xa) odd = !odd;
  }
  return odd;
}

/**
 * The remap run's map: the active map's cells with each zone's cells set to what the robots see
 * now (new and unmapped structure occupied, missing structure free), in the active map's geometry.
 * Returns the cells and how many of them changed.
 */
function remappedCells(base, version, zones) {
  assert(version.origin.yaw === 0, 'the test draws zones on an unturned map only');
  const cells = Uint8Array.from(base);
  const { width, height, resolution, origin } = version;
  let changed = 0;
  for (const zone of zones) {
    const [minX, minY, maxX, maxY] = zone.bbox;
    const i0 = Math.max(0, Math.floor((minX - origin.x) / resolution));
    const i1 = Math.min(width - 1, Math.floor((maxX - origin.x) / resolution));
    const j0 = Math.max(0, Math.floor((minY - origin.y) / resolution));
    const j1 = Math.min(height - 1, Math.floor((maxY - origin.y) / resolution));
    const state = zone.kind === 'missing' ? FREE : OCCUPIED;
    for (let j = j0; j <= j1; j++) {
      for (let i = i0; i <= i1; i++) {
        // Cell centres in map metres.
        if (!inside(zone.outline, origin.x + (i + 0.5) * resolution, origin.y + (j + 0.5) * resolution)) continue;
        if (cells[j * width + i] !== state) changed++;
        cells[j * width + i] = state;
      }
    }
  }
  return { cells, changed };
}

/**
 * A recorded scan log of one robot standing at free points of the request's area on each of `days`
 * (ISO instants at midday), every beam traced through the new map's cells to the first occupied one
 * (0.5-cell steps; no return beyond 30 m), so that the log agrees with the new map everywhere it looks.
 * Poses: points of a 1 m lattice inside the area's outlines that lie in free space (map metres).
 */
function scanLogFor(version, cells, outlines, robot, instants) {
  const { width, height, resolution, origin } = version;
  const stateAt = (x, y) => {
    const i = Math.floor((x - origin.x) / resolution);
    const j = Math.floor((y - origin.y) / resolution);
    return i < 0 || j < 0 || i >= width || j >= height ? null : cells[j * width + i];
  };
  const clear = (x, y) => [0, 0.3, -0.3].every((dx) => [0, 0.3, -0.3].every((dy) => stateAt(x + dx, y + dy) === FREE));
  const points = [];
  for (const outline of outlines) {
    const xs = outline.map((p) => p[0]);
    const ys = outline.map((p) => p[1]);
    for (let x = Math.ceil(Math.min(...xs)); x <= Math.max(...xs); x++) {
      for (let y = Math.ceil(Math.min(...ys)); y <= Math.max(...ys); y++) if (inside(outline, x, y) && clear(x, y)) points.push([x, y]);
    }
  }
  assert(points.length > 0, 'the request’s area has no free point to stand a robot on');
  const mount = robot.mounts[0] ?? { name: 'front', x: 0, y: 0, yaw: 0 };
  const beams = 360;
  const angleMin = -Math.PI;
  const angleIncrement = (2 * Math.PI) / beams;
  const rangeMax = 30;
  const step = resolution / 2;
  const lines = [];
  for (const t of instants) {
    points.forEach(([sx, sy], k) => {
      const ranges = [];
      for (let b = 0; b < beams; b++) {
        const bearing = mount.yaw + angleMin + b * angleIncrement;
        const [c, s] = [Math.cos(bearing), Math.sin(bearing)];
        let range = null;
        for (let r = step; r < rangeMax; r += step) {
          const state = stateAt(sx + r * c, sy + r * s);
          if (state === null) break;
          if (state === OCCUPIED) {
            range = Math.round(r * 1000) / 1000;
            break;
          }
        }
        ranges.push(range);
      }
      // Base pose with heading 0, so that the scanner (base ∘ mount) stands at the lattice point.
      const pose = [sx - mount.x, sy - mount.y, 0];
      lines.push(JSON.stringify({ t: new Date(Date.parse(t) + k * 1000).toISOString(), robot: robot.name, scanner: mount.name, pose, angleMin, angleIncrement, rangeMin: 0.05, rangeMax, ranges }));
    });
  }
  return { log: Buffer.from(lines.join('\n') + '\n'), poses: points.length };
}

/** Runs the site's change detection now as an admin and waits for it; returns the finished run. */
async function runDetection(baseUrl, siteId) {
  const admin = await apiAs(baseUrl, accounts.admin);
  try {
    const asked = Date.now();
    const started = await admin.post('/api/job-runs', { data: { job: 'detection', siteId }, headers: sameOrigin(baseUrl) });
    assert(started.status() === 202, `starting the detection run answered ${started.status()}`);
    const deadline = Date.now() + 120_000;
    while (Date.now() < deadline) {
      const { runs } = await getJson(admin, '/api/job-runs?job=detection&limit=50');
      const run = runs.find((r) => r.siteId === siteId && Date.parse(r.startedAt) >= asked - 1000 && r.status !== 'running');
      if (run) {
        assert(run.status === 'succeeded', `the detection run failed: ${run.error}`);
        return run;
      }
      await new Promise((resolve) => setTimeout(resolve, 1000));
    }
    throw new Error('the detection run was still running after 2 minutes');
  } finally {
    await admin.dispose();
  }
}

export const tests = [
  {
    name: 'when a mapper picks persistent zones in the zones table and plans a remap, then the request shows the area on the map, its estimate and three quiet windows, waiting for approval',
    async run({ page, baseUrl, shared, screenshot }) {
      const admin = await apiAs(baseUrl, accounts.admin);
      const sites = await waitForDetection(admin, baseUrl);
      await admin.dispose();
      const site = sites.find((s) => s.name === siteName);
      assert(site, `the demo has no site “${siteName}”`);

      await signIn(page, baseUrl, accounts.mapper);
      await openSiteTab(page, 'Zones');
      const table = page.getByRole('table', { name: 'Zones' });
      const rows = table.locator('tbody tr').filter({ hasText: 'persistent' }).filter({ has: page.getByText('open', { exact: true }) });
      await rows.first().waitFor();
      // The zone's panel offers the same step for one zone.
      await rows.first().getByRole('button', { name: /^Open zone / }).click();
      const panel = page.getByRole('dialog');
      await panel.getByTestId('zone-sentence').waitFor();
      await panel.getByRole('button', { name: 'Plan a remap' }).waitFor();
      await page.keyboard.press('Escape');
      await panel.waitFor({ state: 'hidden' });
      const picked = [];
      for (let k = 0; k < Math.min(2, await rows.count()); k++) {
        const label = (await rows.nth(k).getByRole('button', { name: /^Open zone / }).innerText()).trim();
        await page.getByRole('checkbox', { name: `Pick zone ${label} for a remap` }).check();
        picked.push(label);
      }
      assert(picked.length > 0, `${siteName} has no open persistent zone to plan`);
      const bar = page.getByRole('region', { name: 'Zones picked for a remap' });
      await bar.getByText(`${picked.length} ${picked.length === 1 ? 'zone' : 'zones'} picked`).waitFor();
      // A zone already planned cannot join another request.
      const planned = table.locator('tbody tr').filter({ has: page.getByText('remap planned', { exact: true }) });
      for (let k = 0; k < (await planned.count()); k++) assert(await planned.nth(k).getByRole('checkbox').isDisabled(), 'a planned zone can be picked again');

      await bar.getByRole('button', { name: 'Plan a remap' }).click();
      const dialog = page.getByRole('dialog', { name: 'Propose a remap' });
      await dialog.getByText('the site manager approves it before it can be scheduled').waitFor();
      for (const label of picked) await dialog.getByRole('list', { name: 'Zones in the request' }).getByText(label, { exact: true }).waitFor();
      await dialog.locator('#remap-create-title').fill(title);
      await dialog.locator('#remap-create-note').fill('The new fence by the loading bays confuses the tuggers on the morning shift.');
      await dialog.getByRole('button', { name: 'Propose remap' }).click();

      await page.waitForURL(/\/remaps\/[^/?]+$/, { timeout: 10_000 });
      await page.getByRole('heading', { level: 2, name: title }).waitFor();
      await page.getByText('awaiting approval', { exact: true }).first().waitFor();
      await expectText(page, 'Waiting for the site manager’s approval before it can be scheduled.');
      const actions = page.getByRole('group', { name: 'Request actions' });
      assert((await actions.getByRole('button', { name: 'Schedule' }).count()) === 0, 'a mapper may schedule a request before it is approved');
      assert((await actions.getByRole('button', { name: 'Approve' }).count()) === 0, 'a mapper may approve a request');
      await actions.getByRole('button', { name: 'Cancel request' }).waitFor();

      // The area to re-drive is drawn on the map, with its key; the request's zones are drawn by kind.
      await page.locator('.map-canvas[data-tiles="ready"]').waitFor({ timeout: 20_000 });
      await page.locator('path.dl-remap-area').first().waitFor();
      await page.getByRole('note').getByText(/Area to re-drive: \d+(\.\d+)? m around the zones, \d/).waitFor();
      assert((await page.locator('path.dl-zone').count()) === picked.length, `expected ${picked.length} zone outlines on the request's map`);
      const estimate = (await page.getByTestId('remap-estimate').innerText()).trim();
      assert(/^≈ (\d+ h )?\d+ min incl\. setup$|^≈ \d+ h incl\. setup$/.test(estimate), `the estimate reads “${estimate}”`);

      const id = new URL(page.url()).pathname.split('/').pop();
      const { remap } = await getJson(page.request, `${baseUrl}/api/sites/${site.id}/remaps/${id}`);
      assert(remap.status === 'proposed' && remap.approvedAt === null, `the new request is ${remap.status}, approved at ${remap.approvedAt}`);
      assert(remap.zones.every((z) => z.status === 'planned'), 'the request’s zones are not “remap planned”');
      // The page shows the request's own estimate (the server's coverage estimate) in hours and minutes.
      const minutes = Math.round(remap.estimate.totalMinutes);
      const words = minutes >= 60 ? `${Math.floor(minutes / 60)} h${minutes % 60 ? ` ${minutes % 60} min` : ''}` : `${minutes} min`;
      assert(estimate === `≈ ${words} incl. setup`, `the estimate reads “${estimate}”, the request's is ${remap.estimate.totalMinutes} min`);

      const quiet = page.getByRole('list', { name: 'Quietest windows' });
      await quiet.waitFor();
      assert((await quiet.getByRole('listitem').count()) === 3, 'expected the three quietest windows');
      assert((await quiet.getByRole('button').count()) === 0, 'a mapper is offered a window before the approval');
      await page.getByRole('img', { name: /Mean laser returns per site-local hour of the week/ }).waitFor();
      shared.remap = { id, siteId: site.id, number: remap.number };
    },
  },
  {
    name: 'when the site manager opens the Remaps tab, then the proposal is listed awaiting approval, and approving it lets the mapping team schedule it',
    async run({ page, baseUrl, shared, screenshot }) {
      assert(shared.remap, 'the request of the first remaps test is missing');
      await signIn(page, baseUrl, accounts.siteManager);
      await openSiteTab(page, 'Remaps');
      const table = page.getByRole('table', { name: 'Remap requests' });
      const row = table.locator('tbody tr').filter({ has: page.getByRole('link', { name: `Open remap request ${shared.remap.number}`, exact: true }) });
      await row.waitFor();
      await row.getByText('awaiting approval').waitFor();
      await row.getByText('not scheduled').waitFor();
      await row.getByText(/≈ .* incl\. setup/).waitFor();
      await screenshot('remaps-list.png');

      await row.getByRole('link', { name: `Open remap request ${shared.remap.number}`, exact: true }).click();
      await page.getByRole('heading', { level: 2, name: title }).waitFor();
      const actions = page.getByRole('group', { name: 'Request actions' });
      await actions.getByRole('button', { name: 'Approve' }).click();
      await expectText(page, `R-${shared.remap.number} approved`);
      await expectText(page, 'Approved; the mapping team picks a window and a mapper.');
      assert((await page.getByText('awaiting approval', { exact: true }).count()) === 0, 'the request still says “awaiting approval”');
      assert((await actions.getByRole('button', { name: 'Schedule' }).count()) === 0, 'a site manager may schedule');
      await page.getByText(/approved by Nadia Okonkwo-Hale/).waitFor();

      // The status filter narrows the list to what is asked for.
      await openTab(page, 'Remaps');
      await page.locator('#remap-filter-status').click();
      await page.getByRole('option', { name: 'verified', exact: true }).click();
      await expectText(page, 'No remap request is verified');
    },
  },
  {
    name: 'when the mapper schedules the request in the first quiet window with a colleague, then it shows the window in site time and appears on the month and week calendar',
    async run({ page, baseUrl, shared, screenshot }) {
      assert(shared.remap, 'the request of the first remaps test is missing');
      await signIn(page, baseUrl, accounts.mapper);
      await openRequest(page, baseUrl, shared.remap);
      const { quietWindows } = await getJson(page.request, `${baseUrl}/api/sites/${shared.remap.siteId}/remaps/${shared.remap.id}/quiet-windows`);
      const first = quietWindows.windows.find((w) => w.rank === 1);
      assert(first, 'the server proposed no quiet window');

      await page.getByRole('button', { name: /^Schedule in quiet window 1, / }).click();
      const dialog = page.getByRole('dialog', { name: `Schedule R-${shared.remap.number}` });
      await dialog.waitFor();
      assert(await dialog.locator('#schedule-window-1').isChecked(), 'the clicked quiet window is not preselected');
      await dialog.getByText(quietWindows.timezone).first().waitFor();
      await dialog.locator('#schedule-assignee').click();
      await page.getByRole('option', { name: `${colleague} (admin)` }).click();
      await dialog.getByRole('button', { name: 'Schedule remap' }).click();
      await dialog.waitFor({ state: 'hidden' });

      await page.getByText('scheduled', { exact: true }).first().waitFor();
      const windowText = await page.getByTestId('remap-window').innerText();
      assert(windowText.includes(first.localStart.slice(11)) && windowText.includes(quietWindows.timezone), `the window reads “${windowText}”, expected ${first.localStart} (${quietWindows.timezone})`);
      await expectText(page, colleague);
      const { remap } = await getJson(page.request, `${baseUrl}/api/sites/${shared.remap.siteId}/remaps/${shared.remap.id}`);
      assert(remap.status === 'scheduled' && remap.window.start === first.start && remap.assignee?.name === colleague, `the request is ${remap.status} at ${remap.window?.start} for ${remap.assignee?.name}`);
      await expectText(page, `Notice sent to ${colleague}`);

      // The colleague's notice reached the built-in capture server with the calendar file (admin outbox API).
      const admin = await apiAs(baseUrl, accounts.admin);
      try {
        const subject = `Remap R-${remap.number} at ${siteName} scheduled for `;
        let notice = null;
        for (const deadline = Date.now() + 20_000; !notice && Date.now() < deadline; ) {
          const { messages } = await getJson(admin, '/api/outbox?limit=50');
          notice = messages.find((m) => m.subject.startsWith(subject) && m.to.includes(accounts.admin.email));
          if (!notice) await new Promise((resolve) => setTimeout(resolve, 500));
        }
        assert(notice, `no notice “${subject}…” to ${accounts.admin.email} reached the outbox`);
        const { message } = await getJson(admin, `/api/outbox/${notice.id}`);
        const ics = message.attachments.find((a) => a.contentType === 'text/calendar');
        assert(ics && ics.filename === `driftline-remap-R-${remap.number}.ics`, `the notice carries ${JSON.stringify(message.attachments)}`);
        assert(message.text.includes(`Window: `) && message.text.includes(quietWindows.timezone), `the notice's text reads “${message.text}”`);
      } finally {
        await admin.dispose();
      }
      await page.getByRole('list', { name: 'Quietest windows' }).getByRole('listitem').first().getByText('Scheduled here').waitFor();
      await page.locator('.p-toast-message').first().waitFor({ state: 'detached', timeout: 10_000 }).catch(() => {});
      await screenshot('remap-detail.png');

      // The window as a calendar file (RFC 5545: VCALENDAR with VERSION and PRODID, a VEVENT with UID, DTSTAMP and DTSTART; UTC form YYYYMMDDTHHMMSSZ).
      const [download] = await Promise.all([page.waitForEvent('download'), page.getByRole('link', { name: 'Download calendar file (.ics)' }).click()]);
      assert(download.suggestedFilename().endsWith('.ics'), `the calendar file is called “${download.suggestedFilename()}”`);
      const ics = readFileSync(await download.path(), 'utf8');
      const unfolded = ics.replace(/\r\n[ \t]/g, '');
      const utc = (iso) => iso.replace(/[-:]/g, '').replace(/\.\d{3}/, '');
      for (const line of ['BEGIN:VCALENDAR', 'VERSION:2.0', 'BEGIN:VEVENT', `DTSTART:${utc(remap.window.start)}`, `DTEND:${utc(remap.window.end)}`, 'END:VCALENDAR']) {
        assert(unfolded.split('\r\n').includes(line), `the calendar file lacks the line “${line}”:\n${ics}`);
      }
      for (const name of ['PRODID', 'UID', 'DTSTAMP']) assert(new RegExp(`^${name}[:;]`, 'm').test(unfolded), `the calendar file lacks ${name}`);
      assert(unfolded.includes(`R-${shared.remap.number}`), 'the calendar file does not name the request');

      // The calendar, from the main navigation: the month holding the window, then its week.
      await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Remaps' }).click();
      await page.getByTestId('calendar-summary').waitFor();
      const day = remap.window.localStart.slice(0, 10);
      // The window lies in the next 14 days: this month or the next.
      const month = new Intl.DateTimeFormat('en-GB', { month: 'long', year: 'numeric', timeZone: 'UTC' }).format(new Date(`${day}T00:00:00Z`));
      const heading = page.getByRole('heading', { level: 1 });
      if ((await heading.innerText()).trim() !== month) await page.getByRole('button', { name: 'Next month' }).click();
      await page.getByRole('heading', { level: 1, name: month }).waitFor();
      const cell = page.locator(`.cal-month__day[data-day="${day}"]:not(.cal-month__day--out)`);
      const entry = cell.getByRole('link', { name: new RegExp(`^R-${shared.remap.number} .*${siteName}`) });
      await entry.waitFor();
      assert((await entry.getAttribute('data-status')) === 'scheduled', 'the calendar entry is not coloured as scheduled');
      assert((await entry.innerText()).includes(remap.window.localStart.slice(11)), 'the calendar entry does not show the site-local start');
      await screenshot('remaps-calendar.png');

      await cell.getByRole('button', { name: /^Show the week of / }).click();
      const weekEntry = page.locator(`.cal-week__column[data-day="${day}"]`).getByRole('link', { name: new RegExp(`^R-${shared.remap.number} .*${siteName}`) });
      await weekEntry.waitFor();
      await screenshot('remaps-calendar-week.png', { fullPage: false });
      await weekEntry.click();
      await page.getByRole('heading', { level: 2, name: title }).waitFor();
    },
  },
  {
    name: 'when the mapper starts the remap, attaches the uploaded map and it is activated, then the request waits for fresh evidence, and after three days of scans agreeing with the new map it is verified with its zones resolved',
    async run({ page, baseUrl, shared, screenshot }) {
      assert(shared.remap, 'the request of the first remaps test is missing');
      const { siteId } = shared.remap;
      await signIn(page, baseUrl, accounts.mapper);
      await openRequest(page, baseUrl, shared.remap);
      const actions = page.getByRole('group', { name: 'Request actions' });
      await actions.getByRole('button', { name: 'Start the remap' }).click();
      await page.getByText('in progress', { exact: true }).first().waitFor();

      // The remap run's map: the active map with the request's zones as the robots see them now, uploaded through the API.
      const { remap } = await getJson(page.request, `${baseUrl}/api/sites/${siteId}/remaps/${shared.remap.id}`);
      const { mapVersions } = await getJson(page.request, `${baseUrl}/api/sites/${siteId}/map-versions`);
      const active = mapVersions.find((v) => v.id === remap.mapVersionBefore.id);
      assert(active && active.status === 'active', 'the request’s map version is not the active one');
      const zones = await Promise.all(remap.zones.map(async (z) => (await getJson(page.request, `${baseUrl}/api/sites/${siteId}/zones/${z.id}`)).zone));
      const { cells, changed } = remappedCells(await cellsOf(page.request, baseUrl, siteId, active), active, zones);
      assert(changed > 0, 'drawing the zones changed no cell of the map');
      const image = `e2e-remap-run-${Date.now()}.pgm`;
      const yaml = [`image: ${image}`, `resolution: ${active.resolution}`, `origin: [${active.origin.x}, ${active.origin.y}, ${active.origin.yaw}]`, 'negate: 0', 'occupied_thresh: 0.65', 'free_thresh: 0.196', 'mode: trinary', ''].join('\n');
      const upload = await page.request.post(`${baseUrl}/api/sites/${siteId}/map-versions`, {
        headers: sameOrigin(baseUrl),
        multipart: {
          kind: 'floor',
          label: `Remap run R-${remap.number}`,
          image: { name: image, mimeType: 'image/x-portable-graymap', buffer: pgmOf(cells, active.width, active.height) },
          metadata: { name: image.replace('.pgm', '.yaml'), mimeType: 'application/yaml', buffer: Buffer.from(yaml) },
        },
      });
      assert(upload.status() === 201, `uploading the remap run's map answered ${upload.status()}: ${await upload.text()}`);
      const { mapVersion } = await upload.json();

      await actions.getByRole('button', { name: 'Attach the new map' }).click();
      const dialog = page.getByRole('dialog', { name: `Attach the new map to R-${remap.number}` });
      await dialog.getByText(`Version ${mapVersion.version} · Remap run R-${remap.number}`).waitFor();
      await dialog.getByRole('button', { name: 'Attach map' }).click();
      await dialog.waitFor({ state: 'hidden' });
      await page.getByText('new map uploaded', { exact: true }).first().waitFor();
      await expectText(page, `Version ${mapVersion.version} attached; activate it to start verification`);

      // Activation, as on Map versions after looking at the difference (that page has its own browser test).
      await postJson(page.request, baseUrl, `${baseUrl}/api/sites/${siteId}/map-versions/${mapVersion.id}/activate`, {});
      await page.reload();
      await expectText(page, `Version ${mapVersion.version} is active; waiting for the first nightly check`);

      // The nightly detection, run now by an admin: no evidence on the new map yet, so the request waits, with its figures before.
      const first = await runDetection(baseUrl, siteId);
      assert(first.figures?.remaps?.checked === 1, `the detection run checked ${first.figures?.remaps?.checked} remap requests`);
      await page.reload();
      const verification = page.getByTestId('remap-verification');
      await verification.getByText('Waiting for fresh evidence on the new map').waitFor();
      await verification.getByText(/^0 days of evidence on the new map/).waitFor();
      let figures = (await verification.getByTestId('remap-before-after').innerText()).trim();
      assert(/^agreement \d+\.\d % → not measured yet, changed area \d+\.\d → \d+\.\d m²$/.test(figures), `the before/after figures read “${figures}”`);
      const waiting = (await getJson(page.request, `${baseUrl}/api/sites/${siteId}/remaps/${shared.remap.id}`)).remap;
      assert(waiting.verification?.state === 'waiting' && waiting.verification.evidenceDays === 0, `the verification is ${JSON.stringify(waiting.verification)}`);

      // Fresh evidence: a recorded log of the site's first robot in the area on each of the 3 days before today,
      // counted against the new map (it is active); the next detection run then finds nothing flagging there.
      const { robots } = await getJson(page.request, `${baseUrl}/api/sites/${siteId}/robots`);
      assert(robots.length > 0, 'the demo site has no robot');
      const days = [1, 2, 3].map((k) => {
        const d = new Date();
        return new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate() - k, 12)).toISOString();
      });
      const { log, poses } = scanLogFor(active, cells, remap.area.outlines, robots[0], days);
      const sent = await page.request.post(`${baseUrl}/api/sites/${siteId}/scan-batches`, {
        headers: sameOrigin(baseUrl),
        multipart: { log: { name: `e2e-after-remap-${Date.now()}.jsonl`, mimeType: 'application/x-ndjson', buffer: log } },
      });
      assert(sent.status() === 202, `uploading the scan log answered ${sent.status()}: ${await sent.text()}`);
      const { batch } = await sent.json();
      let counted = batch;
      for (let k = 0; k < 120 && counted.status === 'processing'; k++) {
        await new Promise((resolve) => setTimeout(resolve, 500));
        counted = (await getJson(page.request, `${baseUrl}/api/sites/${siteId}/scan-batches/${batch.id}`)).batch;
      }
      assert(counted.status === 'counted', `the scan log was ${counted.status}: ${counted.error ?? ''}`);
      assert(counted.scans === 3 * poses, `expected ${3 * poses} scans counted, got ${counted.scans}`);

      const second = await runDetection(baseUrl, siteId);
      assert(second.figures?.remaps?.verified === 1, `the detection run verified ${second.figures?.remaps?.verified} requests: ${JSON.stringify(second.figures)}`);
      await page.reload();
      await page.getByText('verified', { exact: true }).first().waitFor();
      await verification.getByText('Verified: the new map fixed these zones').waitFor();
      await verification.getByText(/^3 days of evidence on the new map; none of the area flags any more/).waitFor();
      figures = (await verification.getByTestId('remap-before-after').innerText()).trim();
      assert(/^agreement \d+\.\d % → \d+\.\d %, changed area \d+\.\d → 0\.0 m²$/.test(figures), `the before/after figures read “${figures}”`);
      const done = (await getJson(page.request, `${baseUrl}/api/sites/${siteId}/remaps/${shared.remap.id}`)).remap;
      assert(done.status === 'verified' && done.zones.every((z) => z.status === 'resolved'), `the request is ${done.status} with zones ${done.zones.map((z) => z.status).join(', ')}`);
      assert(figures.includes(`changed area ${done.verification.before.changedAreaM2.toFixed(1)} →`), `the page’s figures “${figures}” are not the request’s`);
      await page.getByRole('list').filter({ hasText: zones[0].label }).getByText('resolved', { exact: true }).first().waitFor();
      assert((await page.getByRole('group', { name: 'Request actions' }).count()) === 0, 'a verified request still offers actions');
      await page.locator('.p-toast-message').first().waitFor({ state: 'detached', timeout: 10_000 }).catch(() => {});
      await screenshot('remap-verification.png');
    },
  },
];
