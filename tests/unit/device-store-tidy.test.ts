/**
 * Tidy-up on the device (sync/tables/tidy.ts over sql.js): fixing a note's mark, cue and words,
 * moving it to another skater, merging two sessions of one day or of neighbouring days (the
 * emptied one is left in place, never deleted, and listed again if a note arrives in it). Each change is its row plus its
 * outbox entry in one transaction; a refused change (another coach's note, a skater of another
 * team, a merge into itself, a failing write half way) leaves the device exactly as it was.
 */
import { v7 as uuidv7 } from 'uuid';
import type { Cue } from '../../shared/schemas';
import type { PullReply } from '../../shared/schemas/sync';
import { applyPullPage } from '../../sync/apply';
import type { SqlDriver } from '../../sync/driver';
import { DeviceStore, StoreError, sessionIdFor } from '../../sync/store';
import { openMemoryDriver } from './support/sqljs-driver';

const TEAM = '0193a000-0000-7000-8000-00000000aaaa';
const OTHER_TEAM = '0193a000-0000-7000-8000-00000000bbbb';
const HEAD = '0193a000-0000-7000-8000-00000000c0c1';
const COACH = '0193a000-0000-7000-8000-00000000c0c2';
const FENNA = uuidv7();
const SEM = uuidv7();
const STRANGER = uuidv7();
const DAY = '2026-12-02';
const curve: Cue = { id: uuidv7(), phase: 'curve', label: 'Lean in from the ankle', sortOrder: 1, archived: false };
const start: Cue = { id: uuidv7(), phase: 'start', label: 'Low first steps', sortOrder: 1, archived: false };

let seq = 0;
const page = (changes: PullReply['changes']): PullReply => ({
  changes,
  tombstones: [],
  evictions: [],
  nextCursor: 100 + seq,
  hasMore: false,
  remaining: 0,
  serverClock: `${String(Date.UTC(2026, 11, 2, 10)).padStart(15, '0')}-000000-server`,
  serverTime: '2026-12-02T10:00:00.000Z',
});

async function openStore() {
  let driver!: SqlDriver;
  const store = await DeviceStore.open((driver = await openMemoryDriver()), { now: () => Date.UTC(2026, 11, 2, 18, 0, 0) });
  await store.loadTeam(TEAM, {
    groups: [],
    skaters: [
      { id: FENNA, displayName: 'Fenna Dijk', groupId: null, hasAccount: true, retired: false },
      { id: SEM, displayName: 'Sem Baars', groupId: null, hasAccount: true, retired: false },
    ],
    cues: [curve, start],
  });
  await store.loadTeam(OTHER_TEAM, { groups: [], skaters: [{ id: STRANGER, displayName: 'Other Team', groupId: null, hasAccount: false, retired: false }], cues: [] });
  const board = await store.startSession(TEAM, HEAD, DAY);
  const [note] = await store.recordObservations({
    teamId: TEAM, userId: COACH, authorName: 'Jelle Vink', sessionId: board.id, skaterIds: [FENNA], cueId: curve.id, mark: 'needs_work',
  });
  return { store, driver, board, note };
}

/** A second session of the same day, as another device made it (pulled, with its notes). */
async function pullSecondSession(store: DeviceStore, by: string, notes: { skaterId: string; createdBy: string; focus?: string[] }[]) {
  const id = uuidv7();
  const ids = notes.map(() => uuidv7());
  await applyPullPage(
    store,
    TEAM,
    page([
      {
        table: 'sessions', id, serverSeq: ++seq,
        fields: { day: DAY, rink: 'Far side', title: 'Sprint block', focusCueIds: notes[0]?.focus ?? [start.id], createdAt: '2026-12-02T08:00:00.000Z', createdBy: by },
      },
      ...notes.map((n, i) => ({
        table: 'observations' as const, id: ids[i], serverSeq: ++seq,
        fields: {
          sessionId: id, skaterId: n.skaterId, cueId: start.id, mark: 'good', note: `far side ${i}`, noteShared: false,
          createdAt: `2026-12-02T09:0${i}:00.000Z`, createdBy: n.createdBy, authorName: n.createdBy === HEAD ? 'Marit Hoek' : 'Jelle Vink', acknowledgedAt: null,
        },
      })),
    ]),
  );
  return { id, ids };
}

const ops = async (store: DeviceStore) => (await store.listOutbox()).map((o) => ({ table: o.table, recordId: o.recordId, kind: o.kind, fields: o.fields }));

describe('fixing a note in the evening', () => {
  it('changes the mark and the cue: the row and one outbox entry with just those fields; the author stays', async () => {
    const { store, note } = await openStore();
    const before = (await store.listOutbox()).length;
    const fixed = await store.fixNote(note.id, COACH, { mark: 'good', cueId: start.id }, 'coach');
    expect(fixed).toMatchObject({ mark: 'good', cueId: start.id, createdBy: COACH, authorName: 'Jelle Vink', createdAt: note.createdAt });
    const after = await ops(store);
    expect(after.length).toBe(before + 1);
    expect(after[after.length - 1]).toEqual({ table: 'observations', recordId: note.id, kind: 'upsert', fields: { mark: 'good', cueId: start.id } });
  });

  it('adds the longer words and shares them; emoji and right-to-left text go through, a NUL byte does not', async () => {
    const { store, note } = await openStore();
    const words = 'Arms loose 🙂 — قوس أعمق في المنعطف';
    const fixed = await store.fixNote(note.id, COACH, { note: words, noteShared: true }, 'coach');
    expect(fixed).toMatchObject({ note: words, noteShared: true });
    const count = (await store.listOutbox()).length;
    await expect(store.fixNote(note.id, COACH, { note: 'bad\u0000byte' }, 'coach')).rejects.toThrow(StoreError);
    await expect(store.fixNote(note.id, COACH, { note: 'x'.repeat(5000) }, 'coach')).rejects.toThrow(StoreError);
    expect((await store.listOutbox()).length).toBe(count);
  });

  it('a plain coach cannot fix or move another coach\'s note (nothing queued); the head coach can', async () => {
    const { store, note } = await openStore();
    const count = (await store.listOutbox()).length;
    await expect(store.fixNote(note.id, '0193a000-0000-7000-8000-00000000c0c3', { mark: 'good' }, 'coach')).rejects.toThrow(/Only the coach who wrote this note/);
    expect((await store.listOutbox()).length).toBe(count);
    const fixed = await store.fixNote(note.id, HEAD, { skaterId: SEM }, 'head_coach');
    expect(fixed).toMatchObject({ skaterId: SEM, createdBy: COACH, authorName: 'Jelle Vink' });
  });
});

describe('moving a note to another skater', () => {
  it('queues the new skater and clears the old skater\'s "got it" on the device', async () => {
    const { store, driver, note } = await openStore();
    await driver.run(`UPDATE observations SET acknowledged_at = '2026-12-02T12:00:00.000Z' WHERE id = ?`, [note.id]);
    const moved = await store.fixNote(note.id, COACH, { skaterId: SEM }, 'coach');
    expect(moved.skaterId).toBe(SEM);
    expect(moved.acknowledgedAt ?? null).toBeNull();
    const last = (await ops(store)).pop();
    // The acknowledgement is the skater's field: never sent by a coach (the server clears it).
    expect(last).toEqual({ table: 'observations', recordId: note.id, kind: 'upsert', fields: { skaterId: SEM } });
  });

  it('refuses a skater of another team, an unknown one and a cue not in the library: nothing changes', async () => {
    const { store, note } = await openStore();
    const count = (await store.listOutbox()).length;
    await expect(store.fixNote(note.id, COACH, { skaterId: STRANGER }, 'coach')).rejects.toThrow('That skater is not in this team');
    await expect(store.fixNote(note.id, COACH, { skaterId: uuidv7() }, 'coach')).rejects.toThrow('That skater is not in this team');
    await expect(store.fixNote(note.id, COACH, { skaterId: 'not-a-uuid' }, 'coach')).rejects.toThrow(StoreError);
    await expect(store.fixNote(note.id, COACH, { cueId: uuidv7(), mark: 'good' }, 'coach')).rejects.toThrow('That cue is not in this team\'s library');
    expect((await store.listOutbox()).length).toBe(count);
    const [row] = (await store.listTidySessions(TEAM))[0].notes;
    expect(row).toMatchObject({ skaterId: FENNA, mark: 'needs_work', cueId: curve.id });
  });
});

describe('the sessions by day', () => {
  it('lists sessions newest day first with their notes, and says which one the board writes into', async () => {
    const { store, board, note } = await openStore();
    const second = await pullSecondSession(store, HEAD, [{ skaterId: SEM, createdBy: HEAD }]);
    const list = await store.listTidySessions(TEAM);
    expect(list.map((s) => s.id).sort()).toEqual([board.id, second.id].sort());
    const mine = list.find((s) => s.id === board.id)!;
    expect(mine.boardSession).toBe(true);
    expect(mine.notes.map((n) => n.id)).toEqual([note.id]);
    expect(list.find((s) => s.id === second.id)!.boardSession).toBe(false);
  });

  it('leaves out a session without notes (a board opened and never used, even with a title), and shows it once it holds one', async () => {
    const { store } = await openStore();
    const opened = await store.startSession(TEAM, HEAD, '2026-12-03');
    expect((await store.listTidySessions(TEAM)).map((s) => s.id)).not.toContain(opened.id);
    await store.updateSession(opened.id, HEAD, { title: 'Pairs' });
    expect((await store.listTidySessions(TEAM)).map((s) => s.id)).not.toContain(opened.id);
    const [note] = await store.recordObservations({
      teamId: TEAM, userId: HEAD, authorName: 'Marit Hoek', sessionId: opened.id, skaterIds: [SEM], cueId: start.id, mark: 'good',
    });
    expect((await store.listTidySessions(TEAM))[0]).toMatchObject({ id: opened.id, day: '2026-12-03', title: 'Pairs', notes: [expect.objectContaining({ id: note.id })] });
  });
});

describe('merging two sessions', () => {
  it('moves every note into the board\'s session and unites the focus cues; the emptied one is left (hidden), never deleted', async () => {
    const { store, board, note } = await openStore();
    await store.updateSession(board.id, HEAD, { focusCueIds: [curve.id] });
    const second = await pullSecondSession(store, HEAD, [
      { skaterId: SEM, createdBy: HEAD },
      { skaterId: FENNA, createdBy: COACH },
    ]);
    // Picked from the second session's side: the board's session is still the one kept.
    const result = await store.mergeSessions(TEAM, HEAD, second.id, board.id, 'head_coach');
    expect(result).toEqual({ kept: board.id, removed: second.id, moved: 2 });
    const list = await store.listTidySessions(TEAM);
    expect(list.map((s) => s.id)).toEqual([board.id]);
    expect(list[0].notes.map((n) => n.id).sort()).toEqual([note.id, ...second.ids].sort());
    expect(list[0].focusCueIds).toEqual([curve.id, start.id]);
    // Authors and times are untouched.
    for (const n of list[0].notes.filter((x) => second.ids.includes(x.id))) expect(n.createdAt.startsWith('2026-12-02T09:0')).toBe(true);
    const queued = await ops(store);
    for (const id of second.ids) expect(queued).toContainEqual({ table: 'observations', recordId: id, kind: 'upsert', fields: { sessionId: board.id } });
    expect(queued).toContainEqual({ table: 'sessions', recordId: board.id, kind: 'upsert', fields: { focusCueIds: [curve.id, start.id] } });
    // No session delete is queued (a tombstone of a board session would block its day for good).
    expect(queued.filter((o) => o.kind === 'delete')).toEqual([]);
    expect(await store.getSession(second.id)).toMatchObject({ id: second.id, day: DAY });
    // The kept session is queued before the moves.
    const order = queued.map((o) => `${o.table}:${o.recordId}:${o.kind}`);
    expect(order.indexOf(`sessions:${board.id}:upsert`)).toBeLessThan(order.indexOf(`observations:${second.ids[0]}:upsert`));
  });

  it('a note that arrives later in the merged-away session (a device that had not synced) shows there: the session is listed again', async () => {
    const { store, board, note } = await openStore();
    const second = await pullSecondSession(store, HEAD, [{ skaterId: SEM, createdBy: HEAD }]);
    await store.mergeSessions(TEAM, HEAD, board.id, second.id, 'head_coach');
    expect((await store.listTidySessions(TEAM)).map((s) => s.id)).toEqual([board.id]);
    // A coach's device took a note in that session offline; the next pull brings it.
    const late = uuidv7();
    await applyPullPage(store, TEAM, page([{
      table: 'observations', id: late, serverSeq: ++seq,
      fields: {
        sessionId: second.id, skaterId: FENNA, cueId: curve.id, mark: 'needs_work', note: 'late one', noteShared: false,
        createdAt: '2026-12-02T09:30:00.000Z', createdBy: COACH, authorName: 'Jelle Vink', acknowledgedAt: null,
      },
    }]));
    const list = await store.listTidySessions(TEAM);
    expect(list.map((s) => s.id).sort()).toEqual([board.id, second.id].sort());
    expect(list.find((s) => s.id === second.id)!.notes.map((n) => n.id)).toEqual([late]);
    expect(list.find((s) => s.id === board.id)!.notes.map((n) => n.id).sort()).toEqual([note.id, ...second.ids].sort());
    // And it can be merged again, the same way.
    expect(await store.mergeSessions(TEAM, HEAD, second.id, board.id, 'head_coach')).toEqual({ kept: board.id, removed: second.id, moved: 1 });
    expect((await store.listTidySessions(TEAM)).map((s) => s.id)).toEqual([board.id]);
  });

  it('merges a session that ran past midnight into the day before: the earlier day\'s board session is kept', async () => {
    const { store, board, note } = await openStore();
    const next = await store.startSession(TEAM, COACH, '2026-12-03');
    const [after] = await store.recordObservations({
      teamId: TEAM, userId: COACH, authorName: 'Jelle Vink', sessionId: next.id, skaterIds: [SEM], cueId: start.id, mark: 'good',
    });
    expect(next.id).toBe(sessionIdFor(TEAM, '2026-12-03'));
    expect(await store.mergeSessions(TEAM, COACH, next.id, board.id, 'coach')).toEqual({ kept: board.id, removed: next.id, moved: 1 });
    const list = await store.listTidySessions(TEAM);
    expect(list.map((s) => s.id)).toEqual([board.id]);
    expect(list[0].notes.map((n) => n.id).sort()).toEqual([note.id, after.id].sort());
    expect((await ops(store)).filter((o) => o.kind === 'delete')).toEqual([]);
  });

  it('refuses a session merged into itself, two days apart, and a plain coach moving another coach\'s notes', async () => {
    const { store, board } = await openStore();
    const count = (await store.listOutbox()).length;
    await expect(store.mergeSessions(TEAM, HEAD, board.id, board.id, 'head_coach')).rejects.toThrow('A session cannot be merged into itself');
    const other = await store.startSession(TEAM, HEAD, '2026-11-30');
    await expect(store.mergeSessions(TEAM, HEAD, board.id, other.id, 'head_coach')).rejects.toThrow('Only two sessions of the same day or of neighbouring days can be merged');
    const second = await pullSecondSession(store, HEAD, [{ skaterId: SEM, createdBy: HEAD }]);
    await expect(store.mergeSessions(TEAM, COACH, board.id, second.id, 'coach')).rejects.toThrow(/Only the head coach may merge these sessions/);
    expect((await store.listOutbox()).length).toBe(count);
    expect((await store.listTidySessions(TEAM)).map((s) => s.id)).toContain(second.id);
  });

  it('a write failing half way leaves nothing done: no note moved, no session gone, nothing queued', async () => {
    const { store, driver, board } = await openStore();
    const second = await pullSecondSession(store, HEAD, [
      { skaterId: SEM, createdBy: HEAD },
      { skaterId: FENNA, createdBy: HEAD },
    ]);
    const before = await ops(store);
    // The database refuses the second note's move (as a full disk or a broken row would).
    const run = driver.run.bind(driver);
    let writes = 0;
    jest.spyOn(driver, 'run').mockImplementation(async (sql: string, params?: readonly unknown[]) => {
      if (/^UPDATE observations SET session_id/.test(sql) && ++writes === 2) throw new Error('disk full');
      return run(sql, params as never);
    });
    await expect(store.mergeSessions(TEAM, HEAD, board.id, second.id, 'head_coach')).rejects.toThrow('disk full');
    jest.restoreAllMocks();
    expect(await ops(store)).toEqual(before);
    const list = await store.listTidySessions(TEAM);
    expect(list.find((s) => s.id === second.id)!.notes.map((n) => n.id).sort()).toEqual([...second.ids].sort());
    expect(list.find((s) => s.id === board.id)!.notes).toHaveLength(1);
  });
});

describe('a note moved away from a skater\'s device', () => {
  it('an eviction takes the row and the skater\'s own waiting "got it" along; other changes stay', async () => {
    const { store, note } = await openStore();
    await store.acknowledgeObservation(note.id, '0193a000-0000-7000-8000-00000000d0d1', 'skater');
    const coachEdit = (await store.listOutbox()).filter((o) => o.recordId === note.id && !('acknowledgedAt' in o.fields));
    expect(coachEdit.length).toBeGreaterThan(0);
    await applyPullPage(store, TEAM, { ...page([]), evictions: [{ table: 'observations', id: note.id }] });
    const left = (await store.listOutbox()).filter((o) => o.recordId === note.id);
    expect(left.some((o) => 'acknowledgedAt' in o.fields)).toBe(false);
    expect(left.map((o) => o.fields)).toEqual(coachEdit.map((o) => o.fields));
    expect((await store.listTidySessions(TEAM)).flatMap((s) => s.notes).some((n) => n.id === note.id)).toBe(false);
  });
});
