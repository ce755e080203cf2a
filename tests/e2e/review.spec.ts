/**
 * The evening review against the real server: a head coach whose notes (two skaters, one cue, in
 * this week and weeks before) reach the server through the sync push, as the board sends them.
 * At 1440 px: the whole team's table and one skater's show the counts the data says, an empty
 * week says "no marks", the notes behind a cell show with their day, coach, mark and words, and a
 * mis-tapped mark is changed in place (device store, sync) and the counts follow; the one-week
 * table too. At 390 px the same screen is stacked, every target at least 48 px. axe
 * checks both widths; screenshots 'review-skater' and 'review-week' are kept.
 */
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import { v4 as uuidv4, v7 as uuidv7 } from 'uuid';

import { HybridClock } from '../../shared/hlc';
import { weekOf } from '../../shared/weeks';
import { apiCoachWithSkaters, DESKTOP, expectNoA11yViolations, expectTapTargetsAtLeast, PHONE, SHOTS, shootBoth, signInThroughForm, teamFromLastSeason, userIdOf, watchErrors } from './support';

const DAY = 86_400_000;



type Note = { skaterId: string; weeksAgo: number; mark: 'needs_work' | 'good'; note?: string };

async function pushNotes(base: string, teamId: string, token: string, cueId: string, notes: Note[]) {
  const clientId = uuidv4();
  const clock = new HybridClock(clientId);
  const userId = userIdOf(token);
  const upsert = (table: string, recordId: string, fields: Record<string, unknown>) => {
    const hlc = clock.now();
    return { opId: uuidv7(), table, recordId, kind: 'upsert', fields, hlc: Object.fromEntries(Object.keys(fields).map((f) => [f, hlc])) };
  };
  const sessionId = uuidv7();
  const now = Date.now();
  const ops = [
    upsert('sessions', sessionId, {
      day: new Date(now).toISOString().slice(0, 10),
      rink: 'Oval',
      title: '',
      focusCueIds: [],
      createdAt: new Date(now).toISOString(),
      createdBy: userId,
    }),
    // A minute apart, so their order (newest first) is known.
    ...notes.map((n, i) =>
      upsert('observations', uuidv7(), {
        sessionId,
        skaterId: n.skaterId,
        cueId,
        mark: n.mark,
        note: n.note ?? '',
        noteShared: false,
        createdAt: new Date(now - n.weeksAgo * 7 * DAY - (i + 1) * 60_000).toISOString(),
        createdBy: userId,
      }),
    ),
  ];
  const response = await fetch(`${base}/api/sync/push`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: base, authorization: `Bearer ${token}` },
    body: JSON.stringify({ clientId, teamId, ops }),
  });
  expect(response.status).toBe(200);
  const reply = (await response.json()) as { results: { status: string }[] };
  expect(reply.results.map((r) => r.status)).toEqual(ops.map(() => 'applied'));
  return notes.map((n, i) => new Date(now - n.weeksAgo * 7 * DAY - (i + 1) * 60_000));
}

test('a coach reads the week-by-week counts and the notes behind a cell, wide and on a phone', async ({ browser, baseURL }) => {
  test.setTimeout(240_000);
  const base = baseURL!;
  const { coach, skaters, cues } = await apiCoachWithSkaters(base, ['Anna Reede', 'Berend Visser']);
  const [anna, berend] = skaters;
  const cue = cues[0];
  await teamFromLastSeason(coach.teamId);
  const at = await pushNotes(base, coach.teamId, coach.token, cue.id, [
    { skaterId: anna.id, weeksAgo: 0, mark: 'needs_work', note: 'Sits up in the set' },
    { skaterId: anna.id, weeksAgo: 0, mark: 'needs_work' },
    { skaterId: anna.id, weeksAgo: 0, mark: 'good', note: 'Low and quiet at last' },
    { skaterId: anna.id, weeksAgo: 2, mark: 'needs_work' },
    { skaterId: anna.id, weeksAgo: 5, mark: 'needs_work' },
    { skaterId: anna.id, weeksAgo: 5, mark: 'needs_work' },
    { skaterId: anna.id, weeksAgo: 5, mark: 'needs_work' },
    { skaterId: berend.id, weeksAgo: 0, mark: 'good' },
  ]);
  // The team was made without a zone: UTC, the server's default.
  const thisWeek = weekOf(at[0], 'UTC');
  const fiveAgo = weekOf(at[4], 'UTC');
  const twoAgo = weekOf(at[3], 'UTC');
  const oneAgo = weekOf(Date.now() - 7 * DAY, 'UTC');

  const context = await browser.newContext({ viewport: DESKTOP });
  const page = await context.newPage();
  const check = watchErrors(page);
  await signInThroughForm(page, base, coach.email, coach.password, 60_000);
  await page.getByTestId('tab-review').first().click();
  await expect(page.getByTestId('review-home')).toBeVisible();

  // --- the whole team, summed ---
  const cell = (week: string) => page.getByTestId(`review-cell-${cue.id}-${week}`);
  await expect(cell(thisWeek)).toHaveAttribute('aria-label', `${cue.label}, week ${thisWeek}: 2 needs work, 2 good`);
  await expect(page.getByTestId('review-table-heading')).toHaveText('Whole group: All skaters');

  // --- one skater: her counts, week by week ---
  await page.getByTestId(`review-skater-${anna.id}`).click();
  await expect(page.getByTestId('review-table-heading')).toHaveText('Anna Reede');
  await expect(cell(thisWeek)).toHaveAttribute('aria-label', `${cue.label}, week ${thisWeek}: 2 needs work, 1 good`);
  await expect(page.getByTestId(`review-cell-${cue.id}-${thisWeek}-nw`)).toHaveText('2');
  await expect(page.getByTestId(`review-cell-${cue.id}-${thisWeek}-good`)).toHaveText('1');
  await expect(cell(twoAgo)).toHaveAttribute('aria-label', `${cue.label}, week ${twoAgo}: 1 needs work, 0 good`);
  await expect(cell(fiveAgo)).toHaveAttribute('aria-label', `${cue.label}, week ${fiveAgo}: 3 needs work, 0 good`);
  await expect(cell(oneAgo)).toHaveAttribute('aria-label', `${cue.label}, week ${oneAgo}: no marks`);
  // 4 marks in the last 4 weeks (3 of them needs work), 3 in the 4 before (all needs work): 75% against 100%.
  await expect(page.getByTestId(`review-trend-${cue.id}`)).toHaveText('\u2193 fewer');
  await expect(page.getByTestId('review-later')).toHaveAttribute('aria-disabled', 'true');

  // --- the notes behind this week's cell ---
  await cell(thisWeek).click();
  const notes = page.getByTestId('review-notes');
  await expect(notes).toBeVisible();
  await expect(page.getByTestId('review-notes-title')).toHaveText(`Anna Reede: ${cue.label}`);
  await expect(notes.getByRole('listitem')).toHaveCount(3);
  await expect(notes).toContainText('Sits up in the set');
  await expect(notes).toContainText('Low and quiet at last');
  await expect(notes).toContainText('By Tjitske Hoogland');
  await expect(notes.getByLabel('Good', { exact: true })).toHaveCount(1);
  await expect(notes.getByLabel('Needs work', { exact: true })).toHaveCount(2);
  await expectNoA11yViolations(page, 'review, one skater with a cell open');

  // --- a mis-tap fixed in place: the wordless "needs work" was a good one; sync sends it, the counts follow ---
  const wordless = notes.getByRole('listitem').filter({ hasText: '(no words, just the mark)' });
  await wordless.getByRole('button', { name: /^Change this note/ }).click();
  await wordless.getByRole('radio', { name: 'Good' }).click();
  await wordless.getByRole('button', { name: 'Save' }).click();
  await expect(page.getByTestId('review-notes-saved')).toContainText('Saved and sent', { timeout: 30_000 });
  await expect(cell(thisWeek)).toHaveAttribute('aria-label', `${cue.label}, week ${thisWeek}: 1 needs work, 2 good`);
  await expect(notes.getByLabel('Good', { exact: true })).toHaveCount(2);
  // Saving scrolled the page to the panel's foot: the screenshots start at the top again.
  await page.getByRole('heading', { name: 'Evening review' }).scrollIntoViewIfNeeded();
  await shootBoth(page, 'review-skater');

  // --- the phone: stacked, the notes under the table, every target a thumb's size ---
  await page.setViewportSize(PHONE);
  await expect(notes).toBeVisible();
  await expect(page.getByTestId('review-list-toggle')).toHaveText('Change skater');
  // The page scrolls inside the app frame, so a full-page shot shows one screen: keep the table and the notes too.
  await page.getByTestId('review-matrix').scrollIntoViewIfNeeded();
  await page.screenshot({ path: path.join(SHOTS, 'review-skater-table-390.png') });
  await notes.scrollIntoViewIfNeeded();
  await page.screenshot({ path: path.join(SHOTS, 'review-skater-notes-390.png') });
  await expectTapTargetsAtLeast(page, 'review-home', { fields: true });
  await expectNoA11yViolations(page, 'review, one skater on a phone');

  // --- one week: skaters x cues ---
  await page.getByTestId('review-view-week').click();
  await expect(page.getByTestId('review-week-shown')).toHaveText(`Week ${thisWeek}`);
  await expect(page.getByTestId(`review-wcell-${anna.id}-${cue.id}`)).toHaveAttribute(
    'aria-label',
    `Anna Reede, ${cue.label}, week ${thisWeek}: 1 needs work, 2 good`,
  );
  await expect(page.getByTestId(`review-wcell-${berend.id}-${cue.id}`)).toHaveAttribute(
    'aria-label',
    `Berend Visser, ${cue.label}, week ${thisWeek}: 0 needs work, 1 good`,
  );
  await page.getByTestId(`review-wcell-${berend.id}-${cue.id}`).click();
  await expect(page.getByTestId('review-notes-title')).toHaveText(`Berend Visser: ${cue.label}`);
  await expect(notes.getByRole('listitem')).toHaveCount(1);
  await expectTapTargetsAtLeast(page, 'review-home', { fields: true });
  await expectNoA11yViolations(page, 'review, one week on a phone');
  await shootBoth(page, 'review-week');
  await page.setViewportSize(DESKTOP);
  await expectNoA11yViolations(page, 'review, one week wide');

  check();
  await context.close();
});
