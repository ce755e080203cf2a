/**
 * One phone, two people in turn (ONE browser context, so one device database): a coach records
 * notes with the server down - one of them private, with text the skater must never read - and
 * signs out, told that the unsent notes stay on this device for them. The skater signs in on the
 * same phone and syncs: they see only their own notes, the device holds none of the coach's rows
 * or private text, and the coach's outbox entries are still there, untouched. The coach signs in
 * again and syncs: every note is on the server exactly once, and the board shows them all, also
 * the ones the skater could not see (pulled again from cursor 0).
 *
 * The device store is read from the page through the benchmark handle (localStorage flag
 * 'boardside.bench' = '1' exposes { store, driver } as globalThis.__boardsideBench).
 */
import { expect, test, type Page } from '@playwright/test';
import path from 'node:path';
import { mkdirSync } from 'node:fs';
import { apiCoachWithSkaters, inviteAndAccept, ownServer, PHONE, SHOTS, signInThroughForm, watchErrors, syncNow } from './support';
import { tapCue } from './board-phone-taps';

const server = ownServer(8445);
const BASE = server.base;
const PRIVATE_TEXT = 'Hip folds open on the exit: ask the physio on Thursday';
const HELD_TABLES = ['observations', 'sessions', 'cues', 'skaters', 'groups', 'sync_shadow'];

test.afterAll(() => server.stop());

type OutboxRow = { op_id: string; user_id: string; tbl: string; record_id: string; kind: string; status: string; fields: string; hlc: string; attempts: number };

/** Runs SQL against the page's device database (through the benchmark handle). */
function sql<T>(page: Page, query: string): Promise<T[]> {
  return page.evaluate(async (q) => {
    const bench = (globalThis as unknown as { __boardsideBench?: { driver: { all: (s: string) => Promise<unknown[]> } } }).__boardsideBench;
    if (!bench) throw new Error('the device store is not exposed (boardside.bench flag)');
    return bench.driver.all(q);
  }, query) as Promise<T[]>;
}

const outbox = (page: Page) => sql<OutboxRow>(page, 'SELECT op_id, user_id, tbl, record_id, kind, status, fields, hlc, attempts FROM outbox ORDER BY seq');

async function held(page: Page): Promise<Record<string, unknown[]>> {
  const rows: Record<string, unknown[]> = {};
  for (const table of HELD_TABLES) rows[table] = await sql(page, `SELECT * FROM ${table}`);
  return rows;
}

async function shot(page: Page, name: string) {
  mkdirSync(SHOTS, { recursive: true });
  await page.setViewportSize(PHONE);
  await page.waitForTimeout(150);
  await page.screenshot({ path: path.join(SHOTS, `${name}-390.png`), fullPage: true });
}

test('a coach and a skater on one phone: nothing leaks, nothing is lost, nothing is sent twice', async ({ browser }) => {
  test.setTimeout(180_000);
  await server.start();
  const { coach, skaters, cues } = await apiCoachWithSkaters(BASE, ['Wietske Brouwer', 'Hidde Sijbrandij']);
  const [wietske, hidde] = skaters;

  const { email: skaterEmail, password: skaterPassword } = await inviteAndAccept(BASE, coach, {
    label: 'wietske', role: 'skater', skaterId: wietske.id, displayName: 'Wietske Brouwer', password: 'blades-dry-after-training',
  });

  const context = await browser.newContext({ viewport: PHONE });
  await context.addInitScript(() => localStorage.setItem('boardside.bench', '1'));
  const page = await context.newPage();
  const errors = watchErrors(page, [/Failed to load resource/, /ERR_CONNECTION_REFUSED/, /ERR_INTERNET_DISCONNECTED/]);

  // --- the coach, online first: two notes reach the server ---
  await signInThroughForm(page, BASE, coach.email, coach.password);
  await expect(page.getByTestId(`skater-tile-${wietske.id}`)).toBeVisible();
  const record = async (skaterId: string, cueIndex: number, note?: string) => {
    await page.getByTestId(`skater-tile-${skaterId}`).click();
    await tapCue(page, cues[cueIndex]);
    if (note) {
      // The undo bar offers the note until the pick changes.
      await page.getByTestId('note-add').click();
      await page.getByTestId('note-input').fill(note);
      await page.getByTestId('note-save').click();
    }
    await page.getByTestId(`skater-tile-${skaterId}`).click();
  };
  await record(wietske.id, 0);
  await record(hidde.id, 1);
  await syncNow(page);
  await page.evaluate(() => navigator.serviceWorker.ready.then(() => true));
  expect(await outbox(page)).toEqual([]);

  // --- the server goes down; the coach keeps recording, one note private ---
  await server.stop();
  for (let i = 2; i < 5; i += 1) await record(wietske.id, i);
  for (let i = 5; i < 7; i += 1) await record(hidde.id, i);
  await record(wietske.id, 7, PRIVATE_TEXT);
  await expect(page.locator('[data-testid^="feed-item-"]')).toHaveCount(8);
  const recordedIds = (await page.locator('[data-testid^="feed-item-"]').evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')!))).map(
    (id) => id.slice('feed-item-'.length),
  );
  const coachOutbox = await outbox(page);
  expect(coachOutbox.length).toBeGreaterThanOrEqual(6);
  expect(coachOutbox.every((o) => o.status === 'pending')).toBe(true);
  expect(JSON.stringify(coachOutbox)).toContain('physio');

  // --- the coach signs out: told plainly that the unsent notes stay here, for them ---
  await page.getByTestId('sign-out').first().click();
  await expect(page.getByTestId('sign-out-dialog')).toBeVisible();
  await expect(page.getByTestId('sign-out-unsent')).toContainText(`${coachOutbox.length} changes`);
  await expect(page.getByTestId('sign-out-dialog')).toContainText('kept for you');
  await shot(page, 'shared-device-sign-out');
  await page.getByTestId('sign-out-confirm').click();
  await expect(page.getByTestId('sign-in-email')).toBeVisible({ timeout: 20_000 });
  // Signed out: nothing readable is left on the device; the outbox is whole.
  for (const [table, rows] of Object.entries(await held(page))) expect({ table, rows: rows.length }).toEqual({ table, rows: 0 });
  expect(await outbox(page)).toEqual(coachOutbox);

  // --- the skater signs in on the same phone and syncs ---
  // (No reload: the coach's sign-out could not reach the server, so their refresh cookie is
  // still alive until the skater's sign-in replaces it.)
  await server.start();
  await page.getByTestId('sign-in-email').fill(skaterEmail);
  await page.getByTestId('sign-in-password').fill(skaterPassword);
  await page.getByTestId('sign-in-submit').click();
  await expect(page.getByTestId('skater-home')).toBeVisible();
  // Wietske's own notes: one from the online phase, four recorded offline never reached the server.
  await expect(page.locator('[data-testid^="ack-"]')).toHaveCount(1, { timeout: 20_000 });
  await page.getByTestId('today-refresh').click();
  await expect(page.getByTestId('today-pending')).toHaveCount(0, { timeout: 20_000 });
  await expect(page.getByText(/physio/)).toHaveCount(0);
  await expect(page.locator('[data-testid^="ack-"]')).toHaveCount(1);
  await shot(page, 'shared-device-skater-today');

  const skaterHeld = await held(page);
  expect(JSON.stringify(skaterHeld)).not.toContain('physio');
  const heldNotes = skaterHeld.observations as { skater_id: string; created_by: string }[];
  expect(heldNotes.length).toBe(1);
  expect(heldNotes.every((o) => o.skater_id === wietske.id)).toBe(true);
  const afterSkater = await outbox(page);
  // The coach's entries: same count, same op ids, untouched (no attempt, no status change).
  expect(afterSkater.filter((o) => o.user_id === coachOutbox[0].user_id)).toEqual(coachOutbox);
  expect(afterSkater.filter((o) => o.user_id !== coachOutbox[0].user_id)).toEqual([]);

  // --- the skater signs out (nothing unsent: no dialog); the coach signs in again and syncs ---
  await page.getByTestId('sign-out').first().click();
  await expect(page.getByTestId('sign-in-email')).toBeVisible({ timeout: 20_000 });
  expect((await held(page)).observations).toEqual([]);
  await signInThroughForm(page, BASE, coach.email, coach.password);
  await syncNow(page);
  await expect(page.locator('[data-testid^="feed-item-"]')).toHaveCount(8, { timeout: 20_000 });
  for (const id of recordedIds) await expect(page.getByTestId(`feed-item-${id}`)).toBeVisible();
  await expect(page.getByText(PRIVATE_TEXT)).toBeVisible();
  expect(await outbox(page)).toEqual([]);
  await shot(page, 'shared-device-coach-board');

  // On the server: every note once, none missing, none extra.
  const fresh = await fetch(`${BASE}/api/auth/sign-in`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: BASE },
    body: JSON.stringify({ email: coach.email, password: coach.password }),
  }).then((r) => r.json() as Promise<{ accessToken: string }>);
  const pulled = await fetch(`${BASE}/api/sync/pull?teamId=${coach.teamId}&cursor=0&limit=1000`, {
    headers: { authorization: `Bearer ${fresh.accessToken}`, origin: BASE },
  }).then((r) => r.json() as Promise<{ changes: { table: string; id: string; fields: Record<string, unknown> }[]; hasMore: boolean }>);
  expect(pulled.hasMore).toBe(false);
  const notes = pulled.changes.filter((c) => c.table === 'observations');
  expect(notes.map((n) => n.id).sort()).toEqual([...recordedIds].sort());
  expect(new Set(notes.map((n) => n.id)).size).toBe(notes.length);
  expect(notes.filter((n) => n.fields.note === PRIVATE_TEXT)).toHaveLength(1);
  errors();
  await context.close();
});
