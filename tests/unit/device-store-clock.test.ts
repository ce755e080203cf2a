/**
 * The clock on the device (sync/tables/runs.ts, sync/tables/targets.ts, sync/skater-queries.ts
 * over sql.js, synced with the fake server of sync-fake-server.ts): a heat's runs, each tap a
 * crossing written at once (row + outbox entry, one small transaction), undo before sync leaving
 * no trace, edits and finishing, runs left running listed for resume, targets with derived ids,
 * the skater's runs of a day, and a sign-out that takes every clock row off the device.
 */
import { v7 as uuidv7 } from 'uuid';
import { targetIdFor, type RunDraft } from '../../shared/schemas/clock';
import { synchronize } from '../../sync/engine';
import type { SqlDriver, SqlValue } from '../../sync/driver';
import { DeviceStore, StoreError } from '../../sync/store';
import { COACH, FakeSyncServer, SKATERS, TEAM, seedServer } from './sync-fake-server';
import { openMemoryDriver } from './support/sqljs-driver';

const NOW = Date.UTC(2026, 11, 2, 9, 0, 0);
const OTHER_COACH = '0193a000-0000-7000-8000-00000000c0c9';
const STARTED_AT = new Date(NOW - 60_000).toISOString();

/** A driver that counts the statements it runs (to show a crossing costs one small transaction). */
function counting(driver: SqlDriver) {
  const log: string[] = [];
  const wrapped: SqlDriver = {
    exec: (sql) => (log.push(sql.trim().split(/\s+/)[0]), driver.exec(sql)),
    run: (sql, params) => (log.push(sql.trim().split(/\s+/)[0]), driver.run(sql, params)),
    all: (sql, params) => (log.push(sql.trim().split(/\s+/)[0]), driver.all(sql, params)),
    close: () => driver.close(),
  };
  return { driver: wrapped, log };
}

async function openStore(userId: string = COACH) {
  const raw = await openMemoryDriver();
  const { driver, log } = counting(raw);
  const store = await DeviceStore.open(driver, { now: () => NOW });
  await store.switchUser(userId);
  await store.loadTeam(TEAM, {
    groups: [],
    skaters: SKATERS.map((id, i) => ({ id, displayName: `Skater ${i}`, groupId: null, hasAccount: false, retired: false })),
    cues: [],
  });
  return { store, driver: raw, log };
}

const pair = (distanceM = 1500, extra: Partial<RunDraft> = {}): RunDraft[] => [
  { id: uuidv7(), skaterId: SKATERS[0], distanceM, track: 'long', lane: 'inner', ...extra },
  { id: uuidv7(), skaterId: SKATERS[1], distanceM, track: 'long', lane: 'outer', ...extra },
];

async function startPair(store: DeviceStore, userId = COACH, distanceM = 1500) {
  return store.startHeat({ teamId: TEAM, userId, authorName: 'Anouk Brink', heatId: uuidv7(), startedAt: STARTED_AT, runs: pair(distanceM) });
}

const rows = (driver: SqlDriver, sql: string, params: SqlValue[] = []) => driver.all<Record<string, SqlValue>>(sql, params);

describe('a heat on the device', () => {
  it('starts with a run per lane (rows and outbox entries in one go), listed on its day and as open runs', async () => {
    const { store } = await openStore();
    const runs = await startPair(store);
    expect(runs.map((r) => [r.lane, r.status, r.day, r.createdBy, r.authorName])).toEqual([
      ['inner', 'running', '2026-12-02', COACH, 'Anouk Brink'],
      ['outer', 'running', '2026-12-02', COACH, 'Anouk Brink'],
    ]);
    expect(runs[0].heatId).toBe(runs[1].heatId);
    const outbox = await store.listOutbox();
    expect(outbox.map((e) => [e.table, e.recordId, e.kind])).toEqual(runs.map((r) => ['runs', r.id, 'upsert']));
    // A create carries every field the server needs, each with a clock value.
    expect(Object.keys(outbox[0].fields).sort()).toEqual(Object.keys(outbox[0].hlc).sort());
    expect(outbox[0].fields).toMatchObject({ heatId: runs[0].heatId, skaterId: SKATERS[0], distanceM: 1500, track: 'long', startedAt: STARTED_AT, status: 'running', createdBy: COACH });
    const day = await store.listRunsOnDay(TEAM, '2026-12-02');
    expect(day.map((r) => r.id).sort()).toEqual(runs.map((r) => r.id).sort());
    expect(day.every((r) => r.crossings.length === 0)).toBe(true);
    expect((await store.listOpenRuns(TEAM, COACH)).length).toBe(2);
    expect(await store.listRunsOnDay(TEAM, '2026-12-01')).toEqual([]);
  });

  it('takes the skater’s target as a snapshot when the lane names none', async () => {
    const { store } = await openStore();
    await store.setTarget({ teamId: TEAM, userId: COACH, skaterId: SKATERS[0], track: 'long', distanceM: 1500, targetMs: 118_000, plan: 'even' });
    const [inner, outer] = await startPair(store);
    expect(inner.targetMs).toBe(118_000);
    expect(outer.targetMs).toBeNull();
    // Changing the target later leaves the run as it was timed.
    await store.setTarget({ teamId: TEAM, userId: COACH, skaterId: SKATERS[0], track: 'long', distanceM: 1500, targetMs: 116_000, plan: 'even' });
    expect((await store.getRun(inner.id))!.targetMs).toBe(118_000);
  });

  it.each([
    ['a distance long track cannot lay out', { runs: pair(450) }, /multiple of 100 m on long track/],
    ['a skater in two lanes', { runs: [pair()[0], { ...pair()[0], id: uuidv7(), lane: 'outer' as const }] }, /one lane only/],
    ['no lanes', { runs: [] }, /at least one skater/],
    ['a start offset over 5 s', { runs: pair(1500, { startOffsetMs: 5001 }) }, /startOffsetMs must be at most 5000/],
  ])('refuses %s and writes nothing', async (_what, change, message) => {
    const { store } = await openStore();
    await expect(store.startHeat({ teamId: TEAM, userId: COACH, heatId: uuidv7(), startedAt: STARTED_AT, ...change })).rejects.toThrow(message);
    expect(await store.listOutbox()).toEqual([]);
    expect(await store.listRunsOnDay(TEAM, '2026-12-02')).toEqual([]);
  });

  it('a phone whose clock runs 10 minutes fast stores the start in the server’s time (and says what now is in that time)', async () => {
    const driver = await openMemoryDriver();
    const fast = NOW + 600_000;
    const store = await DeviceStore.open(driver, { now: () => fast });
    await store.switchUser(COACH);
    expect(await store.correctClock(async () => new Date(NOW).toISOString())).toBe(-600_000);
    expect(store.correctedNow()).toBe(NOW);
    // The screen reads the start tap on the phone's own clock.
    const [run] = await store.startHeat({ teamId: TEAM, userId: COACH, heatId: uuidv7(), startedAt: new Date(fast - 60_000).toISOString(), runs: pair().slice(0, 1) });
    expect(run.startedAt).toBe(new Date(NOW - 60_000).toISOString());
    const [op] = await store.listOutbox();
    expect(op.fields.startedAt).toBe(run.startedAt);
    // Elapsed since the start, as a resumed clock rebuilds it: one minute.
    expect(store.correctedNow() - Date.parse(run.startedAt)).toBe(60_000);
  });

  it('free laps (0 m) and short-track half-lap distances are timed', async () => {
    const { store } = await openStore();
    const free = await store.startHeat({ teamId: TEAM, userId: COACH, heatId: uuidv7(), startedAt: STARTED_AT, runs: [{ skaterId: SKATERS[0], distanceM: 0, track: 'long', lane: 'group' }] });
    const short = await store.startHeat({ teamId: TEAM, userId: COACH, heatId: uuidv7(), startedAt: STARTED_AT, runs: [{ skaterId: SKATERS[1], distanceM: 777, track: 'short', lane: 'inner' }] });
    expect([free[0].distanceM, short[0].distanceM]).toEqual([0, 777]);
  });
});

describe('crossings', () => {
  it('each tap is one small transaction: the run looked up, the row and its outbox entry inserted, committed', async () => {
    const { store, log } = await openStore();
    const [inner] = await startPair(store);
    log.length = 0;
    const crossing = await store.recordCrossing({ runId: inner.id, userId: COACH, atMs: 25_310 });
    // BEGIN, the run, the crossing, the outbox entry, the device clock, COMMIT.
    expect(log).toEqual(['BEGIN', 'SELECT', 'INSERT', 'INSERT', 'INSERT', 'COMMIT']);
    expect(crossing).toMatchObject({ runId: inner.id, atMs: 25_310, handTimed: false, teamId: TEAM });
    const [entry] = (await store.listOutbox()).filter((e) => e.table === 'crossings');
    expect(entry).toMatchObject({ recordId: crossing.id, kind: 'upsert', fields: { runId: inner.id, atMs: 25_310, handTimed: false } });
  });

  it('come back sorted by time with their run, whatever order they were written in', async () => {
    const { store } = await openStore();
    const [inner, outer] = await startPair(store);
    for (const atMs of [25_310, 54_020, 82_900]) await store.recordCrossing({ runId: inner.id, userId: COACH, atMs });
    await store.recordCrossing({ runId: outer.id, userId: COACH, atMs: 25_610 });
    await store.recordCrossing({ runId: inner.id, userId: COACH, atMs: 10_000, handTimed: true });
    const run = (await store.getRun(inner.id))!;
    expect(run.crossings.map((c) => [c.atMs, c.handTimed])).toEqual([
      [10_000, true],
      [25_310, false],
      [54_020, false],
      [82_900, false],
    ]);
    expect((await store.getRun(outer.id))!.crossings.map((c) => c.atMs)).toEqual([25_610]);
  });

  it.each([[-1], [86_400_001], [1.5], [Number.NaN]])('refuses atMs %p with a reason and writes nothing', async (atMs) => {
    const { store } = await openStore();
    const [inner] = await startPair(store);
    const before = (await store.listOutbox()).length;
    await expect(store.recordCrossing({ runId: inner.id, userId: COACH, atMs })).rejects.toThrow(StoreError);
    await expect(store.recordCrossing({ runId: inner.id, userId: COACH, atMs })).rejects.toThrow(/atMs/);
    expect((await store.listOutbox()).length).toBe(before);
    expect((await store.getRun(inner.id))!.crossings).toEqual([]);
  });

  it('belong to the coach who timed the run: another coach is refused, the head coach may', async () => {
    const { store, driver } = await openStore();
    const [inner] = await startPair(store);
    const c = await store.recordCrossing({ runId: inner.id, userId: COACH, atMs: 25_310 });
    await expect(store.updateCrossing(c.id, OTHER_COACH, { atMs: 25_300 }, 'coach')).rejects.toThrow(/Only the coach who timed this run or the head coach/);
    await expect(store.removeCrossings([c.id], OTHER_COACH, 'coach')).rejects.toThrow(StoreError);
    await expect(store.recordCrossing({ runId: inner.id, userId: OTHER_COACH, atMs: 54_000, role: 'coach' })).rejects.toThrow(StoreError);
    await expect(store.finishRun(inner.id, OTHER_COACH, { status: 'finished' }, 'coach')).rejects.toThrow(StoreError);
    expect((await store.getRun(inner.id))!.crossings.map((x) => x.atMs)).toEqual([25_310]);
    // The head coach's device holds the coach's run (pulled): the head coach may fix it.
    const head = await openStore(OTHER_COACH);
    const [row] = await rows(driver, `SELECT * FROM runs WHERE id = ?`, [inner.id]);
    const columns = Object.keys(row);
    await head.driver.run(`INSERT INTO runs (${columns.join(', ')}) VALUES (${columns.map(() => '?').join(', ')})`, columns.map((k) => row[k]));
    const added = await head.store.recordCrossing({ runId: inner.id, userId: OTHER_COACH, atMs: 54_000, role: 'head_coach' });
    expect((await head.store.updateCrossing(added.id, OTHER_COACH, { handTimed: true }, 'head_coach')).handTimed).toBe(true);
    expect((await head.store.finishRun(inner.id, OTHER_COACH, { status: 'stopped', stopReason: 'Fell' }, 'head_coach')).status).toBe('stopped');
  });

  it('undo before any sync removes the row and its outbox entries: nothing of it reaches the server', async () => {
    const server = new FakeSyncServer();
    seedServer(server);
    const { store, driver } = await openStore();
    const [inner] = await startPair(store);
    const kept = await store.recordCrossing({ runId: inner.id, userId: COACH, atMs: 25_310 });
    const undone = await store.recordCrossing({ runId: inner.id, userId: COACH, atMs: 26_000 });
    await store.updateCrossing(undone.id, COACH, { handTimed: true });
    await store.removeCrossings([undone.id], COACH);
    expect((await store.listOutbox()).filter((e) => e.recordId === undone.id)).toEqual([]);
    expect(await rows(driver, `SELECT id FROM crossings WHERE id = ?`, [undone.id])).toEqual([]);
    await synchronize({ store, transport: server.transport, teamId: TEAM });
    expect([...server.table('crossings').keys()]).toEqual([kept.id]);
    expect(server.tombstones.has(`crossings/${undone.id}`)).toBe(false);
  });

  it('after a sync, a delete hides the row and queues a delete; the server’s tombstone takes the row away', async () => {
    const server = new FakeSyncServer();
    seedServer(server);
    const { store, driver } = await openStore();
    const [inner] = await startPair(store);
    const c = await store.recordCrossing({ runId: inner.id, userId: COACH, atMs: 25_310 });
    await synchronize({ store, transport: server.transport, teamId: TEAM });
    await store.removeCrossings([c.id], COACH);
    expect(await rows(driver, `SELECT deleted FROM crossings WHERE id = ?`, [c.id])).toEqual([{ deleted: 1 }]);
    expect((await store.getRun(inner.id))!.crossings).toEqual([]);
    expect((await store.listOutbox()).map((e) => [e.table, e.kind])).toEqual([['crossings', 'delete']]);
    await synchronize({ store, transport: server.transport, teamId: TEAM });
    expect(server.tombstones.has(`crossings/${c.id}`)).toBe(true);
    expect(await rows(driver, `SELECT id FROM crossings WHERE id = ?`, [c.id])).toEqual([]);
  });

  it('an edit queues only what changed, with the value it replaces kept for a refused edit', async () => {
    const server = new FakeSyncServer();
    seedServer(server);
    const { store } = await openStore();
    const [inner] = await startPair(store);
    const c = await store.recordCrossing({ runId: inner.id, userId: COACH, atMs: 25_310 });
    await synchronize({ store, transport: server.transport, teamId: TEAM });
    const same = await store.updateCrossing(c.id, COACH, { atMs: 25_310 });
    expect(same.atMs).toBe(25_310);
    expect(await store.listOutbox()).toEqual([]);
    await store.updateCrossing(c.id, COACH, { atMs: 25_290, handTimed: true });
    const [edit] = await store.listOutbox();
    expect(edit).toMatchObject({ table: 'crossings', kind: 'upsert', fields: { atMs: 25_290, handTimed: true } });
    server.judge = () => 'validation';
    await synchronize({ store, transport: server.transport, teamId: TEAM });
    const [refused] = await store.listRejected();
    await store.discardRejected(refused.opId);
    expect((await store.getRun(inner.id))!.crossings).toEqual([{ id: c.id, atMs: 25_310, handTimed: false }]);
  });
});

describe('finishing and resuming', () => {
  it('finished and stopped runs leave the open runs; a stopped run keeps its reason and its times', async () => {
    const { store } = await openStore();
    const [inner, outer] = await startPair(store);
    await store.recordCrossing({ runId: outer.id, userId: COACH, atMs: 25_610 });
    await store.finishRun(inner.id, COACH, { status: 'finished', stopReason: 'ignored for a finish' });
    expect((await store.listOpenRuns(TEAM, COACH)).map((r) => r.id)).toEqual([outer.id]);
    const stopped = await store.finishRun(outer.id, COACH, { status: 'stopped', stopReason: 'Fell in the second curve' });
    expect(stopped).toMatchObject({ status: 'stopped', stopReason: 'Fell in the second curve' });
    expect((await store.getRun(inner.id))!.stopReason).toBe('');
    expect(await store.listOpenRuns(TEAM, COACH)).toEqual([]);
    expect((await store.getRun(outer.id))!.crossings.map((c) => c.atMs)).toEqual([25_610]);
    await expect(store.finishRun(outer.id, COACH, { status: 'stopped', stopReason: 'x'.repeat(81) })).rejects.toThrow(/at most 80/);
  });

  it('open runs survive a restart of the app (a reload mid-race): same database, every crossing there', async () => {
    const { store, driver } = await openStore();
    const [inner] = await startPair(store);
    await store.recordCrossing({ runId: inner.id, userId: COACH, atMs: 25_310 });
    const again = await DeviceStore.open(driver, { now: () => NOW });
    await again.switchUser(COACH);
    const open = await again.listOpenRuns(TEAM, COACH);
    expect(open.map((r) => r.id).sort()).toEqual((await store.listOpenRuns(TEAM)).map((r) => r.id).sort());
    expect(open.find((r) => r.id === inner.id)!.crossings.map((c) => c.atMs)).toEqual([25_310]);
    // Another coach's open runs on this device are not offered to resume.
    expect(await again.listOpenRuns(TEAM, OTHER_COACH)).toEqual([]);
  });

  it('an edit of a run checks the distance against the track; nothing changes when refused', async () => {
    const { store } = await openStore();
    const [inner] = await startPair(store);
    await expect(store.updateRun(inner.id, COACH, { distanceM: 777 })).rejects.toThrow(/multiple of 100 m on long track/);
    const run = await store.updateRun(inner.id, COACH, { distanceM: 777, track: 'short', note: 'Short track after all' });
    expect(run).toMatchObject({ distanceM: 777, track: 'short', note: 'Short track after all' });
  });

  it('a false start deleted before sync takes its crossings along and leaves no outbox entry', async () => {
    const { store } = await openStore();
    const [inner, outer] = await startPair(store);
    await store.recordCrossing({ runId: inner.id, userId: COACH, atMs: 25_310 });
    await store.removeRun(inner.id, COACH);
    expect((await store.listOutbox()).map((e) => e.recordId)).toEqual([outer.id]);
    expect((await store.listRunsOnDay(TEAM, '2026-12-02')).map((r) => r.id)).toEqual([outer.id]);
  });
});

describe('targets', () => {
  it('have the id every device derives, and setting one again edits only what changed (the plan travels whole)', async () => {
    const server = new FakeSyncServer();
    seedServer(server);
    const { store } = await openStore();
    const target = await store.setTarget({ teamId: TEAM, userId: COACH, skaterId: SKATERS[0], track: 'long', distanceM: 1500, targetMs: 118_000, plan: 'even', openerMs: 26_000 });
    expect(target.id).toBe(targetIdFor(TEAM, SKATERS[0], 'long', 1500));
    expect(target).toMatchObject({ plan: 'even', openerMs: 26_000, sharesPct: null, note: '', updatedBy: COACH });
    await synchronize({ store, transport: server.transport, teamId: TEAM });
    expect(server.table('targets').get(target.id)).toMatchObject({ targetMs: 118_000, openerMs: 26_000, sharesPct: null });
    // Another coach's device pulls it and changes the plan only.
    const other = await openStore(OTHER_COACH);
    await synchronize({ store: other.store, transport: server.transport, teamId: TEAM });
    const shares = [22.1, 24.6, 26.2, 27.1];
    const changed = await other.store.setTarget({ teamId: TEAM, userId: OTHER_COACH, skaterId: SKATERS[0], track: 'long', distanceM: 1500, targetMs: 118_000, plan: 'shares', sharesPct: shares });
    expect(changed).toMatchObject({ id: target.id, plan: 'shares', openerMs: null, sharesPct: shares, updatedBy: OTHER_COACH });
    const [edit] = await other.store.listOutbox();
    expect(Object.keys(edit.fields).sort()).toEqual(['openerMs', 'plan', 'sharesPct', 'updatedBy']);
    await synchronize({ store: other.store, transport: server.transport, teamId: TEAM });
    await synchronize({ store, transport: server.transport, teamId: TEAM });
    expect(await store.listTargets(TEAM)).toEqual([{ ...changed, teamId: TEAM }]);
  });

  it.each([
    ['shares of the wrong length for the distance', { plan: 'shares' as const, sharesPct: [50, 50] }, /one share per section: 4 for 1500 m/],
    ['shares summing to 99', { plan: 'shares' as const, sharesPct: [24, 25, 25, 25] }, /sum to 100/],
    ['an even plan with shares', { plan: 'even' as const, sharesPct: [25, 25, 25, 25] }, /even plan has no sharesPct/],
    ['an opener as long as the target', { plan: 'even' as const, openerMs: 118_000 }, /openerMs .* must be less than targetMs/],
  ])('refuses %s and writes nothing', async (_what, plan, message) => {
    const { store } = await openStore();
    await expect(
      store.setTarget({ teamId: TEAM, userId: COACH, skaterId: SKATERS[0], track: 'long', distanceM: 1500, targetMs: 118_000, ...plan }),
    ).rejects.toThrow(message);
    expect(await store.listOutbox()).toEqual([]);
  });

  it('a skater or guardian cannot set one', async () => {
    const { store } = await openStore();
    for (const role of ['skater', 'guardian'] as const) {
      await expect(store.setTarget({ teamId: TEAM, userId: COACH, role, skaterId: SKATERS[0], track: 'long', distanceM: 500, targetMs: 40_000, plan: 'even' })).rejects.toThrow(
        /Only a coach/,
      );
    }
  });
});

describe("the skater's runs of a day", () => {
  it('lists only that skater’s runs of that day, in the order they were timed, with crossings', async () => {
    let now = NOW;
    const driver = await openMemoryDriver();
    const store = await DeviceStore.open(driver, { now: () => now });
    await store.switchUser(COACH);
    const first = await store.startHeat({ teamId: TEAM, userId: COACH, heatId: uuidv7(), startedAt: new Date(NOW - 600_000).toISOString(), runs: pair(500) });
    now += 1000;
    const second = await store.startHeat({ teamId: TEAM, userId: COACH, heatId: uuidv7(), startedAt: new Date(NOW - 60_000).toISOString(), runs: pair(1000) });
    await store.startHeat({ teamId: TEAM, userId: COACH, heatId: uuidv7(), startedAt: STARTED_AT, day: '2026-12-01', runs: pair(3000) });
    await store.recordCrossing({ runId: second[0].id, userId: COACH, atMs: 40_000 });
    await store.recordCrossing({ runId: second[0].id, userId: COACH, atMs: 19_000 });
    const mine = await store.runsForSkater(TEAM, SKATERS[0], '2026-12-02');
    expect(mine.map((r) => [r.id, r.distanceM])).toEqual([
      [first[0].id, 500],
      [second[0].id, 1000],
    ]);
    expect(mine[1].crossings.map((c) => c.atMs)).toEqual([19_000, 40_000]);
    expect(await store.runsForSkater(TEAM, SKATERS[2], '2026-12-02')).toEqual([]);
  });
});

describe('the device changing hands', () => {
  it('a sign-out takes every run, crossing and target off the device; the coach’s unsent ones come back with them', async () => {
    const { store, driver } = await openStore();
    const [inner] = await startPair(store);
    const c = await store.recordCrossing({ runId: inner.id, userId: COACH, atMs: 25_310 });
    await store.setTarget({ teamId: TEAM, userId: COACH, skaterId: SKATERS[0], track: 'long', distanceM: 500, targetMs: 40_000, plan: 'even' });
    // A run pulled from another coach, held for this user only.
    await driver.run(
      `INSERT INTO runs (id, team_id, heat_id, skater_id, day, distance_m, track, lane, started_at, status, created_by, created_at, synced)
       VALUES (?, ?, ?, ?, '2026-12-02', 500, 'long', 'inner', ?, 'finished', ?, ?, 1)`,
      [uuidv7(), TEAM, uuidv7(), SKATERS[2], STARTED_AT, OTHER_COACH, STARTED_AT],
    );
    await store.signOut();
    for (const table of ['runs', 'crossings', 'targets']) expect(await rows(driver, `SELECT id FROM ${table}`)).toEqual([]);
    // The next person sees none of it; the outbox waits, parked, for its owner.
    await store.switchUser(OTHER_COACH);
    expect(await store.listRunsOnDay(TEAM, '2026-12-02')).toEqual([]);
    expect(await store.listTargets(TEAM)).toEqual([]);
    expect(await store.pendingCount()).toBe(0);
    // Back to the coach: their own runs, crossing and target are written back from the outbox.
    await store.switchUser(COACH);
    const runs = await store.listRunsOnDay(TEAM, '2026-12-02');
    expect(runs.map((r) => r.id).sort()).toEqual((await store.listOpenRuns(TEAM, COACH)).map((r) => r.id).sort());
    expect(runs.find((r) => r.id === inner.id)!.crossings.map((x) => x.id)).toEqual([c.id]);
    expect((await store.listTargets(TEAM)).map((t) => t.targetMs)).toEqual([40_000]);
  });
});
