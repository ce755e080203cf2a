/**
 * From nothing to a skater on their phone: a head coach signs up, adds a skater profile, invites
 * the skater by e-mail; the skater opens the link from the captured mail, sets a password, signs
 * in and lands on the skater home. Screenshots at 390 px and 1440 px are kept as artifacts.
 */
import { expect, test } from '@playwright/test';
import { linkFromMail, PHONE, shootBoth, uniqueEmail, watchErrors } from './support';

test('head coach signs up, invites a skater, the skater joins and lands on their home', async ({ browser }) => {
  const coachEmail = uniqueEmail('head');
  const skaterEmail = uniqueEmail('skater');
  const password = 'cold-hands-warm-laps';
  const skaterName = 'Wietske Faber';

  // --- the head coach, on a phone ---
  const coach = await browser.newPage({ viewport: PHONE });
  const coachErrors = watchErrors(coach);
  await coach.goto('/sign-up');
  await expect(coach.getByTestId('sign-up-screen')).toBeVisible();
  await shootBoth(coach, 'sign-up');
  await coach.getByTestId('sign-up-name').fill('Hiske Oldenhof');
  await coach.getByTestId('sign-up-team').fill('Ijsbaan Noord Juniors');
  await coach.getByTestId('sign-up-email').fill(coachEmail);
  await coach.getByTestId('sign-up-password').fill(password);
  await coach.getByTestId('sign-up-submit').click();
  await expect(coach.getByTestId('coach-home')).toBeVisible();
  await expect(coach.getByTestId('team-name').first()).toHaveText('Ijsbaan Noord Juniors');

  await coach.getByTestId('tab-squad').first().click();
  await expect(coach.getByTestId('squad-home')).toBeVisible();
  await coach.getByTestId('squad-add-skater-name').fill(skaterName);
  await coach.getByTestId('squad-add-skater-submit').click();
  await expect(coach.getByTestId('squad-add-skater-done')).toBeVisible();
  await expect(coach.getByTestId('squad-list')).toContainText(skaterName);

  await coach.getByTestId('invite-email').fill(skaterEmail);
  await coach.getByTestId('invite-role-skater').click();
  await coach.getByTestId('invite-form').getByText(skaterName, { exact: true }).click();
  await coach.getByTestId('invite-submit').click();
  await expect(coach.getByTestId('invite-sent')).toBeVisible();
  await expect(coach.getByTestId('invitations-list')).toContainText(skaterEmail);
  await shootBoth(coach, 'squad-after-invite');
  coachErrors();

  // --- the skater, on their own phone (a separate browser context: no shared cookies) ---
  const link = await linkFromMail(skaterEmail);
  expect(new URL(link).pathname).toBe('/accept-invite');
  const skaterContext = await browser.newContext({ viewport: PHONE });
  const skater = await skaterContext.newPage();
  const skaterErrors = watchErrors(skater);
  await skater.goto(link);
  await expect(skater.getByTestId('accept-summary')).toContainText('Ijsbaan Noord Juniors');
  await expect(skater.getByTestId('accept-summary')).toContainText('Hiske Oldenhof');
  await shootBoth(skater, 'accept-invite');
  await skater.getByTestId('accept-name').fill(skaterName);
  await skater.getByTestId('accept-password').fill(password);
  await skater.getByTestId('accept-submit').click();
  await expect(skater.getByTestId('skater-home')).toBeVisible();

  // Sign out, then sign in as the skater: the skater home again, never the coach area.
  await skater.getByTestId('sign-out').first().click();
  await expect(skater.getByTestId('sign-in-screen')).toBeVisible();
  await shootBoth(skater, 'sign-in');
  await skater.getByTestId('sign-in-email').fill(skaterEmail);
  await skater.getByTestId('sign-in-password').fill(password);
  await skater.getByTestId('sign-in-submit').click();
  await expect(skater.getByTestId('skater-home')).toBeVisible();
  await expect(skater.getByTestId('skater-home')).toContainText('Wietske');
  await expect(skater.getByTestId('safety-note')).toBeVisible();
  await shootBoth(skater, 'skater-home');
  await skater.goto('/squad');
  await expect(skater.getByTestId('skater-home')).toBeVisible();
  skaterErrors();
  await skaterContext.close();
  await coach.close();
});

test('a wrong password shows the server message next to the form, and the page has no errors', async ({ page }) => {
  const check = watchErrors(page);
  await page.goto('/sign-in');
  await page.getByTestId('sign-in-email').fill('nobody@e2e.example');
  await page.getByTestId('sign-in-password').fill('not-the-password');
  await page.getByTestId('sign-in-submit').click();
  await expect(page.getByTestId('sign-in-error')).toContainText('E-mail or password is not right');
  await page.getByTestId('sign-in-email').fill('not-an-address');
  await page.getByTestId('sign-in-password').focus();
  await expect(page.getByTestId('sign-in-email-error')).toHaveText('Enter a valid e-mail address');
  check();
});
