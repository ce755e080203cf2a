/**
 * One tab owns the device database. A second tab says so plainly and offers to take over; taking
 * over moves the board there with every note recorded in the first tab, and the first tab says
 * where it went. Never a blank or broken page.
 */
import { expect, test } from '@playwright/test';
import { apiCoachWithSkaters, PHONE, shootBoth, signInThroughForm, watchErrors } from './support';
import { tapCue } from './board-phone-taps';

test('a second tab offers to take over and loses nothing recorded in the first', async ({ browser, baseURL }) => {
  const { coach, skaters, cues } = await apiCoachWithSkaters(baseURL!, ['Geeske Kuperus', 'Hylke de Boer']);
  const context = await browser.newContext({ viewport: PHONE });
  const first = await context.newPage();
  const firstErrors = watchErrors(first);
  await signInThroughForm(first, baseURL!, coach.email, coach.password);

  for (const [i, s] of skaters.entries()) {
    await first.getByTestId(`skater-tile-${s.id}`).click();
    await tapCue(first, cues[i]);
    await first.getByTestId(`skater-tile-${s.id}`).click();
  }
  await expect(first.locator('[data-testid^="feed-item-"]')).toHaveCount(2);

  const second = await context.newPage();
  const secondErrors = watchErrors(second);
  await second.goto(`${baseURL}/board`);
  await expect(second.getByTestId('device-elsewhere')).toBeVisible();
  await expect(second.getByTestId('device-elsewhere')).toContainText('open in another tab');
  await shootBoth(second, 'board-second-tab');
  // The first tab is untouched while the second one only asks.
  await expect(first.locator('[data-testid^="feed-item-"]')).toHaveCount(2);

  await second.getByTestId('device-take-over').click();
  await expect(second.getByTestId('coach-home')).toBeVisible();
  await expect(second.locator('[data-testid^="feed-item-"]')).toHaveCount(2);
  await expect(first.getByTestId('device-moved')).toBeVisible();

  // Taking it back works the same way.
  await first.getByTestId('device-take-over').click();
  await expect(first.getByTestId('coach-home')).toBeVisible();
  await expect(first.locator('[data-testid^="feed-item-"]')).toHaveCount(2);
  await expect(second.getByTestId('device-moved')).toBeVisible();
  firstErrors();
  secondErrors();
  await context.close();
});
