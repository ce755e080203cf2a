/**
 * The head coach runs the squad from a phone: renames a skater, makes a group and moves the skater
 * into it, retires another, and finds all of it on their own board at once (no "Sync now": the
 * retired skater's tile is gone, the renamed one shows the new name and group). A name the squad
 * has is refused before anything is sent, and one added elsewhere meanwhile gets the server's
 * answer on the field. An invitation is withdrawn, sent again, accepted from the fresh link, and
 * the new coach removed again, after which their sign-in no longer works. axe checks the squad
 * screen at 390 and 1440 px; screenshots at both widths are kept.
 */
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import {
  apiCoachWithSkaters,
  DESKTOP,
  expectNoA11yViolations,
  linkFromMail,
  ownServer,
  PHONE,
  SHOTS,
  shootBoth,
  signInThroughForm,
  uniqueEmail,
  watchErrors,
} from './support';

const server = ownServer(8461);
test.afterAll(() => server.stop());

/** Change requests the page sent to the squad's routes, to prove a refused name never left. */
function countSkaterPosts(page: Page) {
  let posts = 0;
  page.on('request', (request) => {
    if (request.method() === 'POST' && /\/api\/teams\/[^/]+\/skaters$/.test(new URL(request.url()).pathname)) posts += 1;
  });
  return () => posts;
}

async function openSquad(page: Page) {
  await page.getByTestId('tab-squad').first().click();
  await expect(page.getByTestId('squad-list')).toBeVisible();
}

test('the head coach renames, moves and retires skaters, follows up an invitation and removes a member', async ({ browser }) => {
  // Many steps, each a server round trip and a sync; a busy 2-core machine needs the room.
  test.setTimeout(300_000);
  await server.start();
  const base = server.base;
  const { coach, skaters } = await apiCoachWithSkaters(base, ['Anna Reede', 'Berend Visser', 'Cato de Wit', 'Dirk Jansen']);
  const [anna, berend, cato] = skaters;

  const context = await browser.newContext({ viewport: PHONE });
  const page = await context.newPage();
  const check = watchErrors(page);
  const skaterPosts = countSkaterPosts(page);
  await signInThroughForm(page, base, coach.email, coach.password, 60_000);
  // The board has loaded the squad into the device store before anything changes.
  await expect(page.getByTestId(`skater-tile-${cato.id}`)).toBeVisible({ timeout: 30_000 });

  // --- rename Anna, make a group, move her into it ---
  await openSquad(page);
  await page.getByTestId(`squad-skater-${anna.id}`).click();
  await page.getByTestId('squad-detail-rename').click();
  await page.getByTestId('squad-rename-input').fill('Anna Reede-Bos');
  await page.getByTestId('squad-rename-save').click();
  await expect(page.getByTestId('squad-detail-done')).toContainText('Renamed to Anna Reede-Bos.');
  await expect(page.getByTestId('squad-detail-name')).toHaveText('Anna Reede-Bos');

  await page.getByTestId('squad-new-group-open').click();
  await page.getByTestId('squad-new-group-name').fill('Sprint');
  await page.getByTestId('squad-new-group-submit').click();
  await expect(page.getByTestId('squad-new-group-done')).toContainText('Group “Sprint” added');
  await page.getByTestId('squad-detail-group-choice').getByRole('radio', { name: 'Sprint' }).click();
  await expect(page.getByTestId('squad-detail-done')).toHaveText(/Anna Reede-Bos is now in Sprint\./);
  await expect(page.getByTestId('squad-detail-group')).toHaveText('Group: Sprint');

  // --- retire Cato, after the confirm ---
  await page.getByTestId(`squad-skater-${cato.id}`).click();
  await page.getByTestId('squad-detail-retire').click();
  await expect(page.getByTestId('squad-detail-retire-confirm')).toContainText('stay in the history');
  await page.screenshot({ path: path.join(SHOTS, 'squad-manage-retire-confirm-390.png') });
  await page.getByTestId('squad-detail-retire-yes').click();
  await expect(page.getByTestId('squad-detail-done')).toContainText('Cato de Wit is retired');
  await expect(page.getByTestId('squad-list').getByTestId(`squad-skater-${cato.id}`)).toHaveCount(0);
  await page.getByTestId('squad-retired-toggle').click();
  await expect(page.getByTestId('squad-retired')).toContainText('Cato de Wit');
  await expect(page.getByTestId(`squad-bring-back-${cato.id}`)).toBeVisible();

  // --- the board has all of it at once, without "Sync now" ---
  await page.getByTestId('tab-board').first().click();
  await expect(page.getByTestId(`skater-tile-${cato.id}`)).toHaveCount(0);
  await expect(page.getByTestId(`skater-tile-${anna.id}`)).toContainText('Anna Reede-Bos');
  await expect(page.getByTestId(`skater-tile-${berend.id}`)).toBeVisible();
  await page.setViewportSize(DESKTOP);
  // The wide board's tiles name the group too.
  await expect(page.getByTestId(`skater-tile-${anna.id}`)).toContainText('Sprint');
  await page.setViewportSize(PHONE);

  // --- a name the squad has is refused before sending; one added elsewhere gets the server's word ---
  await openSquad(page);
  const postsBefore = skaterPosts();
  await page.getByTestId('squad-add-skater-name').fill('berend VISSER');
  await page.getByTestId('squad-add-skater-submit').click();
  await expect(page.getByTestId('squad-add-skater-name-error')).toHaveText('“Berend Visser” is in the squad already: add an initial or a second name');
  expect(skaterPosts()).toBe(postsBefore);

  // Another device of the head coach adds "Eelke Smit" while this screen still shows the old squad.
  const added = await fetch(`${base}/api/teams/${coach.teamId}/skaters`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${coach.token}`, origin: base },
    body: JSON.stringify({ displayName: 'Eelke Smit' }),
  });
  expect(added.status).toBe(201);
  await page.getByTestId('squad-add-skater-name').fill('Eelke Smit');
  await page.getByTestId('squad-add-skater-submit').click();
  await expect(page.getByTestId('squad-add-skater-name-error')).toContainText('Eelke Smit');
  expect(skaterPosts()).toBe(postsBefore + 1);

  // --- invite an assistant, withdraw, send again, accept from the fresh link ---
  const assistant = uniqueEmail('assistant');
  await page.getByTestId('invite-email').fill(assistant);
  await page.getByTestId('invite-role-coach').click();
  await page.getByTestId('invite-submit').click();
  await expect(page.getByTestId('invite-sent')).toBeVisible();
  const firstLink = await linkFromMail(assistant);
  const invitations = page.getByTestId('invitations-list');
  await invitations.getByRole('button', { name: `Withdraw the invitation to ${assistant}` }).click();
  await expect(page.getByTestId('invitations-done')).toContainText(`Invitation to ${assistant} withdrawn: its link no longer works.`);
  await expect(invitations).toContainText('Withdrawn');
  const firstToken = new URL(firstLink).searchParams.get('token');
  expect((await fetch(`${base}/api/invitations/${firstToken}`)).ok).toBe(false);

  await invitations.getByRole('button', { name: `Send again to ${assistant}` }).click();
  await expect(page.getByTestId('invitations-done')).toContainText(`Sent again to ${assistant} with a fresh link`);
  await expect(invitations).toContainText('Waiting for an answer');
  await expect.poll(() => linkFromMail(assistant), { timeout: 30_000 }).not.toBe(firstLink);
  const freshToken = new URL(await linkFromMail(assistant)).searchParams.get('token');
  const accepted = await fetch(`${base}/api/invitations/accept`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: base },
    body: JSON.stringify({ token: freshToken, displayName: 'Sjoerd Bakker', password: 'laps-and-splits-99' }),
  });
  expect(accepted.status).toBe(200);
  const assistantToken = ((await accepted.json()) as { accessToken: string }).accessToken;
  const me = () => fetch(`${base}/api/me`, { headers: { authorization: `Bearer ${assistantToken}`, origin: base } }).then((r) => r.status);
  expect(await me()).toBe(200);

  // --- the squad screen at both widths: axe and screenshots (detail, retired list, people) ---
  await page.reload();
  await expect(page.getByTestId('squad-list')).toBeVisible({ timeout: 30_000 });
  await page.getByTestId(`squad-skater-${anna.id}`).click();
  await page.getByTestId('squad-retired-toggle').click();
  await expect(page.getByTestId('staff-coaches')).toContainText('Sjoerd Bakker');
  for (const size of [PHONE, DESKTOP]) {
    await page.setViewportSize(size);
    await expect(page.getByTestId('squad-skater-detail')).toBeVisible();
    await expectNoA11yViolations(page, 'squad (head coach, a skater open)');
  }
  await page.setViewportSize(PHONE);
  await shootBoth(page, 'squad-manage');

  // --- remove the new coach: a confirm, then they are signed out everywhere ---
  // (Checked at each width: the wide and the phone layout are separate trees, so a resize closes it.)
  const staff = page.getByTestId('staff-list');
  for (const size of [DESKTOP, PHONE]) {
    await page.setViewportSize(size);
    await staff.getByRole('button', { name: 'Remove from team: Sjoerd Bakker' }).click();
    const confirm = staff.getByRole('group', { name: 'Remove Sjoerd Bakker?' });
    await expect(confirm).toContainText('They are signed out on every device at once');
    await expect(confirm).toContainText('The notes they wrote stay');
    await confirm.scrollIntoViewIfNeeded();
    await expectNoA11yViolations(page, 'squad (removal confirm)');
    await page.screenshot({ path: path.join(SHOTS, `squad-manage-remove-confirm-${size.width}.png`) });
  }
  await staff.getByRole('button', { name: 'Remove Sjoerd Bakker' }).click();
  await expect(page.getByTestId('staff-done')).toContainText('Sjoerd Bakker is no longer on the team and is signed out on every device.');
  await expect(page.getByTestId('staff-coaches')).not.toContainText('Sjoerd Bakker');
  expect(await me()).toBe(401);

  check();
  await context.close();
});
