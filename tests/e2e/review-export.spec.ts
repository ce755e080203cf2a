/**
 * The review's Export and print against a real server of its own (port 8494): notes and a timed
 * run pushed through sync as the board and the clock send them. At 1440 px the coach downloads
 * the notes and then the runs with the Download button; each file is caught as the browser's
 * download and read back with csv-parse (a private note is in it, a formula-like note starts with
 * a quote). Then the weekly sheet: picked skater and week, the seeded counts, only the shared
 * note, the run's finish; in print media the app's chrome and the sheet's buttons are hidden and
 * the sheet is still there (screenshots 'review-sheet-print' at both widths). axe and 48 px tap
 * targets at 390 and 1440 px; screenshots 'review-export' and 'review-sheet'.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { expect, test, type Page } from '@playwright/test';
import { parse as parseCsv } from 'csv-parse/sync';
import { v4 as uuidv4, v7 as uuidv7 } from 'uuid';

import { HybridClock } from '../../shared/hlc';
import { weekOf } from '../../shared/weeks';
import {
  apiCoachWithSkaters,
  checkA11yAtBothWidths,
  DESKTOP,
  expectTapTargetsAtLeast,
  ownServer,
  PHONE,
  SHOTS,
  settleLayout,
  shootBoth,
  signInThroughForm,
  watchErrors,
  userIdOf,
  teamFromLastSeason,
} from './support';

const server = ownServer(8494);
const BASE = server.base;
test.beforeAll(async () => {
  test.setTimeout(60_000);
  await server.start();
});
test.afterAll(() => server.stop());



async function push(teamId: string, token: string, build: (upsert: (table: string, id: string, fields: Record<string, unknown>) => unknown) => unknown[]) {
  const clientId = uuidv4();
  const clock = new HybridClock(clientId);
  const upsert = (table: string, recordId: string, fields: Record<string, unknown>) => {
    const hlc = clock.now();
    return { opId: uuidv7(), table, recordId, kind: 'upsert', fields, hlc: Object.fromEntries(Object.keys(fields).map((f) => [f, hlc])) };
  };
  const ops = build(upsert);
  const response = await fetch(`${BASE}/api/sync/push`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: BASE, authorization: `Bearer ${token}` },
    body: JSON.stringify({ clientId, teamId, ops }),
  });
  expect(response.status).toBe(200);
  const reply = (await response.json()) as { results: { status: string }[] };
  expect(reply.results.map((r) => r.status)).toEqual(ops.map(() => 'applied'));
}

/** Clicks Download and reads the file the browser saved. */
async function downloadCsv(page: Page): Promise<{ name: string; rows: Record<string, string>[] }> {
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-download').click()]);
  const file = await download.path();
  const rows = parseCsv(readFileSync(file!, 'utf8'), { columns: true }) as Record<string, string>[];
  return { name: download.suggestedFilename(), rows };
}

test('a coach exports notes and runs as CSV and prints a skater’s weekly sheet, wide and on a phone', async ({ browser }) => {
  test.setTimeout(240_000);
  const { coach, skaters, cues } = await apiCoachWithSkaters(BASE, ['Anna Reede', 'Berend Visser']);
  const [anna, berend] = skaters;
  const [cue, other] = cues;
  await teamFromLastSeason(coach.teamId);
  const userId = userIdOf(coach.token);
  const now = Date.now();
  const minutesAgo = (m: number) => new Date(now - m * 60_000).toISOString();
  const runId = uuidv7();
  await push(coach.teamId, coach.token, (upsert) => {
    const sessionId = uuidv7();
    const note = (skaterId: string, cueId: string, m: number, mark: string, text: string, shared: boolean) =>
      upsert('observations', uuidv7(), { sessionId, skaterId, cueId, mark, note: text, noteShared: shared, createdAt: minutesAgo(m), createdBy: userId });
    return [
      upsert('sessions', sessionId, { day: minutesAgo(0).slice(0, 10), rink: 'Oval', title: 'Evening ice', focusCueIds: [], createdAt: minutesAgo(60), createdBy: userId }),
      note(anna.id, cue.id, 50, 'needs_work', 'Sits up in the set', true),
      note(anna.id, cue.id, 40, 'needs_work', 'private words', false),
      note(anna.id, cue.id, 30, 'good', '', false),
      note(berend.id, other.id, 20, 'needs_work', '=1+1', true),
      upsert('runs', runId, {
        heatId: uuidv7(), skaterId: anna.id, day: minutesAgo(15).slice(0, 10), distanceM: 500, track: 'long', lane: 'inner',
        startedAt: minutesAgo(15), startOffsetMs: 0, targetMs: 39_150, status: 'finished', stopReason: '', note: '',
        createdBy: userId, authorName: '', createdAt: minutesAgo(15),
      }),
      upsert('crossings', uuidv7(), { runId, atMs: 10_450, handTimed: false, createdAt: minutesAgo(15) }),
      upsert('crossings', uuidv7(), { runId, atMs: 38_734, handTimed: false, createdAt: minutesAgo(14) }),
    ];
  });
  const week = weekOf(now - 50 * 60_000, 'UTC');

  const context = await browser.newContext({ viewport: DESKTOP, acceptDownloads: true });
  const page = await context.newPage();
  const check = watchErrors(page);
  await signInThroughForm(page, BASE, coach.email, coach.password, 60_000);
  await page.getByTestId('tab-review').first().click();
  await expect(page.getByTestId('review-home')).toBeVisible();
  await page.getByTestId('review-section-export').click();
  await expect(page.getByTestId('export-form')).toBeVisible();
  await expect(page.getByTestId('export-private-note')).toContainText('private notes too');

  // --- the notes of the last four weeks, every skater ---
  const notes = await downloadCsv(page);
  const from = await page.getByTestId('export-from').inputValue();
  const to = await page.getByTestId('export-to').inputValue();
  expect(notes.name).toBe(`boardside-observations-${from}-${to}.csv`);
  expect(notes.rows.map((r) => [r.skater, r.mark, r.note, r.note_shared])).toEqual([
    ['Anna Reede', 'needs work', 'Sits up in the set', 'yes'],
    ['Anna Reede', 'needs work', 'private words', 'no'],
    ['Anna Reede', 'good', '', 'no'],
    ['Berend Visser', 'needs work', "'=1+1", 'yes'],
  ]);
  expect(notes.rows.every((r) => r.iso_week === week && r.session_title === 'Evening ice' && r.cue_id)).toBe(true);
  await expect(page.getByTestId('export-done')).toContainText('4 rows under the header');

  // --- Anna's runs only ---
  await page.getByTestId('export-kind-runs').click();
  await page.getByTestId(`export-skater-${anna.id}`).click();
  await expect(page.getByTestId('export-who')).toHaveText('1 skater picked');
  const runs = await downloadCsv(page);
  expect(runs.name).toBe(`boardside-runs-${from}-${to}.csv`);
  expect(runs.rows.map((r) => [r.skater, r.distance_m, r.status, r.finish, r.laps, r.target, r.finish_minus_target_s])).toEqual([
    ['Anna Reede', '500', 'finished', '38.73', '10.45 28.28', '39.15', '-0.416'],
  ]);
  await expect(page.getByTestId('export-done')).toContainText('1 row under the header');

  // A bad day is said under its field, and nothing is downloaded.
  await page.getByTestId('export-from').fill('2026-02-30');
  await page.getByTestId('export-download').click();
  await expect(page.getByTestId('export-from-error')).toContainText('from must be a real day');
  await page.getByTestId('export-last-4-weeks').click();
  await expect(page.getByTestId('export-from')).toHaveValue(from);

  await checkA11yAtBothWidths(page, 'review export', () => expect(page.getByTestId('export-form')).toBeVisible());
  await expectTapTargetsAtLeast(page, 'export-section', { fields: true });
  await shootBoth(page, 'review-export');

  // --- the weekly sheet ---
  await page.setViewportSize(DESKTOP);
  await settleLayout(page);
  await page.getByTestId(`sheet-skater-${anna.id}`).click();
  await page.getByTestId('sheet-week').fill(week);
  await page.getByTestId('sheet-open').click();
  const sheet = page.getByTestId('weekly-sheet');
  await expect(page.getByTestId('weekly-sheet-name')).toHaveText('Anna Reede');
  await expect(page.getByTestId('weekly-sheet-week')).toContainText(`(${week})`);
  await expect(page.getByTestId(`weekly-sheet-cue-${cue.id}-needs-work`)).toHaveText('2');
  await expect(page.getByTestId(`weekly-sheet-cue-${cue.id}-good`)).toHaveText('1');
  await expect(page.getByTestId(`weekly-sheet-run-${runId}-finish`)).toHaveText('38.73 (target 39.15)');
  await expect(sheet).toContainText('Sits up in the set');
  await expect(sheet).not.toContainText('private words');
  await expect(sheet).not.toContainText('Berend');
  await expect(page.getByTestId('weekly-sheet-print')).toBeEnabled();

  await checkA11yAtBothWidths(page, 'weekly sheet', () => expect(page.getByTestId('weekly-sheet-name')).toBeVisible());
  await expectTapTargetsAtLeast(page, 'weekly-sheet');
  await shootBoth(page, 'review-sheet');

  // --- print media: only the sheet ---
  await page.emulateMedia({ media: 'print' });
  for (const size of [DESKTOP, PHONE]) {
    await page.setViewportSize(size);
    await settleLayout(page);
    await expect(page.getByTestId('weekly-sheet-name')).toBeVisible();
    await expect(page.getByTestId(`weekly-sheet-cue-${cue.id}-needs-work`)).toBeVisible();
    await expect(page.getByRole('navigation', { name: 'Sections' })).toBeHidden();
    await expect(page.getByTestId('tab-review').first()).toBeHidden();
    await expect(page.getByTestId('review-sections')).toBeHidden();
    await expect(page.getByTestId('weekly-sheet-actions')).toBeHidden();
    // Black on white, from the page's left edge, within the page's width.
    const ink = await page.getByTestId('weekly-sheet-name').evaluate((el) => getComputedStyle(el).color);
    expect(ink).toBe('rgb(0, 0, 0)');
    const box = (await sheet.boundingBox())!;
    expect(box.x).toBeLessThan(16);
    expect(box.x + box.width).toBeLessThanOrEqual(size.width + 1);
    await page.screenshot({ path: path.join(SHOTS, `review-sheet-print-${size.width}.png`) });
  }
  // One A4 page: at the printable width of A4 with 12 mm margins (703 x 1032 CSS px) the sheet fits.
  await page.setViewportSize({ width: 703, height: 1032 });
  await settleLayout(page);
  const height = await sheet.evaluate((el) => el.getBoundingClientRect().height);
  expect(height).toBeLessThan(1032);
  await page.emulateMedia({ media: 'screen' });

  // Print calls the browser's print.
  await page.evaluate(() => {
    (window as unknown as { printed: number }).printed = 0;
    window.print = () => {
      (window as unknown as { printed: number }).printed += 1;
    };
  });
  await page.getByTestId('weekly-sheet-print').click();
  expect(await page.evaluate(() => (window as unknown as { printed: number }).printed)).toBe(1);
  await page.getByTestId('weekly-sheet-close').click();
  await expect(page.getByTestId('sheet-picker')).toBeVisible();

  check();
  await context.close();
});
