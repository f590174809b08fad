// The site's Settings tab: admins change settings through a checked form; other roles read them.
// The admin works on a site no other browser test looks at, so that changed bands do not move
// what those tests expect.
import { accounts, assert, expectText, openSite, openTab, signIn } from './helpers.mjs';

const editedSite = 'Quarrington Vale Returns';
const viewedSite = 'Fennick Cross DC';

/** Opens a site's Settings tab from the fleet overview and waits for the form. */
async function openSettings(page, siteName) {
  await openSite(page, siteName);
  await openTab(page, 'Settings');
  await page.getByRole('heading', { name: 'Nightly detection' }).waitFor();
}

/** Picks an option of a PrimeVue select by its visible label. */
async function choose(page, id, label) {
  await page.locator(`#${id}`).click();
  await page.getByRole('option', { name: label, exact: true }).click();
}

/** Types a number into a PrimeVue number input and leaves it, so that the input hands the value to the form. */
async function typeNumber(page, id, value) {
  const input = page.locator(`#${id}`);
  await input.fill(String(value));
  await input.press('Tab');
}

export const tests = [
  {
    name: 'when an admin sets “watch” up to “good”, then the form refuses it beside the field and will not save; a server refusal shows beside its field',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.admin);
      await openSettings(page, editedSite);
      const save = page.getByRole('button', { name: 'Save settings' });
      assert(await save.isDisabled(), '“Save settings” is enabled before anything changed');

      await typeNumber(page, 'setting-healthWatchMin', 97);
      await expectText(page, '“Watch” must start below “good” (97 %).');
      assert(await save.isDisabled(), '“Save settings” is enabled while good ≤ watch');
      const described = await page.locator('#setting-healthWatchMin').getAttribute('aria-describedby');
      assert(described?.includes('setting-healthWatchMin-error'), `the watch input does not point at its error (aria-describedby “${described}”)`);
      await page.locator('#setting-healthWatchMin').evaluate((el) => el.scrollIntoView({ block: 'center' }));
      await screenshot('site-settings-refused.png', { fullPage: false });

      await typeNumber(page, 'setting-healthWatchMin', 98);
      await expectText(page, '“Watch” must start below “good” (97 %).');
      await page.getByRole('button', { name: 'Discard changes' }).click();
      assert((await page.locator('#setting-healthWatchMin').inputValue()) === '90 %', 'discarding did not put the watch band back to 90 %');
      assert((await page.getByText('“Watch” must start below “good”').count()) === 0, 'the refusal stays after discarding');

      // When the server refuses a change, its message stands beside the field it names. Answer the next change the way the server answers a refused value.
      await page.route(
        '**/api/sites/*/settings',
        (route) =>
          route.request().method() === 'PATCH'
            ? route.fulfill({
                status: 400,
                contentType: 'application/json',
                body: JSON.stringify({ error: { code: 'invalid_body', message: 'Some settings are out of range.', details: { fieldErrors: { retentionDays: ['must be at most 730'] } } } }),
              })
            : route.fallback(),
        { times: 1 },
      );
      await typeNumber(page, 'setting-retentionDays', 90);
      await page.getByRole('button', { name: 'Save settings' }).click();
      await expectText(page, 'The settings were not saved.');
      await expectText(page, 'Some settings are out of range.');
      await expectText(page, 'Must be at most 730.');
      assert((await page.getByText('Settings saved').count()) === 0, 'a refused change was reported as saved');
      await typeNumber(page, 'setting-retentionDays', 91);
      assert((await page.getByText('Must be at most 730.').count()) === 0, 'the server’s refusal stays after the field was edited');
    },
  },
  {
    name: 'when an admin changes the detection hour and the watch band, then the change is saved, the header follows and a reload shows it',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.admin);
      await openSettings(page, editedSite);
      await choose(page, 'setting-detectionHour', '04:00');
      await typeNumber(page, 'setting-healthWatchMin', 92);
      await expectText(page, '2 changes not saved yet');
      const save = page.getByRole('button', { name: 'Save settings' });
      assert(await save.isEnabled(), '“Save settings” stays disabled after a valid change');
      await save.click();
      await expectText(page, 'Settings saved');
      await expectText(page, 'Local hour of the run: 02:00 → 04:00');
      await expectText(page, '“Watch” from: 90 % → 92 %');
      // The header reloads the site: its trend line names the new "remap advised" limit.
      await expectText(page, '‘remap advised’ below 92 %');
      await expectText(page, 'No changes.');

      await page.reload();
      await page.getByRole('heading', { name: 'Nightly detection' }).waitFor();
      const hour = (await page.locator('#setting-detectionHour').innerText()).trim();
      const watch = await page.locator('#setting-healthWatchMin').inputValue();
      assert(hour === '04:00', `after a reload the detection hour reads “${hour}”, not 04:00`);
      assert(watch === '92 %', `after a reload the watch band reads “${watch}”, not 92 %`);
      await expectText(page, 'default: 02:00');
      await expectText(page, 'default: 90 %');
      await page.locator('.p-toast-message').first().waitFor({ state: 'detached' }).catch(() => {});
      await screenshot('site-settings-admin.png');

      // Put the site back, so that the demo reads as seeded for anyone who looks next.
      await page.getByRole('button', { name: /Use the default for Local hour of the run/ }).click();
      await page.getByRole('button', { name: /Use the default for “Watch” from/ }).click();
      await page.getByRole('button', { name: 'Save settings' }).click();
      await expectText(page, 'Local hour of the run: 04:00 → 02:00');
    },
  },
  {
    name: 'when a viewer opens a site’s settings, then the values show with their units and there is no form; a failed load offers “Try again”',
    async run({ page, baseUrl, screenshot }) {
      await signIn(page, baseUrl, accounts.viewer);
      await openSettings(page, viewedSite);
      for (const heading of ['Health bands', 'How returns are judged', 'Scanner check', 'Evidence kept']) {
        await page.getByRole('heading', { name: heading }).waitFor();
      }
      await expectText(page, 'The operator’s admins change these settings.');
      await expectText(page, 'product defaults');
      await expectText(page, 'These settings steer map maintenance only.');
      const value = async (key) => (await page.locator(`[data-setting="${key}"]`).innerText()).trim();
      assert((await value('detectionHour')) === '02:00', `the detection hour reads “${await value('detectionHour')}”`);
      assert((await value('agreementToleranceM')) === '0.10 m', `the tolerance reads “${await value('agreementToleranceM')}”`);
      assert((await value('retentionDays')) === '60 days', `the retention reads “${await value('retentionDays')}”`);
      const settings = page.locator('.settings-page');
      for (const role of ['spinbutton', 'switch', 'combobox', 'textbox']) {
        const count = await settings.getByRole(role).count();
        assert(count === 0, `a viewer sees ${count} ${role} control(s) on the settings tab`);
      }
      assert((await page.getByRole('button', { name: /Save settings|Use default|Discard/ }).count()) === 0, 'a viewer sees a form button');
      await screenshot('site-settings-viewer.png');

      // When loading the settings fails, the tab says so and “Try again” loads them.
      await openTab(page, 'Overview');
      await page.route('**/api/sites/*/settings', (route) => route.fulfill({ status: 503, contentType: 'application/json', body: JSON.stringify({ error: { code: 'unavailable', message: 'The database is busy; please try again.' } }) }), { times: 1 });
      await openTab(page, 'Settings');
      await expectText(page, 'The settings could not be loaded');
      await expectText(page, 'The database is busy; please try again.');
      await page.getByRole('button', { name: 'Try again' }).click();
      await page.getByRole('heading', { name: 'Nightly detection' }).waitFor();
    },
  },
];
