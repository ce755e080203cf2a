/**
 * The review's Lap times against its own server (port 8491): a head coach whose 1500 m runs of
 * one skater (pushed through sync as the clock sends them, in the last five weeks; UTC team)
 * show as a chart, a table and two runs side by side. At 1440 px and at 390 px: open Lap times,
 * pick the skater and 1500 m, check a finish time and a lap difference against the seeded
 * crossings, tap a point to see its run; axe at both widths, tap targets at 390, screenshots.
 *
 *   R1 5 weeks ago  finished 25.31 54.02 1:22.90 1:51.45
 *   R2 3 weeks ago  finished 25.10 53.90 1:23.10 1:52.02
 *   R3 1 week ago   finished 24.90 53.40 1:21.95 1:50.60  (best)
 *   R4 today        stopped  25.50 54.80
 * Side by side by default: A = R2, B = R3. Lap 2 (the third section) 28.55 - 29.20 = -0.65;
 * finish 1:50.60 - 1:52.02 = -1.42.
 */
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import { v4 as uuidv4, v7 as uuidv7 } from 'uuid';

import { HybridClock } from '../../shared/hlc';
import { targetIdFor } from '../../shared/schemas/clock';
import { apiCoachWithSkaters, checkA11yAtBothWidths, DESKTOP, expectTapTargetsAtLeast, ownServer, PHONE, settleLayout, shootBoth, SHOTS, signInThroughForm, teamFromLastSeason, userIdOf, watchErrors } from './support';

const server = ownServer(8491);
test.beforeAll(async () => {
  test.setTimeout(60_000);
  await server.start();
});
test.afterAll(() => server.stop());

const DAY = 86_400_000;
const MINUS = '\u2212';

type RunSeed = { daysAgo: number; crossings: number[]; status: 'finished' | 'stopped' };

/** Runs, their crossings and a target, pushed as the clock's device store sends them. */
async function pushRuns(base: string, teamId: string, token: string, skaterId: string, runs: RunSeed[]) {
  const clientId = uuidv4();
  const clock = new HybridClock(clientId);
  const userId = userIdOf(token);
  const upsert = (table: string, recordId: string, fields: Record<string, unknown>) => {
    const hlc = clock.now();
    return { opId: uuidv7(), table, recordId, kind: 'upsert', fields, hlc: Object.fromEntries(Object.keys(fields).map((f) => [f, hlc])) };
  };
  const ids: string[] = [];
  const ops = runs.flatMap((run) => {
    const id = uuidv7();
    ids.push(id);
    const startedAt = new Date(Date.now() - run.daysAgo * DAY - 3_600_000).toISOString();
    return [
      upsert('runs', id, {
        heatId: uuidv7(),
        skaterId,
        day: startedAt.slice(0, 10),
        distanceM: 1500,
        track: 'long',
        lane: 'inner',
        startedAt,
        startOffsetMs: 0,
        targetMs: 110_000,
        status: run.status,
        stopReason: run.status === 'stopped' ? 'Fell in the curve' : '',
        note: '',
        createdBy: userId,
        authorName: '',
        createdAt: startedAt,
      }),
      ...run.crossings.map((atMs) => upsert('crossings', uuidv7(), { runId: id, atMs, handTimed: false, createdAt: startedAt })),
    ];
  });
  ops.push(
    upsert('targets', targetIdFor(teamId, skaterId, 'long', 1500), {
      skaterId,
      distanceM: 1500,
      track: 'long',
      targetMs: 110_000,
      plan: 'even',
      openerMs: null,
      sharesPct: null,
      note: '',
      updatedBy: userId,
    }),
  );
  const response = await fetch(`${base}/api/sync/push`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: base, authorization: `Bearer ${token}` },
    body: JSON.stringify({ clientId, teamId, ops }),
  });
  expect(response.status).toBe(200);
  const reply = (await response.json()) as { results: { status: string }[] };
  expect(reply.results.map((r) => r.status)).toEqual(ops.map(() => 'applied'));
  return ids;
}

async function checkCompare(page: Page) {
  await expect(page.getByTestId('laps-compare-a-finish')).toHaveText('1:52.02');
  await expect(page.getByTestId('laps-compare-b-finish')).toHaveText('1:50.60');
  await expect(page.getByTestId('laps-compare-diff-2')).toHaveText(`${MINUS}0.65`);
  await expect(page.getByTestId('laps-compare-diff-finish')).toHaveText(`${MINUS}1.42`);
}

test('a coach reads a skater’s 1500 m over the weeks, wide and on a phone', async ({ browser }) => {
  test.setTimeout(240_000);
  const base = server.base;
  const { coach, skaters } = await apiCoachWithSkaters(base, ['Anna Reede', 'Berend Visser']);
  const [anna] = skaters;
  await teamFromLastSeason(coach.teamId);
  const [r1, , r3, r4] = await pushRuns(base, coach.teamId, coach.token, anna.id, [
    { daysAgo: 35, crossings: [25_310, 54_020, 82_900, 111_450], status: 'finished' },
    { daysAgo: 21, crossings: [25_100, 53_900, 83_100, 112_020], status: 'finished' },
    { daysAgo: 7, crossings: [24_900, 53_400, 81_950, 110_600], status: 'finished' },
    { daysAgo: 0, crossings: [25_500, 54_800], status: 'stopped' },
  ]);

  const context = await browser.newContext({ viewport: DESKTOP });
  const page = await context.newPage();
  const check = watchErrors(page);
  await signInThroughForm(page, base, coach.email, coach.password, 60_000);
  await page.getByTestId('tab-review').first().click();
  await page.getByTestId('review-section-laps').click();
  await expect(page.getByTestId('laps-pick-skater')).toBeVisible();

  // --- 1440: pick the skater and 1500 m ---
  await page.getByTestId(`review-skater-${anna.id}`).click();
  await expect(page.getByTestId('laps-heading')).toHaveText('Lap times: Anna Reede');
  await page.getByTestId('laps-distance-1500-long').click();
  await expect(page.getByTestId('laps-distance-1500-long')).toHaveAttribute('aria-checked', 'true');
  await expect(page.getByTestId('laps-chart')).toBeVisible();
  // Three finishes on the chart; the stopped run has none, and the table says why.
  await expect(page.locator('[data-testid^="laps-point-"]')).toHaveCount(3);
  await expect(page.getByTestId(`laps-table-time-${r1}`)).toHaveText('1:51.45');
  await expect(page.getByTestId(`laps-table-row-${r4}`)).toContainText('Stopped (Fell in the curve) after 2 of 4 crossings');
  await expect(page.getByTestId('laps-best')).toContainText('Personal best: 1:50.60');
  await checkCompare(page);
  // Chart beside the side-by-side.
  const chartBox = (await page.getByTestId('laps-chart-card').boundingBox())!;
  const compareBox = (await page.getByTestId('laps-compare-card').boundingBox())!;
  expect(compareBox.x).toBeGreaterThan(chartBox.x + chartBox.width - 1);

  await page.getByTestId(`laps-point-${r1}`).click();
  await expect(page.getByTestId('laps-run-detail-finish')).toHaveText('Finish 1:51.45');
  await expect(page.getByTestId('laps-run-detail')).toContainText('timed by Tjitske Hoogland');
  // Keyboard: focusing another point shows that run.
  await page.getByTestId(`laps-point-${r3}`).focus();
  await expect(page.getByTestId('laps-run-detail-finish')).toHaveText('Finish 1:50.60');
  await page.getByTestId(`laps-point-${r1}`).focus();

  // --- 390: stacked, the chart inside the screen ---
  await page.setViewportSize(PHONE);
  await settleLayout(page);
  await expect(page.getByTestId('laps-who')).toContainText('Skater: Anna Reede');
  const phoneChart = (await page.getByTestId('laps-chart').boundingBox())!;
  expect(phoneChart.x).toBeGreaterThanOrEqual(0);
  expect(phoneChart.x + phoneChart.width).toBeLessThanOrEqual(PHONE.width);
  await checkCompare(page);
  await page.getByTestId(`laps-point-${r3}`).click();
  await expect(page.getByTestId('laps-run-detail-finish')).toHaveText('Finish 1:50.60');
  await expectTapTargetsAtLeast(page, 'laps-section');

  await checkA11yAtBothWidths(page, 'review lap times', () => expect(page.getByTestId('laps-chart')).toBeVisible());
  await shootBoth(page, 'review-laps');
  // The whole section at once (the screen scrolls inside itself, so a tall window shows it all).
  for (const [width, height] of [[1440, 1500], [390, 3400]]) {
    await page.setViewportSize({ width, height });
    await settleLayout(page);
    await page.getByTestId('laps-controls').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SHOTS, `review-laps-whole-${width}.png`) });
    await page.getByTestId('laps-chart').screenshot({ path: path.join(SHOTS, `review-laps-chart-${width}.png`) });
  }
  check();
  await context.close();
});
