/**
 * The evening: a coach's notes recorded with the server down reach the server when it is back;
 * the skater, on their own phone (a separate browser context), sees exactly their notes for today
 * (none of another skater's, no private note text) and acknowledges one; the coach syncs again
 * and sees the acknowledgement. This test runs its own server so it can stop and restart it.
 */
import { expect, test, type Page } from '@playwright/test';
import { apiCoachWithSkaters, inviteAndAccept, PHONE, shootBoth, signInThroughForm, signInToToday, watchErrors, ownServer, syncNow } from './support';
import { tapCue } from './board-phone-taps';

const server = ownServer(8435);
const BASE = server.base;
const startServer = () => server.start();
const stopServer = () => server.stop();

test.afterAll(stopServer);

test('offline notes reach the server once; the skater reads and acknowledges; the coach sees it', async ({ browser }) => {
  test.setTimeout(300_000);
  await startServer();
  const { coach, skaters, cues } = await apiCoachWithSkaters(BASE, ['Jildou Kramer', 'Klaas Boonstra']);
  const [jildou, klaas] = skaters;

  // Jildou gets an account through an invitation, as in real life.
  const jildouAccount = await inviteAndAccept(BASE, coach, {
    label: 'jildou', role: 'skater', skaterId: jildou.id, displayName: 'Jildou Kramer', password: 'skates-laced-tight',
  });

  // --- coach A, at the boards ---
  const coachContext = await browser.newContext({ viewport: PHONE });
  const a = await coachContext.newPage();
  const aErrors = watchErrors(a, [/Failed to load resource/, /ERR_CONNECTION_REFUSED/]);
  await signInThroughForm(a, BASE, coach.email, coach.password);
  await expect(a.getByTestId(`skater-tile-${jildou.id}`)).toBeVisible();
  await a.evaluate(() => navigator.serviceWorker.ready.then(() => true));
  await stopServer();

  const record = async (skaterId: string, cueIndex: number, note?: string, share = false) => {
    await a.getByTestId(`skater-tile-${skaterId}`).click();
    await tapCue(a, cues[cueIndex]);
    if (note) {
      // The undo bar offers the note until the pick changes.
      await a.getByTestId('note-add').click();
      await a.getByTestId('note-input').fill(note);
      // The switch starts at the team's default (coaches only, for this new team).
      await expect(a.getByTestId('note-shared')).toHaveAttribute('aria-checked', 'false');
      if (share) await a.getByTestId('note-shared').click();
      await a.getByTestId('note-save').click();
    }
    await a.getByTestId(`skater-tile-${skaterId}`).click();
  };
  for (let i = 0; i < 14; i += 1) await record(jildou.id, i);
  for (let i = 0; i < 6; i += 1) await record(klaas.id, 14 + i);
  // A private note on one of Jildou's cues: the skater must never see its text.
  await record(jildou.id, 20, 'Left knee drops in the curve: check with the physio');
  // A note shared from the same sheet: the skater reads its words.
  await record(jildou.id, 21, 'Lovely low sitting position — keep it 🙂', true);
  await expect(a.locator('[data-testid^="feed-item-"]')).toHaveCount(22);

  await startServer();
  await syncNow(a);
  const onServer = await fetch(`${BASE}/api/sync/pull?teamId=${coach.teamId}&cursor=0&limit=1000`, {
    headers: { authorization: `Bearer ${coach.token}` },
  }).then((r) => r.json() as Promise<{ changes: { table: string; id: string }[] }>);
  expect(onServer.changes.filter((c) => c.table === 'observations')).toHaveLength(22);
  // A second sync sends nothing twice.
  await syncNow(a);

  // --- the skater, on their own phone ---
  const skaterContext = await browser.newContext({ viewport: PHONE });
  const b = await skaterContext.newPage();
  const bErrors = watchErrors(b);
  await signInToToday(b, BASE, jildouAccount.email, jildouAccount.password);
  const acks = b.locator('[data-testid^="ack-"]');
  await expect(acks).toHaveCount(16, { timeout: 20_000 });
  for (let i = 14; i < 20; i += 1) await expect(b.getByText(cues[i].label, { exact: true })).toHaveCount(0);
  await expect(b.getByText(/physio/)).toHaveCount(0);
  await expect(b.getByText(/Lovely low sitting position/)).toBeVisible();
  await shootBoth(b, 'skater-today');

  const first = await acks.first().getAttribute('data-testid');
  const observationId = first!.slice('ack-'.length);
  await acks.first().click();
  await expect(b.getByTestId(`acked-${observationId}`)).toBeVisible();
  await b.getByTestId('today-refresh').click();
  await expect(b.getByTestId('today-pending')).toHaveCount(0, { timeout: 20_000 });
  bErrors();

  // --- Jildou's guardian, on a third phone: reads along, cannot acknowledge ---
  const guardian = await inviteAndAccept(BASE, coach, {
    label: 'jildou-guardian', role: 'guardian', skaterId: jildou.id, displayName: 'Trijntje Kramer', password: 'warm-gloves-please',
  });
  const guardianContext = await browser.newContext({ viewport: PHONE });
  const g = await guardianContext.newPage();
  const gErrors = watchErrors(g);
  await signInToToday(g, BASE, guardian.email, guardian.password);
  await expect(g.getByTestId('guardian-note')).toBeVisible({ timeout: 30_000 });
  await expect(g.getByText(/Lovely low sitting position/)).toBeVisible();
  await expect(g.getByText(/physio/)).toHaveCount(0);
  // The skater's own acknowledgement shows; no "Got it" for the guardian to tap.
  await expect(g.getByTestId(`acked-${observationId}`)).toBeVisible();
  await expect(g.locator('[data-testid^="ack-"]')).toHaveCount(0);
  await shootBoth(g, 'guardian-today');
  gErrors();
  await guardianContext.close();

  // --- coach A syncs again and sees the acknowledgement ---
  await syncNow(a);
  await expect(a.getByTestId(`feed-acked-${observationId}`)).toBeVisible({ timeout: 20_000 });
  await shootBoth(a, 'board-after-sync');
  aErrors();
  await coachContext.close();
  await skaterContext.close();
});
