/**
 * The device store's reads and writes for the skater's "today" page, on a skater's device: the
 * records arrive by pull (applyPullPage), the skater reads one rink day's notes with their cue
 * text and phase, picks earlier days, and acknowledges a note (row + outbox op, one transaction,
 * only once).
 */
import type { PullReply } from '../../shared/schemas/sync';
import { applyPullPage } from '../../sync/apply';
import { DeviceStore, StoreError, sessionIdFor } from '../../sync/store';
import { openMemoryDriver } from './support/sqljs-driver';

const TEAM = '0193b000-0000-7000-8000-00000000aaaa';
const COACH = '0193b000-0000-7000-8000-00000000c0c0';
const SKATER_USER = '0193b000-0000-7000-8000-00000000d0d0';
const FENNA = '0193b000-0000-7000-8000-0000000000f1';
const OTHER = '0193b000-0000-7000-8000-0000000000f2';
const CUE_CURVE = '0193b000-0000-7000-8000-0000000000c1';
const CUE_START = '0193b000-0000-7000-8000-0000000000c2';
const id = (n: number) => `0193b000-0000-7000-8000-0000000001${String(n).padStart(2, '0')}`;

const DAY1 = '2026-12-01';
const DAY2 = '2026-12-02';
const S1 = sessionIdFor(TEAM, DAY1);
const S2 = sessionIdFor(TEAM, DAY2);

const page = (changes: PullReply['changes'], tombstones: PullReply['tombstones'] = []): PullReply => ({
  changes,
  tombstones,
  evictions: [],
  nextCursor: 100,
  hasMore: false,
  remaining: 0,
  serverClock: `${String(Date.UTC(2026, 11, 2, 10)).padStart(15, '0')}-000000-server`,
  serverTime: '2026-12-02T10:00:00.000Z',
});

let seq = 0;
const session = (sid: string, day: string) => ({
  table: 'sessions' as const,
  id: sid,
  serverSeq: ++seq,
  fields: { day, rink: '', title: '', focusCueIds: [], createdAt: `${day}T08:00:00.000Z`, createdBy: COACH },
});
const observation = (oid: string, over: Record<string, unknown>) => ({
  table: 'observations' as const,
  id: oid,
  serverSeq: ++seq,
  fields: {
    sessionId: S2,
    skaterId: FENNA,
    cueId: CUE_CURVE,
    mark: 'needs_work',
    note: '',
    noteShared: false,
    createdAt: '2026-12-02T09:00:00.000Z',
    createdBy: COACH,
    acknowledgedAt: null,
    ...over,
  },
});

async function skaterDevice() {
  const driver = await openMemoryDriver();
  const store = await DeviceStore.open(driver, { now: () => Date.UTC(2026, 11, 2, 11, 30) });
  await applyPullPage(
    store,
    TEAM,
    page([
      { table: 'cues', id: CUE_CURVE, serverSeq: ++seq, fields: { phase: 'curve', label: 'Lean in from the ankle', sortOrder: 1, archived: false } },
      { table: 'cues', id: CUE_START, serverSeq: ++seq, fields: { phase: 'start', label: 'Sit lower in the set', sortOrder: 1, archived: false } },
      session(S1, DAY1),
      session(S2, DAY2),
      observation(id(1), { createdAt: '2026-12-02T09:10:00.000Z', note: 'Lower hips in lap 3', noteShared: true }),
      observation(id(2), { cueId: CUE_START, mark: 'good', createdAt: '2026-12-02T09:05:00.000Z' }),
      observation(id(3), { sessionId: S1, createdAt: '2026-12-01T09:00:00.000Z', acknowledgedAt: '2026-12-01T18:00:00.000Z' }),
      // Another skater's note (a coach's device would have it): never in Fenna's list.
      observation(id(4), { skaterId: OTHER }),
      // Deleted on the server later (tombstone below).
      observation(id(5), {}),
    ]),
  );
  await applyPullPage(store, TEAM, page([], [{ table: 'observations', id: id(5), serverSeq: ++seq }]));
  return { driver, store };
}

describe('DeviceStore for the skater', () => {
  it("lists one rink day's notes for one skater, oldest first, with cue text and phase", async () => {
    const { store } = await skaterDevice();
    const notes = await store.listForSkater(TEAM, FENNA, DAY2);
    expect(notes.map((n) => n.id)).toEqual([id(2), id(1)]);
    expect(notes[0]).toMatchObject({ cueLabel: 'Sit lower in the set', phase: 'start', mark: 'good', acknowledgedAt: null });
    expect(notes[1]).toMatchObject({
      cueLabel: 'Lean in from the ankle',
      phase: 'curve',
      mark: 'needs_work',
      note: 'Lower hips in lap 3',
      noteShared: true,
      createdAt: '2026-12-02T09:10:00.000Z',
      sessionId: S2,
    });
    expect((await store.listForSkater(TEAM, FENNA, DAY1)).map((n) => n.id)).toEqual([id(3)]);
    expect(await store.listForSkater(TEAM, FENNA, '2026-11-30')).toEqual([]);
    expect(await store.listForSkater(TEAM, OTHER, DAY1)).toEqual([]);
  });

  it('lists the days with notes, newest first, with how many are still to acknowledge', async () => {
    const { store } = await skaterDevice();
    expect(await store.daysForSkater(TEAM, FENNA, 10)).toEqual([
      { day: DAY2, count: 2, unacknowledged: 2 },
      { day: DAY1, count: 1, unacknowledged: 0 },
    ]);
    expect(await store.daysForSkater(TEAM, FENNA, 1)).toEqual([{ day: DAY2, count: 2, unacknowledged: 2 }]);
    expect(await store.daysForSkater(TEAM, '0193b000-0000-7000-8000-0000000000f9', 5)).toEqual([]);
  });

  it('acknowledges a note: the row and one outbox upsert with only acknowledgedAt, in one go, once', async () => {
    const { store, driver } = await skaterDevice();
    const at = await store.acknowledgeObservation(id(1), SKATER_USER);
    expect(at).toBe('2026-12-02T11:30:00.000Z');
    expect((await store.listForSkater(TEAM, FENNA, DAY2)).find((n) => n.id === id(1))?.acknowledgedAt).toBe(at);

    const ops = await store.listOutbox();
    expect(ops).toHaveLength(1);
    expect(ops[0]).toMatchObject({
      table: 'observations',
      recordId: id(1),
      kind: 'upsert',
      teamId: TEAM,
      userId: SKATER_USER,
      fields: { acknowledgedAt: at },
    });
    expect(Object.keys(ops[0].hlc)).toEqual(['acknowledgedAt']);
    const [row] = await driver.all<{ hlc: string }>(`SELECT hlc FROM observations WHERE id = ?`, [id(1)]);
    expect(JSON.parse(row.hlc).acknowledgedAt).toBe(ops[0].hlc.acknowledgedAt);

    // Idempotent: a second tap (or a note the server already had acknowledged) queues nothing.
    expect(await store.acknowledgeObservation(id(1), SKATER_USER)).toBe(at);
    expect(await store.acknowledgeObservation(id(3), SKATER_USER)).toBe('2026-12-01T18:00:00.000Z');
    expect(await store.listOutbox()).toHaveLength(1);
    expect(await store.daysForSkater(TEAM, FENNA, 10)).toEqual([
      { day: DAY2, count: 2, unacknowledged: 1 },
      { day: DAY1, count: 1, unacknowledged: 0 },
    ]);
  });

  it('keeps the local acknowledgement when a pull brings the older server value, until it is sent', async () => {
    const { store } = await skaterDevice();
    const at = await store.acknowledgeObservation(id(2), SKATER_USER);
    await applyPullPage(store, TEAM, page([observation(id(2), { cueId: CUE_START, mark: 'good', createdAt: '2026-12-02T09:05:00.000Z' })]));
    expect((await store.listForSkater(TEAM, FENNA, DAY2)).find((n) => n.id === id(2))?.acknowledgedAt).toBe(at);
  });

  it('refuses to acknowledge a note that is gone, and writes nothing', async () => {
    const { store } = await skaterDevice();
    await expect(store.acknowledgeObservation(id(5), SKATER_USER)).rejects.toBeInstanceOf(StoreError);
    await expect(store.acknowledgeObservation(id(99), SKATER_USER)).rejects.toThrow('That note no longer exists');
    expect(await store.listOutbox()).toHaveLength(0);
  });
});
