/**
 * One device, two people in turn (a club tablet, a family phone): the outbox, the cursor and every
 * held row belong to whoever is signed in. A coach records, a skater signs in on the same store:
 * the skater's sync never sends, counts, lists, retries or gives up the coach's changes, and the
 * device keeps none of the coach's rows; the coach comes back, pulls everything from cursor 0, sees
 * their unsent notes at once, and each of them reaches the server exactly once.
 *
 * The fake server filters pulls by role like the real one: the skater gets their own notes only,
 * with a private note's text blanked.
 */
import type { PullReply, PushBody } from '../../shared/schemas/sync';
import { synchronize } from '../../sync/engine';
import { pullAll } from '../../sync/pull';
import { DeviceStore, OwnerChanged, StoreError, metaKeys } from '../../sync/store';
import { ServerUnavailable, type SyncTransport } from '../../sync/transport';
import { openMemoryDriver } from './support/sqljs-driver';
import { CUES, FakeSyncServer, SKATERS, TEAM, seedServer } from './sync-fake-server';

const COACH = '0193a000-0000-7000-8000-00000000c0c1';
/** The skater account of SKATERS[0]. */
const SKATER_USER = '0193a000-0000-7000-8000-00000000d0d0';
const PRIVATE_TEXT = 'Left knee drops in the curve: check with the physio';
const HELD = ['observations', 'sessions', 'cues', 'skaters', 'groups', 'sync_shadow'];

type Driver = Awaited<ReturnType<typeof openMemoryDriver>>;

/** A transport speaking for one user: pulls filtered by role, every push body recorded. */
/** Op ids the fake server answered `applied` for (each must appear once). */
const applied: string[] = [];

function transportFor(server: FakeSyncServer, user: string, pushes: PushBody[], pulledFrom: number[] = []): SyncTransport {
  const skater = user === SKATER_USER;
  return {
    time: async () => new Date(server.time).toISOString(),
    push: async (body) => {
      pushes.push(body);
      const reply = await server.transport.push(body);
      for (const r of reply.results) if (r.status === 'applied') applied.push(r.opId);
      return reply;
    },
    pull: async (query): Promise<PullReply> => {
      pulledFrom.push(query.cursor);
      const page = await server.transport.pull(query);
      if (!skater) return page;
      return {
        ...page,
        changes: page.changes
          .filter((c) => c.table !== 'observations' || c.fields.skaterId === SKATERS[0])
          .map((c) => (c.table === 'observations' && !c.fields.noteShared ? { ...c, fields: { ...c.fields, note: '' } } : c)),
      };
    },
  };
}

const outboxRows = (driver: Driver) =>
  driver.all<{ op_id: string; user_id: string; status: string; fields: string; hlc: string; attempts: number }>(
    `SELECT op_id, user_id, status, fields, hlc, attempts FROM outbox ORDER BY seq`,
  );

async function heldCounts(driver: Driver): Promise<Record<string, number>> {
  const counts: Record<string, number> = {};
  for (const table of HELD) counts[table] = (await driver.all<{ n: number }>(`SELECT count(*) AS n FROM ${table}`))[0].n;
  return counts;
}

/** Every text column of every held table, as one string: what a curious next user could read. */
async function everythingHeld(driver: Driver): Promise<string> {
  const parts: string[] = [];
  for (const table of HELD) parts.push(JSON.stringify(await driver.all(`SELECT * FROM ${table}`)));
  return parts.join('\n');
}

async function setup() {
  const server = new FakeSyncServer();
  seedServer(server);
  const driver = await openMemoryDriver();
  const store = await DeviceStore.open(driver, { now: () => server.time });
  const pushes: Record<string, PushBody[]> = { [COACH]: [], [SKATER_USER]: [] };
  const pulledFrom: Record<string, number[]> = { [COACH]: [], [SKATER_USER]: [] };
  const sync = (user: string) =>
    synchronize({ store, transport: transportFor(server, user, pushes[user], pulledFrom[user]), teamId: TEAM, userId: user });
  const tap = async (skater: string, cue: number, note = '', noteShared = false) => {
    const session = await store.startSession(TEAM, COACH);
    const [o] = await store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [skater], cueId: CUES[cue].id, mark: 'needs_work', note, noteShared });
    return o;
  };
  return { server, driver, store, pushes, pulledFrom, sync, tap };
}

describe('a device shared by a coach and a skater in turn', () => {
  it("the skater's sign-in and sync never send, count, list, retry or give up the coach's changes", async () => {
    const { server, driver, store, pushes, sync, tap } = await setup();
    await store.switchUser(COACH);
    await tap(SKATERS[0], 0, 'Shared: arms low', true);
    const refused = await tap(SKATERS[1], 1);
    server.judge = (op) => (op.recordId === refused.id ? 'permission' : null);
    await sync(COACH);
    expect(await store.rejectedCount(TEAM)).toBe(1);
    // Recorded offline afterwards: waiting, not sent.
    await tap(SKATERS[0], 0, PRIVATE_TEXT);
    await tap(SKATERS[1], 1);
    expect(await store.pendingCount(TEAM)).toBe(2);
    const coachOutbox = await outboxRows(driver);
    const [rejected] = await store.listRejected(TEAM);

    await store.switchUser(SKATER_USER);
    expect(await store.pendingCount(TEAM)).toBe(0);
    expect(await store.pendingCount()).toBe(0);
    expect(await store.rejectedCount(TEAM)).toBe(0);
    expect(await store.listRejected(TEAM)).toEqual([]);
    expect(await store.listOutbox()).toEqual([]);
    expect(await store.pendingByTable()).toEqual({ observations: 0, sessions: 0, cues: 0, runs: 0, crossings: 0, targets: 0 });
    await expect(store.retryRejected(rejected.opId)).rejects.toBeInstanceOf(StoreError);
    await expect(store.discardRejected(rejected.opId)).rejects.toBeInstanceOf(StoreError);

    await sync(SKATER_USER);
    const coachOps = new Set(coachOutbox.map((o) => o.op_id));
    expect(pushes[SKATER_USER].flatMap((b) => b.ops).filter((op) => coachOps.has(op.opId))).toEqual([]);
    // The skater acknowledges a note: only that change goes out under the skater.
    const [note] = await driver.all<{ id: string }>(`SELECT id FROM observations WHERE deleted = 0`);
    await store.acknowledgeObservation(note.id, SKATER_USER);
    expect(await store.pendingCount(TEAM)).toBe(1);
    await sync(SKATER_USER);
    expect(pushes[SKATER_USER].flatMap((b) => b.ops).map((op) => op.fields)).toEqual([{ acknowledgedAt: expect.any(String) }]);
    expect(await store.pendingCount(TEAM)).toBe(0);

    // The coach's entries are all still there, untouched (same ops, same status, same clocks).
    expect((await outboxRows(driver)).filter((o) => o.user_id === COACH)).toEqual(coachOutbox);
  });

  it("keeps none of the coach's rows once the skater signs in, and none of the private text after the skater's sync", async () => {
    const { driver, store, sync, tap } = await setup();
    await store.switchUser(COACH);
    const first = await tap(SKATERS[0], 0, 'Not for the skater yet');
    await tap(SKATERS[1], 1, 'Other skater');
    await sync(COACH);
    // Offline: the coach rewrites the private note and adds one; both wait, parked, for the coach.
    await store.updateObservation(first.id, COACH, { note: PRIVATE_TEXT });
    await tap(SKATERS[0], 1, `${PRIVATE_TEXT} (unsent)`);
    expect((await heldCounts(driver)).observations).toBe(3);

    expect(await store.switchUser(SKATER_USER)).toBe(true);
    expect(await heldCounts(driver)).toEqual({ observations: 0, sessions: 0, cues: 0, skaters: 0, groups: 0, sync_shadow: 0 });
    const keys = await driver.all<{ key: string }>(`SELECT key FROM meta WHERE key LIKE 'cursor:%' OR key LIKE 'last_sync_at:%'`);
    expect(keys).toEqual([]);

    await sync(SKATER_USER);
    const held = await driver.all<{ skater_id: string; note: string }>(`SELECT skater_id, note FROM observations`);
    expect(held).toHaveLength(1);
    expect(held).toEqual([{ skater_id: SKATERS[0], note: '' }]);
    expect(await everythingHeld(driver)).not.toMatch(/physio|Other skater|Not for the skater/);
    // A second open for the same person changes nothing.
    expect(await store.switchUser(SKATER_USER)).toBe(false);
    expect((await heldCounts(driver)).observations).toBe(1);
  });

  it('gives the coach everything again, from cursor 0, after a skater used the device', async () => {
    const { server, driver, store, pulledFrom, sync, tap } = await setup();
    await store.switchUser(COACH);
    await tap(SKATERS[0], 0, PRIVATE_TEXT);
    await tap(SKATERS[1], 1);
    await tap(SKATERS[2], 0);
    await sync(COACH);
    const onServer = server.table('observations').size;
    expect(onServer).toBe(3);

    await store.switchUser(SKATER_USER);
    await sync(SKATER_USER);
    expect(await store.cursor(TEAM)).toBeGreaterThan(0);

    await store.switchUser(COACH);
    expect(await store.cursor(TEAM)).toBe(0);
    pulledFrom[COACH].length = 0;
    await sync(COACH);
    expect(pulledFrom[COACH][0]).toBe(0);
    const held = await driver.all<{ id: string; note: string }>(`SELECT id, note FROM observations WHERE deleted = 0`);
    expect(held).toHaveLength(3);
    expect(held.map((o) => o.note)).toContain(PRIVATE_TEXT);
    expect((await store.listSkaters(TEAM)).length).toBe(3);
    expect(await store.lastSyncAt(TEAM)).not.toBeNull();
    // The cursor is kept per (team, user).
    expect(await store.getMeta(metaKeys.cursor(TEAM, COACH))).not.toBeNull();
    expect(await store.getMeta(metaKeys.cursor(TEAM))).toBeNull();
  });

  it("shows the coach's unsent notes, edits and deletes again after the switch, and sends each once", async () => {
    const { server, driver, store, pushes, sync, tap } = await setup();
    await store.switchUser(COACH);
    const kept = await tap(SKATERS[0], 0, 'First version');
    const gone = await tap(SKATERS[1], 0);
    await sync(COACH);
    // Offline now: three new notes, an edit of a synced note, a delete of another.
    const fresh = [await tap(SKATERS[0], 1, PRIVATE_TEXT), await tap(SKATERS[1], 1), await tap(SKATERS[2], 0, 'Shared', true)];
    await store.updateObservation(kept.id, COACH, { note: 'Second version', mark: 'good' });
    await store.removeObservations([gone.id], COACH);
    const waiting = (await store.listOutbox()).map((o) => o.opId);
    expect(waiting).toHaveLength(5);

    await store.switchUser(SKATER_USER);
    await sync(SKATER_USER);
    await store.switchUser(COACH);

    // Before any sync: the new notes are back on the coach's board, with their text.
    const session = await store.startSession(TEAM, COACH);
    const board = await store.listObservations(session.id);
    expect(board.map((o) => o.id).sort()).toEqual(fresh.map((o) => o.id).sort());
    expect(board.find((o) => o.id === fresh[0].id)!.note).toBe(PRIVATE_TEXT);
    expect(await store.pendingCount(TEAM)).toBe(5);

    // A pull alone (no push yet): the edited note arrives with the coach's local values, the
    // deleted one stays hidden, and the server's values wait in the shadow.
    await pullAll(store, transportFor(server, COACH, []), TEAM);
    const after = new Map((await store.listObservations(session.id)).map((o) => [o.id, o]));
    expect(after.get(kept.id)).toMatchObject({ note: 'Second version', mark: 'good' });
    expect(after.has(gone.id)).toBe(false);
    expect(after.size).toBe(4);

    // Now the coach syncs: each waiting op reaches the server exactly once.
    applied.length = 0;
    await sync(COACH);
    await sync(COACH);
    const sent = pushes[COACH].flatMap((b) => b.ops.map((op) => op.opId)).filter((id) => waiting.includes(id));
    expect(sent.sort()).toEqual([...waiting].sort());
    expect([...applied].sort()).toEqual([...waiting].sort());
    expect(await store.pendingCount()).toBe(0);
    const observations = server.table('observations');
    expect(observations.size).toBe(4);
    expect(observations.get(kept.id)).toMatchObject({ note: 'Second version', mark: 'good' });
    expect(observations.get(fresh[0].id)).toMatchObject({ note: PRIVATE_TEXT });
    expect(observations.has(gone.id)).toBe(false);
    expect((await store.listObservations(session.id)).map((o) => o.id).sort()).toEqual([...observations.keys()].sort());
    expect(await driver.all(`SELECT * FROM sync_shadow`)).toEqual([]);
  });

  it("signing out leaves no rows, parks the user's changes, and refuses writes until someone signs in", async () => {
    const { driver, store, sync, tap } = await setup();
    await store.switchUser(COACH);
    await tap(SKATERS[0], 0, PRIVATE_TEXT);
    await sync(COACH);
    await tap(SKATERS[1], 0, 'Unsent');
    const before = await outboxRows(driver);
    expect(before).toHaveLength(1);

    await store.signOut();
    expect(await heldCounts(driver)).toEqual({ observations: 0, sessions: 0, cues: 0, skaters: 0, groups: 0, sync_shadow: 0 });
    expect(await outboxRows(driver)).toEqual(before);
    expect(await store.pendingCount()).toBe(0);
    expect(store.user).toBeNull();
    await expect(store.startSession(TEAM, COACH)).rejects.toBeInstanceOf(StoreError);

    // Reopening the file (a reload) keeps the sign-out.
    const reopened = await DeviceStore.open(driver);
    expect(reopened.user).toBeNull();
    expect(await reopened.pendingCount()).toBe(0);
  });

  it("stops a sync whose user signed out meanwhile, before it writes the next page", async () => {
    const { server, driver, store, tap } = await setup();
    await store.switchUser(COACH);
    await tap(SKATERS[0], 0, PRIVATE_TEXT);
    let release!: () => void;
    const gate = new Promise<void>((resolve) => (release = resolve));
    const base = transportFor(server, COACH, []);
    const slow: SyncTransport = { ...base, pull: async (q) => { await gate; return base.pull(q); } };
    const run = synchronize({ store, transport: slow, teamId: TEAM, userId: COACH });
    await new Promise((resolve) => setTimeout(resolve, 20));
    await store.switchUser(SKATER_USER);
    release();
    const error = await run.catch((e) => e);
    expect(error).toMatchObject({ step: 'apply' });
    expect(error.cause).toBeInstanceOf(OwnerChanged);
    expect(await heldCounts(driver)).toEqual({ observations: 0, sessions: 0, cues: 0, skaters: 0, groups: 0, sync_shadow: 0 });
    expect(await store.cursor(TEAM, COACH)).toBe(0);
  });

  it("refuses a run for a user the store is not open for", async () => {
    const { server, store, tap } = await setup();
    await store.switchUser(COACH);
    await tap(SKATERS[0], 0);
    await expect(synchronize({ store, transport: transportFor(server, SKATER_USER, []), teamId: TEAM, userId: SKATER_USER })).rejects.toMatchObject({
      step: 'push',
    });
    expect(server.pushCalls).toBe(0);
  });

  it("corrects the clocks of another user's parked changes too (the error is the device's)", async () => {
    const server = new FakeSyncServer();
    seedServer(server);
    const year = 365 * 24 * 3600 * 1000;
    const driver = await openMemoryDriver();
    const store = await DeviceStore.open(driver, { now: () => server.time + year });
    await store.switchUser(COACH);
    const session = await store.startSession(TEAM, COACH);
    await store.recordObservations({ teamId: TEAM, userId: COACH, sessionId: session.id, skaterIds: [SKATERS[0]], cueId: CUES[0].id, mark: 'good' });
    await store.switchUser(SKATER_USER);
    await synchronize({ store, transport: transportFor(server, SKATER_USER, []), teamId: TEAM, userId: SKATER_USER });
    await store.switchUser(COACH);
    const pushes: PushBody[] = [];
    await synchronize({ store, transport: transportFor(server, COACH, pushes), teamId: TEAM, userId: COACH });
    const walls = pushes
      .flatMap((b) => b.ops)
      .filter((op) => op.table === 'observations')
      .map((op) => Number(op.hlc.mark.split('-')[0]));
    expect(walls).toHaveLength(1);
    expect(Math.abs(walls[0] - server.time)).toBeLessThan(60_000);
  });
});

describe('a failed push does not stop the pull', () => {
  it('still receives while the server refuses the batch, then reports the push error; the ops go once later', async () => {
    const { server, driver, store, sync, tap } = await setup();
    await store.switchUser(COACH);
    const note = await tap(SKATERS[0], 0);
    server.put(TEAM, 'observations', '0193a000-0000-7000-8000-0000000e0e01', {
      sessionId: 'elsewhere', skaterId: SKATERS[1], cueId: CUES[0].id, mark: 'good', note: 'From the other coach', noteShared: true,
      createdAt: '2026-12-02T08:00:00.000Z', createdBy: 'other',
    });
    const push = server.transport.push;
    server.transport.push = async () => {
      throw new ServerUnavailable();
    };
    const error = await sync(COACH).catch((e) => e);
    expect(error).toMatchObject({ step: 'push' });
    expect((await driver.all(`SELECT id FROM observations WHERE note = 'From the other coach'`)).length).toBe(1);
    expect(await store.pendingCount(TEAM)).toBe(2);
    server.transport.push = push;
    await sync(COACH);
    expect(server.appliedOps).toHaveLength(2);
    expect(server.table('observations').has(note.id)).toBe(true);
  });
});
