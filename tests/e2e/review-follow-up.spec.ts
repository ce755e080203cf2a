/**
 * Cue follow-up and "my weeks" against a server of this spec's own (port 8492). A head coach's
 * notes and timed runs for Anna reach the server through the sync push, as the board and the clock
 * send them: a cue stressed five weeks ago (3 "needs work", 1 good), then 2 good, 1 + 1, nothing,
 * 1 good in the four weeks after (4 good of 5 marks: 80 %, from 25 %: fading, +55 points), with a
 * 1500 m in the stressed week and one three weeks ago.
 * - The coach opens Evening > Follow-up, picks Anna and reads the verdict with its counts at
 *   1440 px and 390 px (every target >= 48 px at 390).
 * - Anna (skater) opens My weeks from her today page, opens the stressed week's cell and reads the
 *   shared note, never the private one; her runs show their finish time; "Did it stick?" shows the
 *   same verdict and counts as the coach's; back to today.
 * - Anna's guardian sees the same, told it is read only, with no button that changes anything.
 * axe at both widths on each screen; screenshots review-follow-up, my-weeks-skater, my-weeks-guardian.
 */
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import { v4 as uuidv4, v7 as uuidv7 } from 'uuid';

import { HybridClock } from '../../shared/hlc';
import { dayOf, weekOf } from '../../shared/weeks';
import {
  apiCoachWithSkaters,
  checkA11yAtBothWidths,
  DESKTOP,
  expectTapTargetsAtLeast,
  inviteAndAccept,
  ownServer,
  PHONE,
  settleLayout,
  shootBoth,
  SHOTS,
  signInThroughForm,
  signInToToday,
  watchErrors,
  userIdOf,
  teamFromLastSeason,
} from './support';

const server = ownServer(8492);
const BASE = server.base;
test.beforeAll(async () => {
  test.setTimeout(60_000);
  await server.start();
});
test.afterAll(() => server.stop());
test.setTimeout(360_000);

const DAY = 86_400_000;


type Note = { weeksAgo: number; mark: 'needs_work' | 'good'; note?: string; shared?: boolean; id?: string };
type Run = { weeksAgo: number; crossings: number[] };

async function push(teamId: string, token: string, skaterId: string, cueId: string, notes: Note[], runs: Run[]) {
  const clientId = uuidv4();
  const clock = new HybridClock(clientId);
  const userId = userIdOf(token);
  const upsert = (table: string, recordId: string, fields: Record<string, unknown>) => {
    const hlc = clock.now();
    return { opId: uuidv7(), table, recordId, kind: 'upsert', fields, hlc: Object.fromEntries(Object.keys(fields).map((f) => [f, hlc])) };
  };
  const now = Date.now();
  const sessionId = uuidv7();
  const at = (weeksAgo: number, i: number) => new Date(now - weeksAgo * 7 * DAY - (i + 1) * 60_000).toISOString();
  const ops = [
    upsert('sessions', sessionId, { day: dayOf(now, 'UTC'), rink: 'Oval', title: '', focusCueIds: [], createdAt: new Date(now).toISOString(), createdBy: userId }),
    ...notes.map((n, i) =>
      upsert('observations', n.id ?? uuidv7(), {
        sessionId,
        skaterId,
        cueId,
        mark: n.mark,
        note: n.note ?? '',
        noteShared: n.shared ?? false,
        createdAt: at(n.weeksAgo, i),
        createdBy: userId,
      }),
    ),
    ...runs.flatMap((r, i) => {
      const runId = uuidv7();
      const startedAt = at(r.weeksAgo, i);
      return [
        upsert('runs', runId, {
          heatId: uuidv7(), skaterId, day: dayOf(startedAt, 'UTC'), distanceM: 1500, track: 'long', lane: 'inner', startedAt,
          startOffsetMs: 0, targetMs: null, status: 'finished', stopReason: '', note: '', createdBy: userId, authorName: '', createdAt: startedAt,
        }),
        ...r.crossings.map((atMs) => upsert('crossings', uuidv7(), { runId, atMs, handTimed: false, createdAt: startedAt })),
      ];
    }),
  ];
  const response = await fetch(`${BASE}/api/sync/push`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: BASE, authorization: `Bearer ${token}` },
    body: JSON.stringify({ clientId, teamId, ops }),
  });
  expect(response.status).toBe(200);
  const reply = (await response.json()) as { results: { status: string }[] };
  expect(reply.results.map((r) => r.status)).toEqual(ops.map(() => 'applied'));
}

const SHARED_ID = uuidv7();
const PRIVATE_ID = uuidv7();
const SHARED_TEXT = 'Knee over the toe through the whole curve';
const PRIVATE_TEXT = 'Coaches only: ask about the new blades';

/** Checks the "my weeks" screen a skater or guardian sees, and the cell's notes. */
async function readMyWeeks(page: Page, heading: string, cueId: string, stressedWeek: string) {
  await page.getByTestId('today-my-weeks').click();
  await expect(page.getByTestId('my-weeks-heading')).toHaveText(heading);
  const cell = page.getByTestId(`review-cell-${cueId}-${stressedWeek}`);
  await expect(cell).toHaveAttribute('aria-label', new RegExp(`week ${stressedWeek}: 3 needs work, 1 good$`));
  await cell.click();
  await expect(page.getByTestId(`my-weeks-note-text-${SHARED_ID}`)).toHaveText(SHARED_TEXT);
  await expect(page.getByTestId(`my-weeks-note-${PRIVATE_ID}`)).toHaveCount(0);
  await expect(page.getByText(PRIVATE_TEXT)).toHaveCount(0);
  await expect(page.getByTestId('my-weeks-notes-others')).toHaveText('And 3 more marks without a note shared with you.');
  // The runs: the stressed week's 1500 m with its finish time and laps.
  await expect(page.getByTestId('my-weeks-runs')).toContainText('Finished in 1:51.45');
  await expect(page.getByTestId('my-weeks-runs')).toContainText('Laps: Opener 25.31 · Lap 1 28.71 · Lap 2 28.88 · Finish 28.55');
  // "Did it stick?": the same verdict the coach reads, with its counts.
  await expect(page.getByTestId(`follow-up-item-${cueId}-${stressedWeek}-verdict`)).toHaveText(
    '\u2193 Fault fading4 good of 5 marks in the next 4 weeks (80 %), against 1/4 (25 %) in the stressed week, +55 points.',
  );
}

test('a coach reads a stressed cue’s follow-up; the skater and the guardian read their weeks, shared notes only', async ({ browser }) => {
  const { coach, skaters, cues } = await apiCoachWithSkaters(BASE, ['Anna Reede', 'Berend Visser']);
  const [anna] = skaters;
  const cue = cues[0];
  await teamFromLastSeason(coach.teamId);
  await push(
    coach.teamId,
    coach.token,
    anna.id,
    cue.id,
    [
      { weeksAgo: 5, mark: 'needs_work', note: SHARED_TEXT, shared: true, id: SHARED_ID },
      { weeksAgo: 5, mark: 'needs_work', note: PRIVATE_TEXT, shared: false, id: PRIVATE_ID },
      { weeksAgo: 5, mark: 'needs_work' },
      { weeksAgo: 5, mark: 'good' },
      { weeksAgo: 4, mark: 'good' },
      { weeksAgo: 4, mark: 'good' },
      { weeksAgo: 3, mark: 'needs_work' },
      { weeksAgo: 3, mark: 'good' },
      { weeksAgo: 1, mark: 'good' },
    ],
    [
      { weeksAgo: 5, crossings: [25_310, 54_020, 82_900, 111_450] },
      { weeksAgo: 3, crossings: [25_000, 53_000, 81_500, 110_000] },
    ],
  );
  const stressedWeek = weekOf(Date.now() - 5 * 7 * DAY - 60_000, 'UTC');
  const item = `follow-up-item-${cue.id}-${stressedWeek}`;

  // --- the coach, wide ---
  const coachContext = await browser.newContext({ viewport: DESKTOP });
  const page = await coachContext.newPage();
  const check = watchErrors(page);
  await signInThroughForm(page, BASE, coach.email, coach.password, 60_000);
  await page.getByTestId('tab-review').first().click();
  await page.getByTestId('review-section-follow-up').click();
  await page.getByTestId(`review-skater-${anna.id}`).click();
  await expect(page.getByTestId(`${item}-verdict`)).toHaveText(
    '\u2193 Fault fading4 good of 5 marks in the next 4 weeks (80 %), against 1/4 (25 %) in the stressed week, +55 points.',
  );
  await expect(page.getByTestId(`${item}-stressed`)).toContainText(`Stressed in ${stressedWeek}`);
  await expect(page.getByTestId(`${item}-stressed`)).toContainText('3 needs work, 1 good.');
  await expect(page.getByTestId(`${item}-week-${stressedWeek}-laps`)).toHaveText('28.71 (1 run)');
  await expect(page.getByTestId(`${item}-laps`)).toHaveText(
    'Mean lap at 1500 m long track, opener left out: stressed week 28.71 (1 run); after 28.33 (1 run): 0.38 s faster per lap.',
  );
  await expect(page.getByTestId('follow-up-summary')).toContainText('1 stressed cue-week');
  // The stepper asks again: at 4 nothing is stressed.
  await page.getByTestId('follow-up-threshold-up').click();
  await expect(page.getByTestId('follow-up-summary')).toContainText('No cue got 4 or more');
  await page.getByTestId('follow-up-threshold-down').click();
  await expect(page.getByTestId(`${item}-verdict`)).toContainText('4 good of 5 marks');
  // The card itself (the page scrolls inside the app's frame, so a full-page shot stops at the fold).
  await page.getByTestId(item).screenshot({ path: path.join(SHOTS, 'review-follow-up-item-1440.png') });

  // --- the coach, phone ---
  await page.setViewportSize(PHONE);
  await settleLayout(page);
  await expect(page.getByTestId(`${item}-verdict`)).toContainText('\u2193 Fault fading4 good of 5 marks in the next 4 weeks (80 %)');
  await expect(page.getByTestId(`${item}-week-${stressedWeek}-marks`)).toHaveText('1/4 good (25 %)');
  await expectTapTargetsAtLeast(page, 'follow-up');
  await page.getByTestId(item).screenshot({ path: path.join(SHOTS, 'review-follow-up-item-390.png') });
  await checkA11yAtBothWidths(page, 'review follow-up', () => expect(page.getByTestId(`${item}-verdict`)).toBeVisible());
  await shootBoth(page, 'review-follow-up');
  check();
  await coachContext.close();

  // --- Anna, the skater ---
  const annaAccount = await inviteAndAccept(BASE, coach, { label: 'fu-anna', role: 'skater', skaterId: anna.id, displayName: 'Anna Reede', password: 'edges-and-blades-9' });
  const skaterContext = await browser.newContext({ viewport: PHONE });
  const skaterPage = await skaterContext.newPage();
  const checkSkater = watchErrors(skaterPage);
  await signInToToday(skaterPage, BASE, annaAccount.email, annaAccount.password, 60_000);
  await readMyWeeks(skaterPage, 'My weeks', cue.id, stressedWeek);
  await expectTapTargetsAtLeast(skaterPage, 'my-weeks');
  await checkA11yAtBothWidths(skaterPage, 'my weeks (skater)', () => expect(skaterPage.getByTestId(`my-weeks-note-text-${SHARED_ID}`)).toBeVisible());
  await shootBoth(skaterPage, 'my-weeks-skater');
  await skaterPage.getByTestId('my-weeks-back').click();
  await expect(skaterPage.getByTestId('skater-home')).toBeVisible();
  checkSkater();
  await skaterContext.close();

  // --- Anna's guardian ---
  const guardianAccount = await inviteAndAccept(BASE, coach, { label: 'fu-guardian', role: 'guardian', skaterId: anna.id, displayName: 'Jelle Reede', password: 'edges-and-blades-8' });
  const guardianContext = await browser.newContext({ viewport: DESKTOP });
  const guardianPage = await guardianContext.newPage();
  const checkGuardian = watchErrors(guardianPage);
  await signInToToday(guardianPage, BASE, guardianAccount.email, guardianAccount.password, 60_000);
  await readMyWeeks(guardianPage, 'Anna’s weeks', cue.id, stressedWeek);
  await expect(guardianPage.getByTestId('my-weeks')).toContainText('You are viewing as a guardian: read only.');
  // Only moving through the weeks, opening a count and closing its notes: nothing that changes anything.
  const names = await guardianPage.getByTestId('my-weeks').getByRole('button').evaluateAll((els) => els.map((e) => e.getAttribute('aria-label') ?? e.textContent ?? ''));
  expect(names.length).toBeGreaterThan(0);
  expect(names.filter((n) => /change|edit|delete|save|got it|acknowledge|undo/i.test(n))).toEqual([]);
  await checkA11yAtBothWidths(guardianPage, 'my weeks (guardian)', () => expect(guardianPage.getByTestId(`my-weeks-note-text-${SHARED_ID}`)).toBeVisible());
  await shootBoth(guardianPage, 'my-weeks-guardian');
  checkGuardian();
  await guardianContext.close();
});
