/**
 * The pair clock at the boards, in Chromium on a 390 × 844 phone: the coach sets two targets (even
 * pace; the example section shares), puts Anna in the inner lane and Bram in the outer, starts and
 * times a 1500 m pair with pointer events carrying fixed timestamps (the clock takes each crossing
 * from the event's own timeStamp, so the times are exact). Every lap, split, km/h and gap on screen
 * is checked against figures worked out by hand, a glove's double tap is ignored while the other
 * lane 0.3 s later counts, the page is reloaded mid-race and the heat carries on, both skaters
 * finish on their last split, the table is checked, the run syncs and the stored crossings are
 * exactly the taps; Anna then sees the run on her today page. Lane buttons cover at least half the
 * phone screen, every button is 48 px or more, axe finds nothing at 390 and 1440 px, screenshots
 * at both widths. Runs its own server.
 *
 * Expected figures (1500 m long track = 300 m opener + 3 laps, splits at 300/700/1100/1500 m):
 * - Anna, target 1:58.00 even pace: schedule 23.600, 55.067, 1:26.534, 1:58.000 (per metre);
 *   crossings 24.310, 55.930, 1:27.410, 1:58.950 → laps 24.31, 31.62, 31.48, 31.54; km/h
 *   300·3.6/24.31 = 44.43, 400·3.6/31.62 = 45.54, 45.74, 45.66; gaps +0.71, +0.86, +0.87, +0.95.
 * - Bram, target 1:57.00 with the example shares 22.1/24.6/26.2/27.1 %: schedule 25.857, 54.639,
 *   1:25.293, 1:57.000; crossings 24.610, 56.100, 1:27.200, 1:58.500 → laps 24.61, 31.49, 31.10,
 *   31.30; km/h 43.88, 45.73, 46.30, 46.01; gaps −1.24, +1.46, +1.90, +1.50.
 */
import { expect, test, type Page } from '@playwright/test';
import { tapCue } from './board-phone-taps';
import {
  apiCoachWithSkaters,
  checkA11yAtBothWidths,
  expectTapTargetsAtLeast,
  inviteAndAccept,
  ownServer,
  PHONE,
  shootBoth,
  signInThroughForm,
  signInToToday,
  syncNow,
  watchErrors,
} from './support';

const server = ownServer(8471);
const BASE = server.base;
test.beforeAll(async () => {
  test.setTimeout(60_000);
  await server.start();
});
test.afterAll(() => server.stop());
test.setTimeout(300_000);
const OPEN_MS = 60_000;
const MINUS = '\u2212';

const ANNA = { cross: [24_310, 55_930, 87_410, 118_950], laps: ['24.31', '31.62', '31.48', '31.54'], splits: ['24.31', '55.93', '1:27.41', '1:58.95'], kmh: ['44.43', '45.54', '45.74', '45.66'], gaps: ['+0.71', '+0.86', '+0.87', '+0.95'] };
const BRAM = { cross: [24_610, 56_100, 87_200, 118_500], laps: ['24.61', '31.49', '31.10', '31.30'], splits: ['24.61', '56.10', '1:27.20', '1:58.50'], kmh: ['43.88', '45.73', '46.30', '46.01'], gaps: [`${MINUS}1.24`, '+1.46', '+1.90', '+1.50'] };
const NAMES = ['Opener', 'Lap 1', 'Lap 2', 'Finish'];

/** Where the running clock stands on the page's performance clock (its start, ms). */
const anchor = async (page: Page) => Number(await page.getByTestId('clock-elapsed').getAttribute('data-anchor'));

/** A pointer touch-down on the element with this exact event timestamp. */
async function touchAt(page: Page, testId: string, timeStamp: number) {
  await page.getByTestId(testId).evaluate((el, t) => {
    const event = new PointerEvent('pointerdown', { bubbles: true, cancelable: true, pointerType: 'touch', isPrimary: true, button: 0 });
    Object.defineProperty(event, 'timeStamp', { value: t });
    el.dispatchEvent(event);
  }, timeStamp);
}

/** Taps the lane as its skater crosses `atMs` after the gun. */
async function cross(page: Page, lane: 'inner' | 'outer', atMs: number) {
  await touchAt(page, `lane-tap-${lane}`, (await anchor(page)) + atMs);
}

async function expectLane(page: Page, lane: 'inner' | 'outer', who: typeof ANNA, i: number, toGo: string, predicted: string | null) {
  const id = `lane-${lane}`;
  await expect(page.getByTestId(`${id}-lap`)).toHaveText(who.laps[i]);
  await expect(page.getByTestId(`${id}-split`)).toHaveText(who.splits[i]);
  await expect(page.getByTestId(`${id}-kmh`)).toHaveText(who.kmh[i]);
  await expect(page.getByTestId(`${id}-gap-text`)).toHaveText(who.gaps[i]);
  await expect(page.getByTestId(`${id}-gap`)).toContainText(who.gaps[i].startsWith('+') ? 'behind' : 'ahead');
  await expect(page.getByTestId(`${id}-togo`)).toHaveText(toGo);
  if (predicted) await expect(page.getByTestId(`${id}-predicted`)).toHaveText(predicted);
}

/** Screenshots at both widths with every scroller at its top (the shell scrolls inside the page). */
async function shoot(page: Page, name: string) {
  await page.evaluate(() => document.querySelectorAll('*').forEach((el) => el.scrollTop && (el.scrollTop = 0)));
  await shootBoth(page, name);
}

async function setTarget(page: Page, skaterId: string, time: string, plan: 'even' | 'shares') {
  await page.getByTestId(`setup-target-edit-${skaterId}`).click();
  await page.getByTestId('target-time').fill(time);
  if (plan === 'shares') {
    await page.getByTestId('target-plan-shares').click();
    await page.getByTestId('target-shares-example').click();
    await expect(page.getByTestId('target-shares-sum')).toHaveText('Sum: 100 % (must be 100)');
    await expect(page.getByTestId('target-shares-source')).toContainText('Wiersma et al. 2017');
  }
  await expect(page.getByTestId('target-preview')).toBeVisible();
  await page.getByTestId('target-save').click();
  await expect(page.getByTestId('target-editor')).toHaveCount(0);
}

test('a 1500 m pair timed at the boards, reloaded mid-race, finished, synced and read by the skater', async ({ browser }) => {
  const { coach, skaters, cues } = await apiCoachWithSkaters(BASE, ['Anna Reede', 'Bram Tolsma', 'Cor Wijnstra']);
  const [anna, bram] = skaters;

  // Anna gets an account through an invitation, as in real life.
  const annaAccount = await inviteAndAccept(BASE, coach, {
    label: 'anna',
    role: 'skater',
    skaterId: anna.id,
    displayName: 'Anna Reede',
    password: 'blades-in-their-guards',
  });

  // --- the coach, at the boards ---
  const coachContext = await browser.newContext({ viewport: PHONE });
  const page = await coachContext.newPage();
  const errors = watchErrors(page);
  await signInThroughForm(page, BASE, coach.email, coach.password, OPEN_MS);
  // A cue for Anna on the Board first: her today page shows the run beside it.
  await page.getByTestId(`skater-tile-${anna.id}`).click();
  await tapCue(page, cues[0]);
  await expect(page.locator('[data-testid^="feed-item-"]')).toHaveCount(1);
  await page.getByTestId('tab-clock').click();
  await expect(page.getByTestId('clock-setup')).toBeVisible({ timeout: OPEN_MS });
  await expect(page.getByTestId('clock-caution')).toContainText('never stand on the track');

  await page.getByTestId('setup-distance-1500').click();
  await page.getByTestId(`setup-skater-${anna.id}`).click();
  await page.getByTestId(`setup-skater-${bram.id}`).click();
  await expect(page.getByTestId('setup-slot-inner')).toContainText('Inner');
  await expect(page.getByTestId('setup-slot-inner-name')).toHaveText('Anna Reede');
  await expect(page.getByTestId('setup-slot-outer')).toContainText('Outer');
  await expect(page.getByTestId('setup-slot-outer-name')).toHaveText('Bram Tolsma');
  await setTarget(page, anna.id, '1:58.00', 'even');
  await setTarget(page, bram.id, '1:57.00', 'shares');
  await expect(page.getByTestId(`setup-target-${anna.id}`)).toHaveText('Target 1:58.00, even pace');
  await expect(page.getByTestId(`setup-target-${bram.id}`)).toHaveText('Target 1:57.00, section shares');
  await expectTapTargetsAtLeast(page, 'clock-home', { min: 47.5 });
  await checkA11yAtBothWidths(page, 'clock setup', () => expect(page.getByTestId('clock-start')).toBeVisible());
  await shoot(page, 'clock-setup');

  // --- the gun --- (on the phone layout's Start bar: the screenshots above ended at 1440 px)
  await expect(page.getByTestId('clock-start-bar')).toBeVisible();
  await expect(page.getByTestId('clock-start')).toHaveCount(1);
  const gun = await page.evaluate(() => performance.now());
  await touchAt(page, 'clock-start', gun);
  await expect(page.getByTestId('clock-live')).toBeVisible();
  expect(await anchor(page)).toBe(gun);
  await expect(page.getByTestId('lane-inner-name')).toHaveText('Anna Reede');
  await expect(page.getByTestId('lane-outer-name')).toHaveText('Bram Tolsma');
  await expect(page.getByTestId('lane-inner-togo')).toHaveText('Opener + 3 laps');

  // The two lane buttons together cover at least half of the 390 × 844 screen.
  const boxes = await Promise.all(['inner', 'outer'].map((l) => page.getByTestId(`lane-tap-${l}`).boundingBox()));
  const area = boxes.reduce((sum, b) => sum + (b ? b.width * b.height : 0), 0);
  expect(area, `lane buttons cover ${Math.round(area)} px²`).toBeGreaterThanOrEqual(0.5 * PHONE.width * PHONE.height);
  await expectTapTargetsAtLeast(page, 'clock-home', { min: 47.5 });

  // Opener: Anna, Bram 0.3 s later (both count), then a glove's second tap on Anna 0.2 s after hers.
  await cross(page, 'inner', ANNA.cross[0]);
  await cross(page, 'outer', BRAM.cross[0]);
  await cross(page, 'inner', ANNA.cross[0] + 200);
  await expect(page.getByTestId('clock-notice-ignored')).toContainText('ignored as a double tap');
  await expectLane(page, 'inner', ANNA, 0, '3 laps to go', '1:58.71');
  await expectLane(page, 'outer', BRAM, 0, '3 laps to go', '1:55.75');
  await expect(page.getByTestId('lane-inner-section')).toHaveText('Opener');

  await cross(page, 'inner', ANNA.cross[1]);
  await cross(page, 'outer', BRAM.cross[1]);
  await expectLane(page, 'inner', ANNA, 1, '2 laps to go', '1:58.86');
  await expectLane(page, 'outer', BRAM, 1, '2 laps to go', '1:58.46');
  await checkA11yAtBothWidths(page, 'clock live', () => expect(page.getByTestId('lane-tap-inner')).toBeVisible());
  await shoot(page, 'clock-live');

  // --- a reload mid-race: the heat comes back with every crossing, and carries on ---
  await page.reload();
  await expect(page.getByTestId('clock-live')).toBeVisible({ timeout: OPEN_MS });
  await expect(page.getByTestId('clock-resumed')).toContainText('Resumed: saved times exact');
  await expectLane(page, 'inner', ANNA, 1, '2 laps to go', '1:58.86');
  await expectLane(page, 'outer', BRAM, 1, '2 laps to go', '1:58.46');
  await shoot(page, 'clock-resumed');

  await cross(page, 'outer', BRAM.cross[2]);
  await cross(page, 'inner', ANNA.cross[2]);
  await expectLane(page, 'inner', ANNA, 2, 'Last lap', '1:58.87');
  await expectLane(page, 'outer', BRAM, 2, 'Last lap', '1:58.90');

  // Undo a mis-tap and tap again: the lane is back where it was.
  await cross(page, 'outer', BRAM.cross[2] + 5_000);
  await expect(page.getByTestId('lane-outer-togo')).toHaveText('Finished');
  await page.getByTestId('lane-outer-undo').click();
  await expect(page.getByTestId('clock-notice-info')).toContainText('Undone');
  await expectLane(page, 'outer', BRAM, 2, 'Last lap', '1:58.90');

  // The finish: each skater is finished at the last split; the heat ends by itself.
  await cross(page, 'outer', BRAM.cross[3]);
  await expect(page.getByTestId('lane-outer-status')).toHaveText('\u2713 Finished 1:58.50');
  await cross(page, 'inner', ANNA.cross[3]);
  await expect(page.getByTestId('clock-last-heat')).toBeVisible();

  for (const [lane, who] of [['inner', ANNA], ['outer', BRAM]] as const) {
    await expect(page.getByTestId(`run-${lane}-status`)).toHaveText(`\u2713 Finished in ${who.splits[3]}`);
    for (let i = 0; i < 4; i += 1) {
      const row = `run-${lane}-row-${i}`;
      await expect(page.getByTestId(`${row}-edit`)).toContainText(NAMES[i]);
      await expect(page.getByTestId(`${row}-lap`)).toHaveText(who.laps[i]);
      await expect(page.getByTestId(`${row}-split`)).toHaveText(who.splits[i]);
      await expect(page.getByTestId(`${row}-kmh`)).toHaveText(who.kmh[i]);
      await expect(page.getByTestId(`${row}-gap`)).toHaveText(who.gaps[i]);
    }
  }
  await expectTapTargetsAtLeast(page, 'clock-home', { min: 47.5 });
  await checkA11yAtBothWidths(page, 'clock finished', () => expect(page.getByTestId('clock-last-heat')).toBeVisible());
  await shoot(page, 'clock-finished');

  // --- sync: the server holds exactly the taps (the double tap and the undone one never left) ---
  await syncNow(page);
  type Change = { table: string; id: string; op?: string; fields?: Record<string, unknown>; deleted?: boolean; deletedAt?: string | null };
  const pulled = await fetch(`${BASE}/api/sync/pull?teamId=${coach.teamId}&cursor=0&limit=1000`, {
    headers: { authorization: `Bearer ${coach.token}` },
  }).then((r) => r.json() as Promise<{ changes: Change[] }>);
  const runs = pulled.changes.filter((c) => c.table === 'runs');
  expect(runs).toHaveLength(2);
  const runOf = (skaterId: string) => runs.find((r) => r.fields?.skaterId === skaterId)!;
  expect(runOf(anna.id).fields).toMatchObject({ distanceM: 1500, track: 'long', lane: 'inner', status: 'finished', targetMs: 118_000, startOffsetMs: 0 });
  expect(runOf(bram.id).fields).toMatchObject({ distanceM: 1500, track: 'long', lane: 'outer', status: 'finished', targetMs: 117_000 });
  const stored = (runId: string) =>
    pulled.changes
      .filter((c) => c.table === 'crossings' && c.fields?.runId === runId && !c.deleted && !c.deletedAt)
      .map((c) => c.fields!.atMs as number)
      .sort((a, b) => a - b);
  expect(stored(runOf(anna.id).id)).toEqual(ANNA.cross);
  expect(stored(runOf(bram.id).id)).toEqual(BRAM.cross);

  // From the table to the skater: the Board opens with Anna picked, ready for a cue.
  await page.getByTestId('run-inner-skater').click();
  await expect(page.getByTestId(`skater-tile-${anna.id}`)).toHaveAttribute('aria-pressed', 'true', { timeout: OPEN_MS });
  errors();

  // --- Anna, on her own phone ---
  const skaterContext = await browser.newContext({ viewport: PHONE });
  const b = await skaterContext.newPage();
  const bErrors = watchErrors(b);
  await signInToToday(b, BASE, annaAccount.email, annaAccount.password, OPEN_MS);
  await expect(b.getByText(cues[0].label, { exact: true })).toBeVisible({ timeout: OPEN_MS });
  const card = `today-run-${runOf(anna.id).id}`;
  await expect(b.getByTestId(card)).toBeVisible({ timeout: OPEN_MS });
  await expect(b.getByTestId(`${card}-status`)).toHaveText('\u2713 Finished in 1:58.95');
  await expect(b.getByTestId(`${card}-target`)).toHaveText('Target 1:58.00, even pace');
  for (let i = 0; i < 4; i += 1) {
    await expect(b.getByTestId(`${card}-row-${i}-lap`)).toHaveText(ANNA.laps[i]);
    await expect(b.getByTestId(`${card}-row-${i}-split`)).toHaveText(ANNA.splits[i]);
    await expect(b.getByTestId(`${card}-row-${i}-kmh`)).toHaveText(ANNA.kmh[i]);
    await expect(b.getByTestId(`${card}-row-${i}-gap`)).toContainText(ANNA.gaps[i]);
  }
  // Only her own run reaches her phone.
  await expect(b.locator('[data-testid^="today-run-"][data-testid$="-what"]')).toHaveCount(1);
  await checkA11yAtBothWidths(b, 'skater today with runs', () => expect(b.getByTestId(card)).toBeVisible());
  await shoot(b, 'skater-today-runs');
  bErrors();

  await coachContext.close();
  await skaterContext.close();
});

test('a training group of six on free laps: six lane buttons on one phone screen, a stop, and End', async ({ browser }) => {
  const names = ['Dieuwke Hoekstra', 'Eelke Postma', 'Femke Jellema', 'Gerben Kuipers', 'Hylke Bosma', 'Ilse de Vries'];
  const { coach, skaters } = await apiCoachWithSkaters(BASE, names);
  const context = await browser.newContext({ viewport: PHONE });
  const page = await context.newPage();
  const errors = watchErrors(page);
  await signInThroughForm(page, BASE, coach.email, coach.password, OPEN_MS);
  await page.getByTestId('tab-clock').click();
  await expect(page.getByTestId('clock-setup')).toBeVisible({ timeout: OPEN_MS });
  await page.getByTestId('setup-distance-0').click();
  await page.getByTestId('setup-mode-group').click();
  for (const s of skaters) await page.getByTestId(`setup-skater-${s.id}`).click();
  for (let i = 1; i <= 6; i += 1) await expect(page.getByTestId(`setup-group-${i}`)).toContainText(names[i - 1]);

  await touchAt(page, 'clock-start', await page.evaluate(() => performance.now()));
  await expect(page.getByTestId('clock-live')).toBeVisible();
  // Six lane buttons, each whole on the screen above the tab bar, together half the screen or more.
  const bar = await page.getByTestId('tab-clock').boundingBox();
  let area = 0;
  for (let i = 1; i <= 6; i += 1) {
    const box = await page.getByTestId(`lane-tap-group-${i}`).boundingBox();
    expect(box, `lane ${i} has a box`).not.toBeNull();
    expect(box!.y + box!.height).toBeLessThanOrEqual((bar?.y ?? PHONE.height) + 0.5);
    expect(box!.x + box!.width).toBeLessThanOrEqual(PHONE.width + 0.5);
    area += box!.width * box!.height;
    await expect(page.getByTestId(`lane-group-${i}-name`)).toHaveText(names[i - 1]);
  }
  expect(area, `group lane buttons cover ${Math.round(area)} px²`).toBeGreaterThanOrEqual(0.5 * PHONE.width * PHONE.height);
  await expectTapTargetsAtLeast(page, 'clock-home', { min: 47.5 });

  // Free laps: each crossing is a 400 m lap, counted up.
  const start = await anchor(page);
  for (const [i, at] of [[1, 40_000], [2, 40_300], [1, 72_000], [3, 41_000]] as const) await touchAt(page, `lane-tap-group-${i}`, start + at);
  await expect(page.getByTestId('lane-group-1-lap')).toHaveText('32.00');
  await expect(page.getByTestId('lane-group-1-split')).toHaveText('1:12.00');
  await expect(page.getByTestId('lane-group-1-togo')).toHaveText('2 laps');
  await expect(page.getByTestId('lane-group-2-lap')).toHaveText('40.30');
  await expect(page.getByTestId('lane-group-3-lap')).toHaveText('41.00');
  await expect(page.getByTestId('lane-group-3-togo')).toHaveText('1 lap');

  // One strip for the group's Undo and Stop: Stop…, the skater's number, the reason.
  await page.getByTestId('group-stop').click();
  await page.getByTestId('group-stop-4').click();
  await page.getByTestId('group-reason-fall').click();
  await expect(page.getByTestId('group-controls')).toBeVisible();
  // Undo…, number 3: Femke's only crossing is taken back.
  await page.getByTestId('group-undo').click();
  await page.getByTestId('group-undo-3').click();
  await expect(page.getByTestId('lane-group-3-togo')).toHaveText('0 laps');
  await expect(page.getByTestId('lane-group-4-status')).toHaveText('\u25A0 Stopped: Fall');
  await checkA11yAtBothWidths(page, 'clock live group', () => expect(page.getByTestId('lane-tap-group-1')).toBeVisible());
  await shoot(page, 'clock-live-group');

  // End asks once more, then finishes everyone still skating free laps.
  await page.getByTestId('clock-end').click();
  await expect(page.getByTestId('clock-end')).toHaveText('Sure? End');
  await page.getByTestId('clock-end').click();
  await expect(page.getByTestId('clock-last-heat')).toBeVisible();
  await expect(page.getByTestId('run-group-1-status')).toHaveText('\u2713 Finished: 2 laps in 1:12.00');
  await expect(page.getByTestId('run-group-1-row-1-lap')).toHaveText('32.00');
  await expect(page.getByTestId('run-group-1-row-1-kmh')).toHaveText('45.00');
  await expect(page.getByTestId('run-group-4-status')).toHaveText('\u25A0 Stopped: Fall');
  errors();
  await context.close();
});
