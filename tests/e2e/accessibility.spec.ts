/**
 * Every screen checked by axe-core at phone (390 px) and desktop (1440 px) width: the signed-out
 * forms, the coach's board with its cue library, session panel and sync panel, the clock, the
 * evening review, the squad, and the skater's today page. Any violation fails the run and names
 * the rule, the screen, the width and the elements (every screen is checked before a test fails).
 */
import { expect, test } from '@playwright/test';
import { apiCoachWithSkaters, checkA11yAtBothWidths, DESKTOP, expectNoA11yViolations, linkFromMail, PHONE, signInThroughForm, uniqueEmail, watchErrors } from './support';
import { tapCue } from './board-phone-taps';

test('signed-out screens have no accessibility violations', async ({ page, baseURL }) => {
  const errors = watchErrors(page);
  await page.goto(`${baseURL}/sign-in`);
  await checkA11yAtBothWidths(page, 'sign-in', () => expect(page.getByTestId('sign-in-submit')).toBeVisible());
  await page.goto(`${baseURL}/sign-up`);
  await checkA11yAtBothWidths(page, 'sign-up', () => expect(page.getByTestId('sign-up-submit')).toBeVisible());
  await page.goto(`${baseURL}/forgot-password`);
  await checkA11yAtBothWidths(page, 'forgot password', () => expect(page.getByTestId('forgot-submit')).toBeVisible());
  errors();
});

test("the coach's screens have no accessibility violations", async ({ page, baseURL }) => {
  test.setTimeout(120_000);
  const { coach, skaters, cues } = await apiCoachWithSkaters(baseURL!, ['Wietske Anema', 'Douwe Sikkema', 'Froukje Terpstra']);
  const errors = watchErrors(page);
  await page.setViewportSize(PHONE);
  await signInThroughForm(page, baseURL!, coach.email, coach.password, 60_000);
  await expect(page.getByTestId(`skater-tile-${skaters[0].id}`)).toBeVisible({ timeout: 30_000 });

  // The board with a note recorded, so tiles carry counts and the feed has an item.
  await page.getByTestId(`skater-tile-${skaters[0].id}`).click();
  await tapCue(page, cues[0]);
  await expect(page.locator('[data-testid^="feed-item-"]').first()).toBeAttached();
  await checkA11yAtBothWidths(page, 'board', () => expect(page.getByTestId(`skater-tile-${skaters[1].id}`)).toBeVisible());

  // A width change swaps the phone and wide layouts: wait for the phone's board before scrolling.
  await expect(page.getByTestId('board-phone')).toBeVisible();
  await expect(async () => page.getByTestId('session-panel').first().scrollIntoViewIfNeeded({ timeout: 2_000 })).toPass();
  await checkA11yAtBothWidths(page, 'session panel', () => expect(page.getByTestId('session-panel').first()).toBeAttached());

  await page.getByTestId('cue-library-open').first().click();
  await checkA11yAtBothWidths(page, 'cue library', () => expect(page.getByTestId('cue-library')).toBeVisible());
  await page.getByTestId('cue-library-close').click();

  // The sync panel is opened and closed at each width: a width change swaps the layout it sits in.
  for (const size of [PHONE, DESKTOP]) {
    await page.setViewportSize(size);
    await page.getByTestId('sync-summary').first().click();
    await expect(page.getByTestId('sync-panel')).toBeVisible();
    await expectNoA11yViolations(page, 'sync panel');
    await page.getByTestId('sync-close').click();
    await expect(page.getByTestId('sync-panel')).toBeHidden();
  }
  await page.setViewportSize(PHONE);

  await page.getByTestId('tab-clock').click();
  await checkA11yAtBothWidths(page, 'clock', () => expect(page.getByTestId('clock-home')).toBeVisible());
  await page.getByTestId('tab-review').click();
  await checkA11yAtBothWidths(page, 'review', () => expect(page.getByTestId('review-home')).toBeVisible());
  await page.getByTestId('tab-squad').click();
  await checkA11yAtBothWidths(page, 'squad', () => expect(page.getByTestId('squad-list-pane')).toBeVisible());
  errors();
});

test("the skater's today page has no accessibility violations", async ({ browser, baseURL }) => {
  test.setTimeout(120_000);
  const base = baseURL!;
  const { coach, skaters, cues } = await apiCoachWithSkaters(base, ['Sjoukje Dijkstra-Bos']);
  const email = uniqueEmail('sjoukje');
  const invite = await fetch(`${base}/api/teams/${coach.teamId}/invitations`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${coach.token}`, origin: base },
    body: JSON.stringify({ email, role: 'skater', skaterId: skaters[0].id }),
  });
  expect(invite.status).toBe(201);
  const token = new URL(await linkFromMail(email)).searchParams.get('token');
  const accepted = await fetch(`${base}/api/invitations/accept`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: base },
    body: JSON.stringify({ token, displayName: 'Sjoukje Dijkstra-Bos', password: 'edges-sharp-today' }),
  });
  expect(accepted.status).toBe(200);

  // The coach records two cues for her and sends them.
  const coachContext = await browser.newContext({ viewport: PHONE });
  const c = await coachContext.newPage();
  await signInThroughForm(c, base, coach.email, coach.password, 60_000);
  for (const cue of cues.slice(0, 2)) {
    await c.getByTestId(`skater-tile-${skaters[0].id}`).click();
    await tapCue(c, cue);
    await c.getByTestId(`skater-tile-${skaters[0].id}`).click();
  }
  await c.getByTestId('sync-summary').first().click();
  await c.getByTestId('sync-now').click();
  await expect(c.getByTestId('sync-panel-pending')).toHaveText('0 changes waiting to be sent', { timeout: 20_000 });
  await coachContext.close();

  const context = await browser.newContext({ viewport: PHONE });
  const page = await context.newPage();
  const errors = watchErrors(page);
  await page.goto(`${base}/sign-in`);
  await page.getByTestId('sign-in-email').fill(email);
  await page.getByTestId('sign-in-password').fill('edges-sharp-today');
  await page.getByTestId('sign-in-submit').click();
  await checkA11yAtBothWidths(page, 'today', () => expect(page.locator('[data-testid^="note-cue-"]').first()).toBeVisible({ timeout: 60_000 }));
  errors();
  await context.close();
});
