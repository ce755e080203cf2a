/**
 * A sign-out at the rink, with the server out of reach, still holds on this device. The coach
 * signs out while the server is down; when it is back, a reload shows the sign-in form (never the
 * coach's board, no refresh is even tried), the sign-out reaches the server by itself, and the
 * sign-in it ended is over there too: the old refresh cookie and the old access token are refused.
 * The next person to sign in on the device gets their own session, after the old one was ended.
 */
import { expect, test, type BrowserContext, type Page, type Request } from '@playwright/test';
import { apiCoachWithSkaters, ownServer, PHONE, shootBoth, signInThroughForm, watchErrors } from './support';

const server = ownServer(8447);
const BASE = server.base;
const REFRESH_COOKIE = 'boardside_refresh';

test.afterAll(() => server.stop());

/** Signs in through the form and returns the access token the server handed out. */
async function signIn(page: Page, email: string, password: string): Promise<string> {
  const answer = page.waitForResponse((r) => r.url().endsWith('/api/auth/sign-in') && r.status() === 200);
  await signInThroughForm(page, BASE, email, password);
  return ((await (await answer).json()) as { accessToken: string }).accessToken;
}

async function refreshCookie(context: BrowserContext) {
  // The cookie is scoped to /api/auth: ask for it at a URL under that path.
  return (await context.cookies(`${BASE}/api/auth/refresh`)).find((c) => c.name === REFRESH_COOKIE);
}

/** Signs out with the server stopped; the sign-in form shows at once. */
async function signOutOffline(page: Page) {
  await server.stop();
  await page.getByTestId('sign-out').first().click();
  await expect(page.getByTestId('sign-in-email')).toBeVisible();
  await expect(page.getByTestId('coach-home')).toHaveCount(0);
}

/** The server's answers to an old refresh cookie and an old access token, asked from the page. */
async function oldCredentialsAnswer(page: Page, context: BrowserContext, cookie: NonNullable<Awaited<ReturnType<typeof refreshCookie>>>, token: string) {
  await context.addCookies([cookie]);
  return page.evaluate(async (accessToken) => {
    const refresh = await fetch('/api/auth/refresh', { method: 'POST', credentials: 'include' });
    const me = await fetch('/api/me', { headers: { Authorization: `Bearer ${accessToken}` } });
    return { refresh: refresh.status, me: me.status };
  }, token);
}

const ALLOWED = [/Failed to load resource/, /ERR_CONNECTION_REFUSED/, /ERR_INTERNET_DISCONNECTED/];

test('a sign-out made offline holds after the server is back and the app reloads', async ({ browser }) => {
  test.setTimeout(120_000);
  await server.start();
  const { coach } = await apiCoachWithSkaters(BASE, ['Marrit Zijlstra']);

  const context = await browser.newContext({ viewport: PHONE });
  const page = await context.newPage();
  const errors = watchErrors(page, ALLOWED);
  const token = await signIn(page, coach.email, coach.password);
  await page.evaluate(() => navigator.serviceWorker.ready.then(() => true));
  const cookie = await refreshCookie(context);
  expect(cookie, 'the sign-in set the refresh cookie').toBeTruthy();

  await signOutOffline(page);

  // The server is back; the app starts again on this device.
  await server.start();
  const requests: string[] = [];
  const record = (request: Request) => {
    if (request.url().includes('/api/auth/')) requests.push(new URL(request.url()).pathname);
  };
  page.on('request', record);
  const signOutSent = page.waitForResponse((r) => r.url().endsWith('/api/auth/sign-out'));
  await page.reload();
  await expect(page.getByTestId('sign-in-email')).toBeVisible();
  expect((await signOutSent).status()).toBe(204);
  // The server's answer dropped the cookie from the browser.
  await expect.poll(async () => (await refreshCookie(context)) === undefined).toBe(true);
  await page.waitForTimeout(500);
  await expect(page.getByTestId('coach-home')).toHaveCount(0);
  await expect(page.getByTestId('sign-in-email')).toBeVisible();
  expect(requests).not.toContain('/api/auth/refresh');
  page.off('request', record);
  await shootBoth(page, 'sign-out-offline-after-reload');

  // The sign-in is over on the server too: a copy of the old cookie or token gets nothing.
  expect(await oldCredentialsAnswer(page, context, cookie!, token)).toEqual({ refresh: 401, me: 401 });

  // A later reload stays signed out and sends nothing more.
  await context.clearCookies();
  const later: string[] = [];
  page.on('request', (r) => {
    if (r.url().includes('/api/auth/sign-out')) later.push(r.url());
  });
  await page.reload();
  await expect(page.getByTestId('sign-in-email')).toBeVisible();
  await page.waitForTimeout(500);
  expect(later).toEqual([]);

  errors();
  await context.close();
  await server.stop();
});

test('the next person signing in on the device sends the pending sign-out first', async ({ browser }) => {
  test.setTimeout(120_000);
  await server.start();
  const { coach } = await apiCoachWithSkaters(BASE, ['Sjoerd Hiemstra']);
  const { coach: other } = await apiCoachWithSkaters(BASE, ['Anouk Terpstra']);

  const context = await browser.newContext({ viewport: PHONE });
  const page = await context.newPage();
  const errors = watchErrors(page, ALLOWED);
  const token = await signIn(page, coach.email, coach.password);
  await page.evaluate(() => navigator.serviceWorker.ready.then(() => true));
  const cookie = await refreshCookie(context);
  expect(cookie).toBeTruthy();

  await signOutOffline(page);
  await server.start();

  // No reload: the other coach signs in on the form that is already showing.
  const order: string[] = [];
  page.on('request', (r) => {
    const path = new URL(r.url()).pathname;
    if (path === '/api/auth/sign-out' || path === '/api/auth/sign-in') order.push(path);
  });
  await page.getByTestId('sign-in-email').fill(other.email);
  await page.getByTestId('sign-in-password').fill(other.password);
  await page.getByTestId('sign-in-submit').click();
  await expect(page.getByTestId('coach-home')).toBeVisible();
  // The old sign-out went first: sent after the new sign-in it would have ended the new one.
  expect(order[0]).toBe('/api/auth/sign-out');
  expect(order[order.length - 1]).toBe('/api/auth/sign-in');

  // The new person's session is the live one and survives a reload.
  const current = await refreshCookie(context);
  expect(current?.value).not.toBe(cookie!.value);
  await page.reload();
  await expect(page.getByTestId('coach-home')).toBeVisible();

  // The first coach's sign-in is over on the server.
  const fresh = await refreshCookie(context);
  expect(await oldCredentialsAnswer(page, context, cookie!, token)).toEqual({ refresh: 401, me: 401 });
  await context.addCookies([fresh!]);

  errors();
  await context.close();
  await server.stop();
});
