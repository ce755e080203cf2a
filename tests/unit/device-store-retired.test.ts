/**
 * Retired skaters on the device (sync/tables/squad.ts over sql.js): a retirement comes down with a
 * pull like any change of the profile; the board's list (`onBoard`, what store/board.ts gives the
 * tiles and pickers) leaves the skater out, while the full list, the notes already written and the
 * skater's own page keep their name. Bringing them back puts them on the board again. A device
 * database from before the column existed counts everyone as live.
 */
import { v7 as uuidv7 } from 'uuid';
import type { Cue } from '../../shared/schemas';
import type { PullReply } from '../../shared/schemas/sync';
import { applyPullPage } from '../../sync/apply';
import { deviceMigrations, migrateDevice } from '../../sync/schema';
import { DeviceStore } from '../../sync/store';
import { openMemoryDriver } from './support/sqljs-driver';

const TEAM = '0193a000-0000-7000-8000-00000000aaaa';
const COACH = '0193a000-0000-7000-8000-00000000c0c0';
const MIA = '0193a000-0000-7000-8000-0000000000b1';
const NOOR = '0193a000-0000-7000-8000-0000000000b2';
const cue: Cue = { id: uuidv7(), phase: 'curve', label: 'Lean in from the ankle', sortOrder: 1, archived: false };

let seq = 100;
const page = (changes: PullReply['changes']): PullReply => ({
  changes,
  tombstones: [],
  evictions: [],
  nextCursor: seq,
  hasMore: false,
  remaining: 0,
  serverClock: `${String(Date.UTC(2026, 11, 2, 9)).padStart(15, '0')}-000000-server`,
  serverTime: '2026-12-02T09:00:00.000Z',
});
const profile = (id: string, displayName: string, retired: boolean) => ({
  table: 'skaters' as const,
  id,
  serverSeq: ++seq,
  fields: { displayName, groupId: null, hasAccount: false, retired },
});

async function coachDevice() {
  const store = await DeviceStore.open(await openMemoryDriver(), { now: () => Date.UTC(2026, 11, 2, 9, 0, 0) });
  await store.loadTeam(TEAM, {
    groups: [],
    skaters: [
      { id: MIA, displayName: 'Mia Kolk', groupId: null, hasAccount: false, retired: false },
      { id: NOOR, displayName: 'Noor Vliet', groupId: null, hasAccount: false, retired: false },
    ],
    cues: [cue],
  });
  const session = await store.startSession(TEAM, COACH);
  const notes = await store.recordObservations({
    teamId: TEAM, userId: COACH, authorName: 'Anouk Brink', sessionId: session.id, skaterIds: [MIA, NOOR], cueId: cue.id, mark: 'needs_work',
  });
  return { store, session, notes };
}

const names = (list: { displayName: string }[]) => list.map((s) => s.displayName);

describe('a retired skater on the device', () => {
  it('leaves the board list when the retirement is pulled, and keeps the name on every note', async () => {
    const { store, session, notes } = await coachDevice();
    expect(names(await store.listSkaters(TEAM, { onBoard: true }))).toEqual(['Mia Kolk', 'Noor Vliet']);

    await applyPullPage(store, TEAM, page([profile(MIA, 'Mia Kolk', true)]));

    expect(names(await store.listSkaters(TEAM, { onBoard: true }))).toEqual(['Noor Vliet']);
    const everyone = await store.listSkaters(TEAM);
    expect(everyone.find((s) => s.id === MIA)).toEqual({ id: MIA, displayName: 'Mia Kolk', groupId: null, hasAccount: false, retired: true });

    // The note written before stays in the session's feed, and the full list still names her.
    const feed = await store.listObservations(session.id);
    expect(feed.map((o) => o.id).sort()).toEqual(notes.map((n) => n.id).sort());
    const byId = new Map(everyone.map((s) => [s.id, s.displayName]));
    expect(feed.map((o) => byId.get(o.skaterId)).sort()).toEqual(['Mia Kolk', 'Noor Vliet']);
  });

  it('comes back on the board when brought back, under a new name too', async () => {
    const { store } = await coachDevice();
    await applyPullPage(store, TEAM, page([profile(MIA, 'Mia Kolk', true)]));
    await applyPullPage(store, TEAM, page([profile(MIA, 'Mia van der Kolk', false)]));
    expect(names(await store.listSkaters(TEAM, { onBoard: true }))).toEqual(['Mia van der Kolk', 'Noor Vliet']);
  });

  it("keeps the skater's own page: their notes and their name stay on their device", async () => {
    const store = await DeviceStore.open(await openMemoryDriver(), { now: () => Date.UTC(2026, 11, 2, 11, 0, 0) });
    const sessionId = uuidv7();
    const noteId = uuidv7();
    await applyPullPage(
      store,
      TEAM,
      page([
        { table: 'cues', id: cue.id, serverSeq: ++seq, fields: { phase: 'curve', label: cue.label, sortOrder: 1, archived: false } },
        {
          table: 'sessions', id: sessionId, serverSeq: ++seq,
          fields: { day: '2026-12-02', rink: '', title: '', focusCueIds: [], createdAt: '2026-12-02T08:00:00.000Z', createdBy: COACH },
        },
        {
          table: 'observations', id: noteId, serverSeq: ++seq,
          fields: {
            sessionId, skaterId: MIA, cueId: cue.id, mark: 'good', note: 'Lovely exit', noteShared: true,
            createdAt: '2026-12-02T09:00:00.000Z', createdBy: COACH, authorName: 'Anouk Brink', acknowledgedAt: null,
          },
        },
        profile(MIA, 'Mia Kolk', true),
      ]),
    );
    expect((await store.listSkaters(TEAM)).map((s) => [s.displayName, s.retired])).toEqual([['Mia Kolk', true]]);
    expect((await store.listForSkater(TEAM, MIA, '2026-12-02')).map((n) => n.id)).toEqual([noteId]);
  });

  it('a device database from before retirements counts every skater it holds as live', async () => {
    const driver = await openMemoryDriver();
    for (const [version, sql] of deviceMigrations.slice(0, 3).entries()) {
      await driver.exec(sql);
      await driver.exec(`PRAGMA user_version = ${version + 1}`);
    }
    await driver.run(`INSERT INTO skaters (id, team_id, display_name, group_id, has_account) VALUES (?, ?, 'Mia Kolk', NULL, 0)`, [MIA, TEAM]);
    await migrateDevice(driver);
    const store = await DeviceStore.open(driver, { now: () => Date.UTC(2026, 11, 2, 9, 0, 0) });
    expect(await store.listSkaters(TEAM, { onBoard: true })).toEqual([{ id: MIA, displayName: 'Mia Kolk', groupId: null, hasAccount: false, retired: false }]);
  });
});
