/**
 * Tidy-up in the evening review against the real server (its own, on port 8493): two coaches'
 * sessions of today (made through the sync API, as two devices would), with a mis-tapped cue and
 * a shared note on the wrong skater. The head coach, at 1440 px, fixes the cue, moves the note to
 * the other skater, merges the two sessions and syncs; the skater the note was on no longer sees it
 * on her today page after her next sync, and the skater it moved to does. At 390 px the list is
 * stacked and usable (every target >= 48 px); axe at both widths; screenshots 'review-tidy-*'.
 */
import { expect, test, type Page } from '@playwright/test';
import { v4 as uuidv4, v7 as uuidv7 } from 'uuid';
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
  signInThroughForm,
  signInToToday,
  syncNow,
  userIdOf,
  watchErrors,
} from './support';

const server = ownServer(8493);
const BASE = server.base;
test.afterAll(() => server.stop());

const localDay = (d = new Date()) => `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
const hlc = (node: string, counter: number) => `${String(Date.now()).padStart(15, '0')}-${String(counter).padStart(6, '0')}-${node}`;

async function push(token: string, teamId: string, ops: { table: string; recordId: string; fields: Record<string, unknown> }[]) {
  const clientId = uuidv4();
  const res = await fetch(`${BASE}/api/sync/push`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', authorization: `Bearer ${token}`, origin: BASE },
    body: JSON.stringify({
      clientId,
      teamId,
      ops: ops.map((op, i) => ({
        opId: uuidv7(), table: op.table, recordId: op.recordId, kind: 'upsert', fields: op.fields,
        hlc: Object.fromEntries(Object.keys(op.fields).map((f) => [f, hlc(clientId, i)])),
      })),
    }),
  });
  expect(res.status).toBe(200);
  const body = (await res.json()) as { results: { status: string; message?: string }[] };
  expect(body.results.map((r) => `${r.status} ${r.message ?? ''}`.trim())).toEqual(ops.map(() => 'applied'));
}

async function openTidy(page: Page) {
  await page.getByTestId('tab-review').first().click();
  await expect(page.getByTestId('review-home')).toBeVisible();
  await page.getByTestId('review-section-tidy').click();
  await expect(page.getByTestId('tidy-sessions')).toBeVisible({ timeout: 20_000 });
}

test('the head coach fixes a cue, moves a note to another skater, merges two sessions of one day; the skaters see it', async ({ browser }) => {
  test.setTimeout(300_000);
  await server.start();
  const { coach, skaters, cues } = await apiCoachWithSkaters(BASE, ['Anna Reede', 'Berend Visser']);
  const [anna, berend] = skaters;
  const headId = userIdOf(coach.token);
  const annaAccount = await inviteAndAccept(BASE, coach, { label: 'anna', role: 'skater', skaterId: anna.id, displayName: 'Anna Reede', password: 'edges-sharp-and-dry' });
  const berendAccount = await inviteAndAccept(BASE, coach, { label: 'berend', role: 'skater', skaterId: berend.id, displayName: 'Berend Visser', password: 'edges-sharp-and-wet' });

  // Two sessions of today: the near side's and the far side's (two devices, two ids).
  const day = localDay();
  const near = uuidv7();
  const far = uuidv7();
  const misTap = uuidv7();
  const wrongSkater = uuidv7();
  const farOther = uuidv7();
  // Taken a minute ago (a note may not be older than its team, give or take a device clock).
  const createdAt = new Date(Date.now() - 60_000).toISOString();
  const obs = (sessionId: string, skaterId: string, cueId: string, note = '', noteShared = false) => ({
    sessionId, skaterId, cueId, mark: 'needs_work', note, noteShared, createdAt, createdBy: headId,
  });
  await push(coach.token, coach.teamId, [
    { table: 'sessions', recordId: near, fields: { day, rink: 'Oval', title: 'Near side', focusCueIds: [cues[0].id], createdAt, createdBy: headId } },
    { table: 'sessions', recordId: far, fields: { day, rink: 'Oval', title: 'Far side', focusCueIds: [cues[3].id], createdAt, createdBy: headId } },
    { table: 'observations', recordId: misTap, fields: obs(near, anna.id, cues[1].id) },
    { table: 'observations', recordId: wrongSkater, fields: obs(far, anna.id, cues[2].id, 'Knees over toes 🙂 — ركبة', true) },
    { table: 'observations', recordId: farOther, fields: obs(far, berend.id, cues[4].id) },
  ]);

  // Anna, on her phone, sees the note that was meant for Berend.
  const annaContext = await browser.newContext({ viewport: PHONE });
  const annaPage = await annaContext.newPage();
  await signInToToday(annaPage, BASE, annaAccount.email, annaAccount.password);
  await expect(annaPage.getByText(/Knees over toes/)).toBeVisible({ timeout: 20_000 });

  // The head coach, at the laptop.
  const context = await browser.newContext({ viewport: DESKTOP });
  const page = await context.newPage();
  const errors = watchErrors(page);
  await signInThroughForm(page, BASE, coach.email, coach.password);
  await openTidy(page);
  await expect(page.getByTestId(`tidy-session-${near}`)).toContainText('1 note');
  await expect(page.getByTestId(`tidy-session-${far}`)).toContainText('2 notes');

  // 1. The mis-tap: the cue was the one beside it.
  await page.getByTestId(`tidy-session-${near}`).click();
  await page.getByTestId(`tidy-note-fix-${misTap}`).click();
  await page.getByTestId(`tidy-fix-phase-${cues[0].phase}-${misTap}`).click();
  await page.getByTestId(`tidy-fix-cue-${cues[0].id}-${misTap}`).click();
  await page.getByTestId(`tidy-fix-save-${misTap}`).click();
  await expect(page.getByTestId('tidy-message-success')).toContainText('Note changed');
  await expect(page.getByTestId(`tidy-note-cue-${misTap}`)).toContainText(cues[0].label);

  // 2. The note on the wrong skater moves to Berend (the author stays the head coach).
  await page.getByTestId(`tidy-session-${far}`).click();
  await page.getByTestId(`tidy-note-fix-${wrongSkater}`).click();
  await page.getByTestId(`tidy-fix-skater-${berend.id}-${wrongSkater}`).click();
  await expect(page.getByTestId(`tidy-fix-move-hint-${wrongSkater}`)).toBeVisible();
  await page.getByTestId(`tidy-fix-save-${wrongSkater}`).click();
  await expect(page.getByTestId(`tidy-note-skater-${wrongSkater}`)).toHaveText('Berend Visser');
  await expect(page.getByTestId(`tidy-note-author-${wrongSkater}`)).toContainText('Coach Tjitske');

  // 3. The two sessions of today become one (asked first).
  await page.getByTestId(`tidy-merge-${near}`).click();
  await expect(page.getByTestId(`tidy-merge-question-${near}`)).toContainText('The notes of “Far side · Oval” move into “Near side · Oval”; “Far side · Oval” is left empty.');
  await page.getByTestId(`tidy-merge-yes-${near}`).click();
  await expect(page.getByTestId('tidy-message-success')).toContainText('Sessions merged');
  await expect(page.locator('[data-testid^="tidy-session-"]')).toHaveCount(1);
  await expect(page.getByTestId('tidy-pane-meta')).toContainText('3 notes');
  await syncNow(page);

  // The server has one session with the three notes, authors unchanged.
  const pulled = (await fetch(`${BASE}/api/sync/pull?teamId=${coach.teamId}&cursor=0&limit=1000`, {
    headers: { authorization: `Bearer ${coach.token}` },
  }).then((r) => r.json())) as { changes: { table: string; id: string; fields: Record<string, unknown> }[]; tombstones: { table: string; id: string }[] };
  const notes = pulled.changes.filter((c) => c.table === 'observations');
  // Neither is the board's own session for today: the one made first (near) is kept.
  expect(notes.map((n) => n.fields.sessionId)).toEqual([near, near, near]);
  // The emptied session is left in place (never deleted): no session tombstone; Tidy-up hides it.
  expect(pulled.tombstones.filter((t) => t.table === 'sessions')).toEqual([]);
  expect(pulled.changes.some((c) => c.table === 'sessions' && c.id === far)).toBe(true);
  expect(notes.find((n) => n.id === wrongSkater)?.fields).toMatchObject({ skaterId: berend.id, createdBy: headId, createdAt });
  expect(notes.find((n) => n.id === misTap)?.fields).toMatchObject({ cueId: cues[0].id });

  // Anna's next sync takes the note off her page; Berend's page has it.
  await annaPage.getByTestId('today-refresh').click();
  await expect(annaPage.getByText(/Knees over toes/)).toHaveCount(0, { timeout: 20_000 });
  const berendContext = await browser.newContext({ viewport: PHONE });
  const berendPage = await berendContext.newPage();
  await signInToToday(berendPage, BASE, berendAccount.email, berendAccount.password);
  await expect(berendPage.getByText(/Knees over toes/)).toBeVisible({ timeout: 20_000 });
  await shootBoth(berendPage, 'review-tidy-moved-skater');

  // The phone: stacked, usable, every target at least 48 px; axe at both widths.
  await page.setViewportSize(PHONE);
  await settleLayout(page);
  await expect(page.getByTestId('tidy-pane')).toBeVisible();
  await page.getByTestId(`tidy-note-fix-${farOther}`).click();
  await expect(page.getByTestId(`tidy-fix-${farOther}`)).toBeVisible();
  await expectTapTargetsAtLeast(page, 'tidy-section', { fields: true });
  await page.getByTestId(`tidy-fix-cancel-${farOther}`).click();
  await checkA11yAtBothWidths(page, 'review tidy-up', () => expect(page.getByTestId('tidy-pane')).toBeVisible());
  await page.getByTestId('review-section-tidy').scrollIntoViewIfNeeded();
  await shootBoth(page, 'review-tidy');
  errors();
  await Promise.all([annaContext.close(), berendContext.close(), context.close()]);
});
