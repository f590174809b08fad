// Small helpers shared by the browser tests: signing in and plain assertions with readable messages.

/** The seeded demo accounts (see the API contract); invented people at .example domains. */
export const accounts = {
  admin: { email: 'iris.admin@kestrelway.example', password: 'demo-admin-2026' },
  siteManager: { email: 'nadia.manager@ambergate.example', password: 'demo-manager-2026' },
  viewer: { email: 'owen.viewer@ambergate.example', password: 'demo-viewer-2026' },
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
