/**
 * The phone board fits the hand: at 390 x 844 a coach with a squad of 16 picks a skater and
 * records a cue from every phase without the page moving (each target is inside the viewport,
 * above the tab bar, before it is tapped, and nothing scrolls), every target is at least 48 px,
 * and gloved double taps neither lose nor invent notes (counted in the feed and, after a reload,
 * in the device store). Screenshots at 390 and 1440 px.
 */
import { expect, test, type Locator, type Page } from '@playwright/test';
import path from 'node:path';
import { apiCoachWithSkaters, DESKTOP, PHONE, SHOTS, shootBoth, signInThroughForm, watchErrors, ownServer } from './support';

// Invented skaters for an invented club.
const SQUAD = [
  'Aafke Dijkstra', 'Binne Hoekstra', 'Catrien Zijlstra', 'Douwe Feenstra', 'Eeltsje Bosma', 'Fokje Terpstra',
  'Gerlof Wijnia', 'Hiltsje Brouwer', 'Ids Kooistra', 'Jeltje Sikkema', 'Kees van Oeveren', 'Lútsen Postma',
  'Marrit Jellema', 'Nynke de Haan', 'Oene Tjalsma', 'Pier Wiersma',
];
const PHASES = ['start', 'opening', 'straight', 'curve', 'exit', 'pacing'];

/** The element lies wholly inside the viewport and above the app's tab bar. */
async function expectReachable(page: Page, target: Locator) {
  const box = await target.boundingBox();
  const bar = await page.getByTestId('tab-board').boundingBox();
  expect(box, 'target has a box').not.toBeNull();
  const floor = Math.min(PHONE.height, bar ? bar.y : PHONE.height);
  expect(box!.y).toBeGreaterThanOrEqual(0);
  expect(box!.x).toBeGreaterThanOrEqual(0);
  expect(box!.x + box!.width).toBeLessThanOrEqual(PHONE.width + 0.5);
  expect(box!.y + box!.height, 'target sits above the tab bar').toBeLessThanOrEqual(floor + 0.5);
  expect(Math.round(box!.height)).toBeGreaterThanOrEqual(48);
  expect(Math.round(box!.width)).toBeGreaterThanOrEqual(48);
}

/** Neither the page nor the board's own scroller has moved, and the page cannot scroll. */
async function expectNothingScrolled(page: Page) {
  const state = await page.evaluate(() => {
    const board = document.querySelector('[data-testid="board-scroll"]') as HTMLElement | null;
    const root = document.scrollingElement!;
    return { windowY: window.scrollY, boardTop: board?.scrollTop ?? -1, pageOverflow: root.scrollHeight - window.innerHeight };
  });
  expect(state).toEqual({ windowY: 0, boardTop: 0, pageOverflow: 0 });
}

// The machine may be busy: opening the device's database can take a while.
test.setTimeout(180_000);
const OPEN_MS = 60_000;

const feedItems = (page: Page) => page.locator('[data-testid^="feed-item-"]');

test('a squad of 16 on a phone: a skater and a cue from every phase, no scrolling, every target 48 px', async ({ browser, baseURL }) => {
  const { coach, skaters, cues } = await apiCoachWithSkaters(baseURL!, SQUAD);
  const page = await browser.newPage({ viewport: PHONE });
  const check = watchErrors(page);
  await signInThroughForm(page, baseURL!, coach.email, coach.password, OPEN_MS);
  for (const s of skaters) await expectReachable(page, page.getByTestId(`skater-tile-${s.id}`));
  await expectNothingScrolled(page);
  await expect(page.getByTestId('selection-summary')).toHaveText('Tap skaters, then a cue');

  for (const [i, phase] of PHASES.entries()) {
    const skater = skaters[i * 2];
    const tile = page.getByTestId(`skater-tile-${skater.id}`);
    if (i > 0) {
      const before = page.getByTestId(`skater-tile-${skaters[(i - 1) * 2].id}`);
      await expectReachable(page, before);
      await before.click();
    }
    await expectReachable(page, tile);
    await tile.click();
    await expect(page.getByTestId('selection-summary')).toContainText(skater.displayName);

    const tab = page.getByTestId(`phase-tab-${phase}`);
    await expectReachable(page, tab);
    await tab.click();
    const cue = cues.filter((c) => c.phase === phase).at(-1)!;
    const chip = page.getByTestId(i % 2 ? `cue-good-${cue.id}` : `cue-chip-${cue.id}`);
    await expectReachable(page, chip);
    const before = await chip.boundingBox();
    await chip.click();
    await expect(page.getByTestId('undo-bar')).toContainText(cue.label);
    // The undo bar took the pick line's slot: nothing under the thumb moved.
    expect((await chip.boundingBox())!.y).toBe(before!.y);
    await expect(page.getByTestId('undo-bar')).toContainText(skater.displayName);
    await expectReachable(page, page.getByTestId('undo-button'));
    await expectNothingScrolled(page);
  }
  await expect(feedItems(page)).toHaveCount(6);
  await expect(page.getByTestId('feed').getByText('Good', { exact: true })).toHaveCount(3);
  await page.screenshot({ path: path.join(SHOTS, 'board-phone-16-390.png') });

  // The wide layout stays side by side, every chip of every phase at once.
  await page.setViewportSize(DESKTOP);
  await expect(page.getByTestId('pane-skaters')).toBeVisible();
  await expect(page.getByTestId('pane-cues')).toBeVisible();
  await expect(page.getByTestId('pane-feed')).toBeVisible();
  const [a, b, c] = await Promise.all(['pane-skaters', 'pane-cues', 'pane-feed'].map((id) => page.getByTestId(id).boundingBox()));
  expect(a!.x + a!.width).toBeLessThanOrEqual(b!.x);
  expect(b!.x + b!.width).toBeLessThanOrEqual(c!.x);
  for (const phase of PHASES) await expect(page.getByTestId(`cue-section-${phase}`)).toBeVisible();
  await page.screenshot({ path: path.join(SHOTS, 'board-phone-16-1440.png') });
  await page.setViewportSize(PHONE);
  await shootBoth(page, 'board-phone-16');
  check();
  await page.close();
});

/** Two taps 50 ms apart at the same spot, as a glove does. */
async function gloveDoubleTap(page: Page, target: Locator) {
  const box = (await target.boundingBox())!;
  const x = box.x + box.width / 2;
  const y = box.y + box.height / 2;
  await page.mouse.click(x, y);
  await page.waitForTimeout(50);
  await page.mouse.click(x, y);
}

test('gloved double taps: one note per double tap on a chip, one tap undone per double tap on Undo', async ({ browser, baseURL }) => {
  const { coach, skaters, cues } = await apiCoachWithSkaters(baseURL!, SQUAD.slice(0, 6));
  const page = await browser.newPage({ viewport: PHONE });
  const check = watchErrors(page);
  await signInThroughForm(page, baseURL!, coach.email, coach.password, OPEN_MS);
  const straight = cues.filter((c) => c.phase === 'straight');
  await page.getByTestId('phase-tab-straight').click();

  await page.getByTestId(`skater-tile-${skaters[0].id}`).click();
  const chip = page.getByTestId(`cue-chip-${straight[0].id}`);
  await gloveDoubleTap(page, chip);
  await expect(feedItems(page)).toHaveCount(1);
  await expect(page.getByTestId('undo-bar-title')).toContainText('Noted ·');
  // A deliberate second tap later is a second note.
  await page.waitForTimeout(600);
  await chip.click();
  await expect(feedItems(page)).toHaveCount(2);
  await expect(page.getByTestId('undo-bar-title')).toContainText('Noted again ×2');

  // Two more notes, for another skater and cue: four in all.
  await page.getByTestId(`skater-tile-${skaters[0].id}`).click();
  await expect(page.getByTestId('undo-bar')).toHaveCount(0); // a new pick: the bar stops offering the old note
  await page.getByTestId(`skater-tile-${skaters[1].id}`).click();
  await page.getByTestId(`cue-chip-${straight[1].id}`).click();
  await page.waitForTimeout(450);
  await page.getByTestId(`cue-good-${straight[2].id}`).click();
  await expect(feedItems(page)).toHaveCount(4);

  // Double tap on Undo: only the note the bar names goes.
  await expect(page.getByTestId('undo-bar')).toContainText(straight[2].label);
  await gloveDoubleTap(page, page.getByTestId('undo-button'));
  await expect(feedItems(page)).toHaveCount(3);
  await expect(page.getByTestId('undo-bar-title')).toContainText('Undone');
  await expect(page.getByTestId('undo-button')).toBeDisabled();
  await page.waitForTimeout(500);
  await expect(feedItems(page)).toHaveCount(3);
  await expect(page.getByTestId('feed')).toContainText(straight[1].label);
  await page.screenshot({ path: path.join(SHOTS, 'board-phone-undone-390.png') });

  // A note on the latest tap, typed on the phone: the slot grows for the box, then closes.
  await page.waitForTimeout(4500); // the "Undone" bar has gone
  await page.getByTestId(`cue-chip-${straight[3].id}`).click();
  await page.getByTestId('note-add').click();
  await page.getByTestId('note-input').fill('Hips drop on the last lap');
  await page.screenshot({ path: path.join(SHOTS, 'board-phone-note-390.png') });
  await page.getByTestId('note-save').click();
  await expect(page.getByTestId('feed')).toContainText('Hips drop on the last lap');
  await expect(feedItems(page)).toHaveCount(4);
  await page.waitForTimeout(1500); // the note's write reaches the device store

  // What the device store holds: the same notes after a reload.
  await page.reload();
  await expect(page.getByTestId('coach-home')).toBeVisible({ timeout: OPEN_MS });
  await expect(feedItems(page)).toHaveCount(4);
  await expect(page.getByTestId(`tile-count-${skaters[0].id}`)).toContainText('2 notes');
  await expect(page.getByTestId(`tile-count-${skaters[1].id}`)).toContainText('2 notes');
  await expect(page.getByTestId('feed')).toContainText('Hips drop on the last lap');
  check();
  await page.close();
});

const server = ownServer(8452);
test.afterAll(() => server.stop());

test('a new day starts with the last session’s focus cues pinned, and the phone opens on them', async ({ browser }) => {
  await server.start();
  const { coach, skaters, cues } = await apiCoachWithSkaters(server.base, SQUAD.slice(0, 4));
  const context = await browser.newContext({ viewport: PHONE });
  const page = await context.newPage();
  const check = watchErrors(page, [/Failed to load resource/, /ERR_CONNECTION_REFUSED/]);
  await signInThroughForm(page, server.base, coach.email, coach.password, OPEN_MS);
  await page.evaluate(() => navigator.serviceWorker.ready.then(() => true));
  const pins = [cues.find((c) => c.phase === 'curve')!, cues.find((c) => c.phase === 'exit')!];
  await page.getByTestId('session-edit').click();
  for (const cue of pins) await page.getByTestId(`focus-pin-${cue.id}`).click();
  await expect(page.getByTestId('session-summary')).toContainText('2 focus cues');
  await page.getByTestId('session-close').click();

  // The next morning, at the rink with no connection.
  await server.stop();
  const tomorrow = new Date(Date.now() + 24 * 3600_000);
  tomorrow.setHours(9, 0, 0, 0);
  await page.clock.install({ time: tomorrow });
  await page.reload();
  await expect(page.getByTestId('coach-home')).toBeVisible({ timeout: OPEN_MS });
  const tab = page.getByTestId('phase-tab-focus');
  await expect(tab).toHaveAttribute('aria-selected', 'true');
  await expect(page.getByTestId('cue-section-focus')).toContainText(pins[0].label);
  await expect(page.getByTestId('cue-section-focus')).toContainText(pins[1].label);
  await expect(page.getByTestId('session-summary')).toContainText('2 focus cues');
  await page.getByTestId(`skater-tile-${skaters[0].id}`).click();
  await expectReachable(page, page.getByTestId(`cue-chip-${pins[1].id}`));
  await page.getByTestId(`cue-chip-${pins[1].id}`).click();
  await expect(feedItems(page)).toHaveCount(1);
  await expectNothingScrolled(page);
  await page.screenshot({ path: path.join(SHOTS, 'board-phone-focus-390.png') });
  check();
  await context.close();
});
