/**
 * The board with the API server down: a coach signed in once records a whole session with no
 * server, reloads, and finds every note (and its outbox entry) still on the device. This test
 * starts its own server so it can stop it; the web app then comes from the service worker.
 */
import { expect, test, type Page } from '@playwright/test';
import { apiCoachWithSkaters, DESKTOP, PHONE, shootBoth, signInThroughForm, watchErrors, ownServer } from './support';
import { tapCue } from './board-phone-taps';

const server = ownServer(8433);
const BASE = server.base;
const startServer = () => server.start();
const stopServer = () => server.stop();

test.afterAll(stopServer);

const tile = (page: Page, id: string) => page.getByTestId(`skater-tile-${id}`);

test('a whole session recorded with the server down survives a reload: 24 notes, 24 waiting', async ({ browser }) => {
  await startServer();
  const names = ['Anke Rijpma', 'Bauke Smit', 'Dirkje Wouda', 'Eelke Visser', 'Froukje Tol'];
  const { coach, skaters, cues } = await apiCoachWithSkaters(BASE, names);
  const page = await browser.newPage({ viewport: PHONE });
  const check = watchErrors(page, [/Failed to load resource/, /ERR_CONNECTION_REFUSED/]);
  await signInThroughForm(page, BASE, coach.email, coach.password);
  for (const s of skaters) await expect(tile(page, s.id)).toBeVisible();
  // The app shell must be on the device before the server goes away.
  await page.evaluate(() => navigator.serviceWorker.ready.then(() => true));

  await stopServer();

  const tapFor = async (skaterIndex: number, cueIndex: number, undo = false) => {
    await tile(page, skaters[skaterIndex].id).click();
    await tapCue(page, cues[cueIndex]);
    if (undo) {
      // Undo names this tap until the pick changes.
      await expect(page.getByTestId('undo-bar')).toContainText(cues[cueIndex].label);
      await page.getByTestId('undo-button').click();
    }
    await tile(page, skaters[skaterIndex].id).click();
  };

  // 20 single notes, 4 per skater.
  for (let i = 0; i < 20; i += 1) await tapFor(i % 5, i % 7);
  // One "good": the second zone of a chip.
  await tile(page, skaters[0].id).click();
  await tapCue(page, cues[3], 'good');
  await tile(page, skaters[0].id).click();
  // One group cue for three skaters at once.
  for (const i of [1, 2, 3]) await tile(page, skaters[i].id).click();
  await tapCue(page, cues[10]);
  for (const i of [1, 2, 3]) await tile(page, skaters[i].id).click();
  // One more, undone at once.
  await tapFor(4, 12, true);

  const items = page.locator('[data-testid^="feed-item-"]');
  await expect(items).toHaveCount(24);
  await shootBoth(page, 'board-offline');

  // The cue library works offline too: a new cue, then its chip on the board.
  await page.getByTestId('cue-library-open').click();
  await page.getByTestId('cue-add-phase-straight').click();
  await page.getByTestId('cue-add-input').fill('Quiet arms on the straight');
  await page.getByTestId('cue-add-save').click();
  await expect(page.getByTestId('cue-library-straight')).toContainText('Quiet arms on the straight');
  await shootBoth(page, 'cue-library');
  await page.getByTestId('cue-library-close').click();
  await page.getByTestId('phase-tab-straight').click();
  await expect(page.getByTestId('cue-section-straight')).toContainText('Quiet arms on the straight');

  await page.reload();
  await expect(page.getByTestId('coach-home')).toBeVisible();
  await expect(page.getByTestId('status-offline')).toBeVisible();
  await expect(items).toHaveCount(24);
  await expect(page.getByTestId('status-pending')).toHaveAttribute('aria-label', /24 notes.*1 cue change/);
  await page.getByTestId('phase-tab-straight').click();
  await expect(page.getByTestId('cue-section-straight')).toContainText('Quiet arms on the straight');

  // Right skaters: 4 each, plus the good note for skater 0 and the group cue for 1-3.
  const expected = [5, 5, 5, 5, 4];
  for (const [i, s] of skaters.entries()) await expect(page.getByTestId(`tile-count-${s.id}`)).toContainText(String(expected[i]));
  // Right marks and cues.
  await expect(page.getByTestId('feed').getByText('Good', { exact: true })).toHaveCount(1);
  await expect(items.filter({ hasText: cues[10].label })).toHaveCount(3);
  await expect(items.filter({ hasText: cues[12].label })).toHaveCount(0);

  await page.setViewportSize(DESKTOP);
  await shootBoth(page, 'board-offline-after-reload');
  check();
  await page.close();
});

test('opened from the home screen with the server down, the app starts on the board', async ({ browser }) => {
  await startServer();
  const { coach, skaters } = await apiCoachWithSkaters(BASE, ['Griet Hoekstra', 'Hessel Dijkstra']);
  const context = await browser.newContext({ viewport: PHONE });
  const first = await context.newPage();
  await signInThroughForm(first, BASE, coach.email, coach.password);
  await expect(tile(first, skaters[0].id)).toBeVisible();
  // What "add to home screen" reads: the manifest linked from the page, with a standalone start.
  const manifestHref = await first.locator('link[rel="manifest"]').getAttribute('href');
  expect(manifestHref).toBeTruthy();
  await first.evaluate(() => navigator.serviceWorker.ready.then(() => true));
  await first.close();

  await stopServer();

  // A launch from the home screen: a new window at the manifest's start_url, nothing open before.
  const launched = await context.newPage();
  const check = watchErrors(launched, [/Failed to load resource/, /ERR_CONNECTION_REFUSED/]);
  await launched.goto(`${BASE}/`);
  const fromPage = await launched.evaluate(async (href) => {
    const res = await fetch(href!);
    return res.ok ? ((await res.json()) as { start_url: string; display: string }) : null;
  }, manifestHref);
  expect(fromPage).toMatchObject({ start_url: '/', display: 'standalone' });
  await expect(launched.getByTestId('coach-home')).toBeVisible({ timeout: 30_000 });
  await expect(launched.getByTestId('status-offline')).toBeVisible();
  for (const s of skaters) await expect(tile(launched, s.id)).toBeVisible();
  // The home-screen icon the manifest names comes from the device too.
  const iconOk = await launched.evaluate(() => fetch('/icons/icon-192.png').then((r) => r.ok && r.headers.get('content-type')?.startsWith('image/')));
  expect(iconOk).toBe(true);
  await shootBoth(launched, 'board-launched-offline');
  check();
  await context.close();
});
