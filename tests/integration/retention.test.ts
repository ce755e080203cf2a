/**
 * Retention on a schedule (server/services/sync/retention.ts) against the real PostgreSQL, driven
 * by a fake clock and fake timers: the pass at start purges tombstones older than the 180-day
 * horizon and counts them, a later pass trims op_log below its own (longer) horizon, each pass's
 * figures are logged and returned, and a real device (DeviceStore on sql.js, the real engine)
 * whose cursor is older than the horizon gets 410, re-syncs, and keeps its unsent outbox: its
 * pending taps are pushed afterwards and nothing is lost.
 *
 * The passes are limited to this file's teams (`teamIds`): other test files share the database
 * and must not see their tombstones purged under them.
 */
import type { DataSource } from 'typeorm';
import { TOMBSTONE_RETENTION_DAYS, type PushBody } from '../../shared/schemas/sync';
import { parseEnv } from '../../server/env';
import {
  DEFAULT_OP_LOG_RETENTION_DAYS,
  runRetention,
  scheduleRetention,
  type RetentionFigures,
  type RetentionSchedule,
  type ScheduleLog,
  type ScheduleTimers,
} from '../../server/services/sync/retention';
import type { SyncResult } from '../../sync/engine';
import { startTestServer, type TestServer } from './helpers';
import { device, makeTeam, newObservation, pushOk, remove, type SyncTeam } from './sync-helpers';
import { deviceState, diffTable, listen, openDevice, serverState, type Endpoint, type SimDevice } from './support/device-client';

const DAY = 86_400_000;
const HOUR = 3_600_000;
const INTERVAL = 6 * HOUR;

/** A clock and timers that move only when the test says so. */
class FakeClock implements ScheduleTimers {
  private timers: { id: number; at: number; run: () => void }[] = [];
  private ids = 0;
  readonly delays: number[] = [];
  constructor(public now: number) {}

  setTimeout(run: () => void, ms: number): unknown {
    const id = ++this.ids;
    this.delays.push(ms);
    this.timers.push({ id, at: this.now + ms, run });
    return id;
  }

  clearTimeout(handle: unknown): void {
    this.timers = this.timers.filter((t) => t.id !== handle);
  }

  get pending() {
    return this.timers.map((t) => t.at);
  }

  /** Moves the clock to `at` and fires the timers due by then (a machine that slept fires once). */
  async advanceTo(at: number, schedule: RetentionSchedule) {
    this.now = at;
    const due = this.timers.filter((t) => t.at <= at);
    this.timers = this.timers.filter((t) => t.at > at);
    for (const t of due) t.run();
    await schedule.idle();
  }
}

/** Captures what the schedule logs. */
function captureLog() {
  const info: { fields: { retention?: RetentionFigures }; message: string }[] = [];
  const error: { fields: object; message: string }[] = [];
  const log: ScheduleLog = {
    info: (fields, message) => info.push({ fields, message }),
    error: (fields, message) => error.push({ fields, message }),
  };
  return { log, info, error };
}

let server: TestServer;
let endpoint: Endpoint;
let team: SyncTeam;
let other: SyncTeam;

beforeAll(async () => {
  server = await startTestServer();
  endpoint = await listen(server.app);
  team = await makeTeam(server.app, 'retention', { people: false });
  other = await makeTeam(server.app, 'retentionother', { people: false });
});
afterAll(async () => {
  await endpoint.close();
  await server.close();
});

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

async function tap(dev: SimDevice, note: string) {
  const cues = await dev.store.listCues(team.teamId);
  const [obs] = await dev.store.recordObservations({
    teamId: team.teamId,
    userId: dev.userId,
    sessionId: team.sessionId,
    skaterIds: [team.skaterA.id],
    cueId: cues[0].id,
    mark: 'needs_work',
    note,
  });
  return obs;
}

const deletedAt = async (teamId: string, id: string): Promise<number> => {
  const [row] = await server.dataSource.query(`SELECT deleted_at FROM observations WHERE team_id = $1 AND id = $2`, [teamId, id]);
  return (row.deleted_at as Date).getTime();
};

const rowOf = async (id: string) =>
  ((await server.dataSource.query(`SELECT id, deleted_at FROM observations WHERE team_id = $1 AND id = $2`, [team.teamId, id])) as {
    id: string;
    deleted_at: Date | null;
  }[])[0];

const opLogCount = async (teamIds: string[], before?: Date): Promise<number> =>
  Number(
    (
      await server.dataSource.query(
        `SELECT count(*) AS n FROM op_log WHERE team_id = ANY($1::uuid[]) AND ($2::timestamptz IS NULL OR created_at < $2)`,
        [teamIds, before ?? null],
      )
    )[0].n,
  );

describe('retention on a schedule', () => {
  it('purges old tombstones and trims op_log on a fake clock, logs the figures, and an away device re-syncs keeping its outbox', async () => {
    const teams = [team.teamId, other.teamId];

    // Two devices of the same team have loaded it; the one that will be away has seen two notes.
    const away = await openDevice(endpoint, team.head, { label: 'away', teamId: team.teamId });
    const desk = await openDevice(endpoint, team.head, { label: 'desk', teamId: team.teamId });
    await desk.sync();
    const old = await tap(desk, 'deleted long ago');
    const young = await tap(desk, 'deleted later');
    desk.transport.record = true;
    await desk.sync();
    desk.transport.record = false;
    const oldCreate = desk.transport.calls
      .filter((c) => c.kind === 'push' && c.status === 200)
      .flatMap((c) => (c.sent as PushBody).ops)
      .find((op) => op.recordId === old.id)!;
    expect(oldCreate).toMatchObject({ kind: 'upsert', table: 'observations' });
    await away.sync();
    expect((await deviceState(away.driver, team.teamId)).observations.has(old.id)).toBe(true);

    // The other team deletes a note first; then the desk deletes `old`, and a little later `young`.
    const otherDev = device(other.head);
    const otherObs = newObservation(other, otherDev);
    await pushOk(server.app, otherDev, other.teamId, [otherObs]);
    await pushOk(server.app, otherDev, other.teamId, [remove(otherDev, 'observations', otherObs.recordId)]);
    await desk.store.removeObservations([old.id], desk.userId);
    await desk.sync();
    const oldDeleted = await deletedAt(team.teamId, old.id);
    await sleep(20);
    await desk.store.removeObservations([young.id], desk.userId);
    await desk.sync();
    expect(await deletedAt(team.teamId, young.id)).toBeGreaterThan(oldDeleted);
    expect(await deletedAt(other.teamId, otherObs.recordId)).toBeLessThanOrEqual(oldDeleted);

    // The server starts 180 days (+1 ms) after `old` was deleted: the pass at start purges `old`
    // and the other team's tombstone, keeps `young`, and trims no op_log row (all younger than 210 days).
    const clock = new FakeClock(oldDeleted + TOMBSTONE_RETENTION_DAYS * DAY + 1);
    const { log, info, error } = captureLog();
    const figures: RetentionFigures[] = [];
    const opLogBefore = await opLogCount(teams);
    const schedule = scheduleRetention(server.dataSource, {
      intervalMs: INTERVAL,
      log,
      now: () => clock.now,
      timers: clock,
      teamIds: teams,
      onPass: (f) => figures.push(f),
    });
    try {
      await schedule.idle();
      expect(figures).toHaveLength(1);
      expect(figures[0]).toMatchObject({
        at: new Date(clock.now).toISOString(),
        tombstoneCutoff: new Date(oldDeleted + 1).toISOString(),
        teams: 2,
        tombstonesPurged: 2,
        teamsPurged: 2,
        opLogTrimmed: 0,
      });
      expect(info).toHaveLength(1);
      expect(info[0].fields.retention).toEqual(figures[0]);
      expect(info[0].message).toBe('retention: purged 2 tombstones (2 of 2 teams), trimmed 0 op-log rows');
      expect(error).toEqual([]);
      expect(await rowOf(old.id)).toBeUndefined();
      expect((await rowOf(young.id))?.deleted_at).toBeInstanceOf(Date);
      expect(await opLogCount(teams)).toBe(opLogBefore);
      // The next pass is due one interval later.
      expect(clock.pending).toEqual([clock.now + INTERVAL]);

      // The away device taps offline (its first try to send is lost), then comes back; the coach
      // taps once more while that sync runs, between its push and its pull.
      const offline = [await tap(away, 'offline one'), await tap(away, 'offline two')];
      away.transport.policy = ({ kind }) => (kind === 'push' ? { dropRequest: true } : {});
      await expect(away.sync()).rejects.toMatchObject({ step: 'push' });
      away.transport.policy = () => ({});
      away.transport.record = true;
      let during: Awaited<ReturnType<typeof tap>> | undefined;
      const pull = away.transport.pull.bind(away.transport);
      away.transport.pull = async (q) => {
        during ??= await tap(away, 'tapped during the sync');
        return pull(q);
      };
      const result: SyncResult = await away.sync();
      away.transport.pull = pull;

      // Its cursor was older than the horizon: 410, then a full re-sync from 0 ...
      const pulls = away.transport.calls.filter((c) => c.kind === 'pull');
      expect(pulls[0].status).toBe(410);
      expect(pulls.slice(1).every((c) => c.status === 200)).toBe(true);
      expect((pulls[1].sent as { cursor: number }).cursor).toBe(0);
      expect(result.pull.resynced).toBe(true);
      expect(result.push).toMatchObject({ sent: 2, acknowledged: 2, rejected: 0 });
      // ... that kept the tap made meanwhile, unsent, in the outbox and on the board ...
      expect(await away.store.pendingCount(team.teamId)).toBe(1);
      const mid = await deviceState(away.driver, team.teamId);
      expect(mid.observations.has(during!.id)).toBe(true);
      // ... and dropped the notes deleted meanwhile (one purged, one still a tombstone).
      expect(mid.observations.has(old.id)).toBe(false);
      expect(mid.observations.has(young.id)).toBe(false);

      // The next sync sends it; device and server then hold the same notes, all three taps included.
      const last = await away.sync();
      expect(last.push).toMatchObject({ sent: 1, acknowledged: 1, rejected: 0 });
      expect(await away.store.pendingCount(team.teamId)).toBe(0);
      await desk.sync();
      const truth = await serverState(endpoint, team.head.session.accessToken, team.teamId);
      for (const dev of [away, desk]) {
        const state = await deviceState(dev.driver, team.teamId);
        expect(diffTable(`${dev.label} observations`, truth.observations, state.observations)).toEqual([]);
      }
      for (const obs of [...offline, during!]) expect(truth.observations.get(obs.id)).toMatchObject({ note: obs.note });
      expect(truth.observations.has(old.id)).toBe(false);
      expect(truth.observations.has(young.id)).toBe(false);

      // 210 days after the last push, the next pass trims every op_log row recorded before it and
      // keeps that push's row; `young` is past the horizon by then too.
      const lastPush = away.transport.calls.filter((c) => c.kind === 'push' && c.status === 200).at(-1)!;
      const lastOpId = (lastPush.sent as PushBody).ops[0].opId;
      const [{ created_at: lastRecorded }] = await server.dataSource.query(
        `SELECT created_at FROM op_log WHERE team_id = $1 AND op_id = $2`,
        [team.teamId, lastOpId],
      );
      const cutoff = new Date(Math.floor((lastRecorded as Date).getTime()));
      const expectTrimmed = await opLogCount(teams, cutoff);
      expect(expectTrimmed).toBeGreaterThan(5);
      const keptBefore = (await opLogCount(teams)) - expectTrimmed;
      await clock.advanceTo(cutoff.getTime() + DEFAULT_OP_LOG_RETENTION_DAYS * DAY, schedule);
      expect(figures).toHaveLength(2);
      expect(figures[1]).toMatchObject({ opLogCutoff: cutoff.toISOString(), tombstonesPurged: 1, teamsPurged: 1, opLogTrimmed: expectTrimmed });
      expect(info[1].fields.retention).toEqual(figures[1]);
      expect(info[1].message).toBe(`retention: purged 1 tombstones (1 of 2 teams), trimmed ${expectTrimmed} op-log rows`);
      expect(await opLogCount(teams, cutoff)).toBe(0);
      expect(await opLogCount(teams)).toBe(keptBefore);
      expect(await rowOf(young.id)).toBeUndefined();
      expect(clock.pending).toEqual([clock.now + INTERVAL]);

      // A retry whose op id is still in op_log is a duplicate; retries of trimmed ids of live
      // records merge by their clocks and change nothing.
      const again = await away.transport.push(lastPush.sent as PushBody);
      expect(again.results.map((r) => r.status)).toEqual(['duplicate']);
      const firstPush = away.transport.calls.find((c) => c.kind === 'push' && c.status === 200)!;
      const replay = await away.transport.push(firstPush.sent as PushBody);
      expect(replay.results.map((r) => r.status)).toEqual(['applied', 'applied']);
      const after = await serverState(endpoint, team.head.session.accessToken, team.teamId);
      expect(diffTable('observations after replay', truth.observations, after.observations)).toEqual([]);

      // A device that never heard back about a create and stays away longer than every retention
      // sends it again: its op id is gone from op_log and the record's tombstone is purged, but
      // the id is remembered as deleted, so the record does not come back.
      expect(await opLogCount([other.teamId])).toBe(0);
      const late = await pushOk(server.app, otherDev, other.teamId, [otherObs]);
      expect(late.results).toEqual([expect.objectContaining({ status: 'applied', message: expect.stringMatching(/deleted/) })]);
      expect(await server.dataSource.query(`SELECT id FROM observations WHERE team_id = $1 AND id = $2`, [other.teamId, otherObs.recordId])).toEqual([]);
      const otherTruth = await serverState(endpoint, other.head.session.accessToken, other.teamId);
      expect(otherTruth.observations.has(otherObs.recordId)).toBe(false);
      // The same for the desk's own create of `old` (deleted and purged first, its op id trimmed).
      const replayOld = await desk.transport.push({ clientId: desk.store.clientId, teamId: team.teamId, ops: [oldCreate] });
      expect(replayOld.results.map((r) => r.status)).toEqual(['applied']);
      expect(await rowOf(old.id)).toBeUndefined();
      expect(error).toEqual([]);
    } finally {
      await schedule.stop();
    }
    // Stopped: no timer left, and moving the clock runs nothing.
    expect(clock.pending).toEqual([]);
    await clock.advanceTo(clock.now + 30 * DAY, schedule);
    expect(figures).toHaveLength(2);
    expect(clock.delays).toEqual([INTERVAL, INTERVAL]);
  });

  it('a pass that fails is logged as an error and the next one still runs', async () => {
    const clock = new FakeClock(Date.now());
    const { log, info, error } = captureLog();
    let down = true;
    const flaky = {
      query: (...args: Parameters<DataSource['query']>) => (down ? Promise.reject(new Error('database unreachable')) : server.dataSource.query(...args)),
    } as unknown as DataSource;
    const schedule = scheduleRetention(flaky, { intervalMs: HOUR, log, now: () => clock.now, timers: clock, teamIds: [] });
    try {
      await schedule.idle();
      expect(error).toHaveLength(1);
      expect(error[0].message).toMatch(/retention pass failed/);
      expect(clock.pending).toEqual([clock.now + HOUR]);
      down = false;
      await clock.advanceTo(clock.now + HOUR, schedule);
      expect(info).toHaveLength(1);
      expect(info[0].fields.retention).toMatchObject({ teams: 0, tombstonesPurged: 0, opLogTrimmed: 0 });
    } finally {
      await schedule.stop();
    }
  });

  it('op_log is never kept shorter than tombstones', async () => {
    await expect(runRetention(server.dataSource, Date.now(), { opLogRetentionDays: TOMBSTONE_RETENTION_DAYS - 1, teamIds: [] })).rejects.toThrow(
      /at least as long as tombstones/,
    );
    const base = { DATABASE_URL: 'postgres://a:b@127.0.0.1:5432/c', JWT_SECRET: 'k'.repeat(32) };
    expect(parseEnv(base)).toMatchObject({ RETENTION_INTERVAL_HOURS: 6, OP_LOG_RETENTION_DAYS: TOMBSTONE_RETENTION_DAYS + 30 });
    expect(() => parseEnv({ ...base, OP_LOG_RETENTION_DAYS: String(TOMBSTONE_RETENTION_DAYS - 1) })).toThrow(/OP_LOG_RETENTION_DAYS/);
    expect(() => parseEnv({ ...base, RETENTION_INTERVAL_HOURS: '0' })).toThrow(/RETENTION_INTERVAL_HOURS/);
    expect(() => parseEnv({ ...base, RETENTION_INTERVAL_HOURS: 'often' })).toThrow(/RETENTION_INTERVAL_HOURS/);
  });
});
