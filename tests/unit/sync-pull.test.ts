/**
 * Step 4, pull: pages until hasMore is false with progress from `remaining`; an interrupted run
 * resumes from the last applied page; a 410 re-syncs from scratch and keeps the unsent outbox.
 */
import { SyncError } from '../../sync/errors';
import { pullAll, type SyncProgress } from '../../sync/pull';
import { pushOutbox } from '../../sync/push';
import type { PullQuery, SyncTransport } from '../../sync/transport';
import { COACH, CUES, FakeSyncServer, SKATERS, TEAM, deviceObservations, newId, openDevice, seedServer } from './sync-fake-server';

function serverWithObservations(n: number, sessionId: string) {
  const server = new FakeSyncServer();
  seedServer(server);
  const ids: string[] = [];
  for (let i = 0; i < n; i += 1) {
    const id = newId();
    ids.push(id);
    server.put(TEAM, 'observations', id, { sessionId, skaterId: SKATERS[i % 3], cueId: CUES[0].id, mark: 'good', note: `n${i}`, noteShared: false, createdAt: '2026-12-02T09:00:00Z', createdBy: COACH });
  }
  return { server, ids };
}

const recording = (server: FakeSyncServer) => {
  const queries: PullQuery[] = [];
  const transport: SyncTransport = { push: server.transport.push, pull: (q) => (queries.push(q), server.transport.pull(q)) };
  return { queries, transport };
};

describe('pullAll', () => {
  it('reads pages of 1,000 until hasMore is false and reports progress', async () => {
    const { store, session } = await openDevice();
    const { server } = serverWithObservations(2500, session.id);
    const { queries, transport } = recording(server);
    const progress: SyncProgress[] = [];
    const summary = await pullAll(store, transport, TEAM, (p) => progress.push(p));
    expect(queries.map((q) => q.limit)).toEqual([1000, 1000, 1000]);
    expect(summary).toMatchObject({ pages: 3, changes: 2505 });
    expect(progress.map((p) => p.done)).toEqual([1000, 2000, 2505]);
    expect(progress.every((p) => p.total === 2505)).toBe(true);
    expect(await store.countObservations(TEAM)).toBe(2500);
    expect(await store.cursor(TEAM)).toBe(summary.cursor);
  });

  it('resumes from the last applied page after an interruption', async () => {
    const { store, session } = await openDevice();
    const { server } = serverWithObservations(2500, session.id);
    const { queries, transport } = recording(server);
    server.dropPull = () => server.pullCalls === 2;
    const error = await pullAll(store, transport, TEAM).catch((e) => e);
    expect(error).toBeInstanceOf(SyncError);
    expect(error.step).toBe('pull');
    const savedCursor = await store.cursor(TEAM);
    expect(savedCursor).toBeGreaterThan(0);
    expect(await store.countObservations(TEAM)).toBe(995); // the first page: 5 seed rows + 995

    server.dropPull = () => false;
    await pullAll(store, transport, TEAM);
    expect(queries[2].cursor).toBe(savedCursor);
    expect(await store.countObservations(TEAM)).toBe(2500);
  });

  it('a failed apply is reported as the apply step and leaves the cursor where it was', async () => {
    const { store, session, driver } = await openDevice();
    const { server } = serverWithObservations(1500, session.id);
    await driver.exec(`CREATE TRIGGER boom BEFORE INSERT ON observations WHEN NEW.note = 'n1200' BEGIN SELECT RAISE(ABORT, 'disk full'); END`);
    const error = await pullAll(store, server.transport, TEAM).catch((e) => e);
    expect(error).toMatchObject({ name: 'SyncError', step: 'apply' });
    expect(error.message).toMatch(/apply.*disk full/);
    expect(await store.countObservations(TEAM)).toBe(995);
  });

  it('410: re-syncs from scratch, drops what the server no longer has, keeps the unsent outbox', async () => {
    const { store, session, tap, driver } = await openDevice();
    const { server, ids } = serverWithObservations(30, session.id);
    // The session exists on the server too, and the device knows it.
    server.put(TEAM, 'sessions', session.id, { day: session.day, rink: '', title: '', focusCueIds: [], createdAt: session.createdAt, createdBy: COACH });
    await pullAll(store, server.transport, TEAM);
    expect(await store.countObservations(TEAM)).toBe(30);

    // Away for months: 10 records were deleted and their tombstones expired.
    for (const id of ids.slice(0, 10)) {
      server.records.delete(`observations/${id}`);
    }
    server.retainedFrom = Number.MAX_SAFE_INTEGER - 1;
    const unsent = await tap([SKATERS[2]], 'needs_work', 'written offline');
    await store.updateObservation(ids[20], COACH, { note: 'offline edit' });
    const outboxBefore = await store.listOutbox();

    const { queries, transport } = recording(server);
    const pull = transport.pull;
    transport.pull = (q) => {
      if (q.cursor === 0) server.retainedFrom = 0;
      return pull(q);
    };
    const summary = await pullAll(store, transport, TEAM);
    expect(summary.resynced).toBe(true);
    expect(queries.map((q) => q.cursor)[1]).toBe(0);

    const live = await deviceObservations(driver);
    for (const id of ids.slice(0, 10)) expect(live.has(id)).toBe(false);
    for (const id of ids.slice(10)) expect(live.has(id)).toBe(true);
    expect(live.get(unsent[0].id)).toMatchObject({ note: 'written offline' });
    expect(live.get(ids[20])).toMatchObject({ note: 'offline edit' }); // a pending edit keeps its value
    expect(await store.listOutbox()).toEqual(outboxBefore);
    expect(await store.getSession(session.id)).not.toBeNull();
    expect(await driver.all(`SELECT key FROM meta WHERE key LIKE 'resync:%'`)).toEqual([]);
  });

  it('a re-sync interrupted mid-way resumes and still sweeps at the end', async () => {
    const { store, session, driver } = await openDevice();
    const { server, ids } = serverWithObservations(2500, session.id);
    await pullAll(store, server.transport, TEAM);
    server.records.delete(`observations/${ids[0]}`);
    server.retainedFrom = Number.MAX_SAFE_INTEGER - 1;
    let calls = 0;
    const transport: SyncTransport = {
      push: server.transport.push,
      pull: async (q) => {
        calls += 1;
        if (q.cursor === 0) server.retainedFrom = 0;
        if (calls === 3) throw new Error('killed');
        return server.transport.pull(q);
      },
    };
    await expect(pullAll(store, transport, TEAM)).rejects.toMatchObject({ step: 'pull' });
    // Nothing vanished while the re-sync was half done.
    expect(await store.countObservations(TEAM)).toBe(2500);
    await pullAll(store, transport, TEAM);
    const live = await deviceObservations(driver);
    expect(live.size).toBe(2499);
    expect(live.has(ids[0])).toBe(false);
  });
});

describe('push, then pull on another device', () => {
  it('brings one device’s taps to another', async () => {
    const server = new FakeSyncServer();
    seedServer(server);
    const a = await openDevice();
    const b = await openDevice();
    await a.tap(SKATERS, 'needs_work', 'together');
    await pushOutbox(a.store, server.transport, { teamId: TEAM, clientId: a.store.clientId });
    await pullAll(b.store, server.transport, TEAM);
    expect(await deviceObservations(b.driver)).toEqual(await deviceObservations(a.driver));
  });
});
