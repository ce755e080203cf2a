/**
 * Step 3, apply: a pulled page and its cursor are written in one transaction; fields with local
 * edits waiting keep their local values; a tombstone removes the row and its queued edits.
 */
import type { PullReply } from '../../shared/schemas/sync';
import { applyPullPage } from '../../sync/apply';
import { pushOutbox } from '../../sync/push';
import { COACH, CUES, FakeSyncServer, SKATERS, TEAM, newId, openDevice, seedServer } from './sync-fake-server';

const page = (over: Partial<PullReply>): PullReply => ({
  changes: [],
  tombstones: [],
  evictions: [],
  nextCursor: 10,
  hasMore: false,
  remaining: 0,
  serverClock: `${String(Date.UTC(2026, 11, 2, 10)).padStart(15, '0')}-000000-server`,
  serverTime: '2026-12-02T10:00:00.000Z',
  ...over,
});

describe('applyPullPage', () => {
  it('writes every table, maps fields to columns, marks rows synced and saves the cursor', async () => {
    const { store, driver, session } = await openDevice();
    const groupId = newId();
    const skaterId = newId();
    const obsId = newId();
    await applyPullPage(
      store,
      TEAM,
      page({
        changes: [
          { table: 'groups', id: groupId, serverSeq: 1, fields: { name: 'Juniors', sortOrder: 2 } },
          { table: 'skaters', id: skaterId, serverSeq: 2, fields: { displayName: 'Ada', groupId, hasAccount: true } },
          { table: 'cues', id: CUES[0].id, serverSeq: 3, fields: { phase: 'curve', label: 'Server label', sortOrder: 5, archived: true } },
          { table: 'sessions', id: session.id, serverSeq: 4, fields: { day: session.day, rink: 'Thialf', title: 'Tempo', focusCueIds: [CUES[0].id], createdAt: session.createdAt, createdBy: COACH } },
          {
            table: 'observations',
            id: obsId,
            serverSeq: 5,
            fields: { sessionId: session.id, skaterId, cueId: CUES[0].id, mark: 'good', note: 'Nice', noteShared: true, createdAt: '2026-12-02T09:10:00Z', createdBy: COACH, acknowledgedAt: '2026-12-02T09:20:00Z', futureField: 1 },
          },
        ],
        nextCursor: 5,
      }),
    );
    expect(await store.listGroups(TEAM)).toEqual([{ id: groupId, name: 'Juniors', sortOrder: 2 }]);
    expect((await store.listSkaters(TEAM)).find((s) => s.id === skaterId)).toEqual({ id: skaterId, displayName: 'Ada', groupId, hasAccount: true, retired: false });
    expect((await store.listCues(TEAM)).find((c) => c.id === CUES[0].id)).toMatchObject({ label: 'Server label', sortOrder: 5, archived: true });
    expect(await store.getSession(session.id)).toMatchObject({ rink: 'Thialf', title: 'Tempo', focusCueIds: [CUES[0].id] });
    const [obs] = await driver.all<Record<string, unknown>>(`SELECT * FROM observations WHERE id = ?`, [obsId]);
    expect(obs).toMatchObject({ note: 'Nice', note_shared: 1, acknowledged_at: '2026-12-02T09:20:00Z', synced: 1, team_id: TEAM, deleted: 0 });
    expect(await store.cursor(TEAM)).toBe(5);
    expect(store.lastClock() >= page({}).serverClock).toBe(true);
  });

  it('applies a 2,500-row page in chunks, and a failure part-way leaves nothing applied and the cursor unchanged', async () => {
    const { store, driver, session } = await openDevice();
    const changes = Array.from({ length: 2500 }, (_, i) => ({
      table: 'observations' as const,
      id: newId(),
      serverSeq: i + 1,
      fields: { sessionId: session.id, skaterId: SKATERS[i % 3], cueId: CUES[0].id, mark: 'good', note: `n${i}`, noteShared: false, createdAt: '2026-12-02T09:10:00Z', createdBy: COACH },
    }));
    await applyPullPage(store, TEAM, page({ nextCursor: 7 }));
    // The 2,200th row breaks (after two 1,000-row statements went through).
    await driver.exec(`CREATE TRIGGER boom BEFORE INSERT ON observations WHEN NEW.note = 'n2200' BEGIN SELECT RAISE(ABORT, 'disk full'); END`);
    await expect(applyPullPage(store, TEAM, page({ changes, nextCursor: 2500 }))).rejects.toThrow('disk full');
    expect(await store.countObservations(TEAM)).toBe(0);
    expect(await store.cursor(TEAM)).toBe(7);

    await driver.exec(`DROP TRIGGER boom`);
    await applyPullPage(store, TEAM, page({ changes, nextCursor: 2500 }));
    expect(await store.countObservations(TEAM)).toBe(2500);
    expect(await store.cursor(TEAM)).toBe(2500);
  });

  it('fields with local edits waiting keep their local value until the edit is acknowledged', async () => {
    const server = new FakeSyncServer();
    seedServer(server);
    const { store, tap } = await openDevice();
    const [o] = await tap([SKATERS[0]], 'needs_work', 'first');
    await pushOutbox(store, server.transport, { teamId: TEAM, clientId: store.clientId });
    await store.updateObservation(o.id, COACH, { note: 'mine, not sent yet' });

    // Meanwhile the server has another value for the note and a new mark.
    const other = { ...server.table('observations').get(o.id)!, note: 'from another device', mark: 'good' };
    const change = { table: 'observations' as const, id: o.id, serverSeq: 50, fields: other };
    await applyPullPage(store, TEAM, page({ changes: [change], nextCursor: 50 }));
    const [local] = await store.listObservations(o.sessionId);
    expect(local).toMatchObject({ note: 'mine, not sent yet', mark: 'good' }); // mark had no local edit

    // Once acknowledged, the next page's value applies again.
    await pushOutbox(store, server.transport, { teamId: TEAM, clientId: store.clientId });
    await applyPullPage(store, TEAM, page({ changes: [{ ...change, serverSeq: 60, fields: { ...other, note: 'settled' } }], nextCursor: 60 }));
    expect((await store.listObservations(o.sessionId))[0].note).toBe('settled');
  });

  it('a tombstone removes the row and its pending edits (delete wins)', async () => {
    const server = new FakeSyncServer();
    seedServer(server);
    const { store, tap, driver } = await openDevice();
    const [o, keep] = await tap([SKATERS[0], SKATERS[1]]);
    await pushOutbox(store, server.transport, { teamId: TEAM, clientId: store.clientId });
    await store.updateObservation(o.id, COACH, { note: 'edit that must not resurrect it' });
    await store.updateObservation(keep.id, COACH, { note: 'kept' });
    await applyPullPage(store, TEAM, page({ tombstones: [{ table: 'observations', id: o.id, serverSeq: 70 }], nextCursor: 70 }));
    expect(await driver.all(`SELECT id FROM observations WHERE id = ?`, [o.id])).toEqual([]);
    const left = await store.listOutbox();
    expect(left.map((e) => e.recordId)).toEqual([keep.id]);
  });

  it('an eviction removes the row but leaves the caller’s queued changes for the server to judge', async () => {
    const { store, tap, driver } = await openDevice();
    const [o] = await tap();
    await applyPullPage(store, TEAM, page({ evictions: [{ table: 'observations', id: o.id }], nextCursor: 3 }));
    expect(await driver.all(`SELECT id FROM observations WHERE id = ?`, [o.id])).toEqual([]);
    expect((await store.listOutbox()).some((e) => e.recordId === o.id)).toBe(true);
  });
});
