/**
 * Leaving the board with changes not yet on the server: closing the tab asks first, and hiding
 * the page (another app, the phone locked) sends what waits at once instead of after the quiet
 * period, which may never come.
 */
import { expect, test, type Page } from '@playwright/test';
import { apiCoachWithSkaters, PHONE, signInThroughForm } from './support';
import { tapCue } from './board-phone-taps';

async function setHidden(page: Page, hidden: boolean) {
  await page.evaluate((isHidden) => {
    Object.defineProperty(document, 'visibilityState', { configurable: true, get: () => (isHidden ? 'hidden' : 'visible') });
    document.dispatchEvent(new Event('visibilitychange'));
  }, hidden);
}

test('hiding the board sends a fresh tap at once; closing the tab with unsent changes asks first', async ({ browser, baseURL }) => {
  test.setTimeout(120_000);
  const { coach, skaters, cues } = await apiCoachWithSkaters(baseURL!, ['Tjalling Hoekstra', 'Marijke Veenstra']);
  const context = await browser.newContext({ viewport: PHONE });
  const page = await context.newPage();
  await signInThroughForm(page, baseURL!, coach.email, coach.password, 60_000);
  // Let the opening sync finish, so the push below can only come from the hide.
  await expect(page.getByTestId('sync-summary').first()).toContainText(/Synced/, { timeout: 30_000 });

  const pushes: number[] = [];
  page.on('request', (request) => {
    if (request.url().includes('/api/sync/push')) pushes.push(Date.now());
  });
  await page.getByTestId(`skater-tile-${skaters[0].id}`).click();
  await tapCue(page, cues[0]);
  await expect(page.locator('[data-testid^="feed-item-"]')).toHaveCount(1);
  await page.getByTestId(`skater-tile-${skaters[0].id}`).click(); // unpick
  await page.waitForTimeout(300); // the write commits (a few ms); the quiet period is 5 s
  const hiddenAt = Date.now();
  await setHidden(page, true);
  await expect.poll(() => pushes.length, { timeout: 4_000, message: 'a push soon after the page was hidden' }).toBeGreaterThan(0);
  expect(pushes[0] - hiddenAt).toBeLessThan(4_000);
  await setHidden(page, false);
  await expect(page.getByTestId('sync-summary').first()).toContainText(/Synced/, { timeout: 20_000 });

  // Offline, a tap waits on the device: closing the tab asks first.
  await context.setOffline(true);
  await page.getByTestId(`skater-tile-${skaters[1].id}`).click();
  await tapCue(page, cues[1]);
  await expect(page.locator('[data-testid^="feed-item-"]')).toHaveCount(2);
  await page.waitForTimeout(300);
  const asked = new Promise<string>((resolve) => page.once('dialog', (dialog) => (resolve(dialog.type()), void dialog.accept())));
  await page.close({ runBeforeUnload: true });
  expect(await asked).toBe('beforeunload');
  await context.close();
});
