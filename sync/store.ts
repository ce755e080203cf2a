/**
 * The device store: everything the board needs, on the device, with or without a network.
 *
 * Every change writes the row and its outbox entry in one transaction (shared/SYNC.md, "On the
 * device"): ids are UUID v7 made here, and each changed field carries a hybrid-logical-clock value
 * so that the server can settle edit conflicts per field. Components never talk to SQLite: they
 * call these methods (through the react-query hooks in store/).
 *
 * This class is the facade: it owns the connection's serial queue, the device clock, and whose
 * rows the device holds (open, switchUser, signOut, meta and cursors), and hands a small context
 * to the modules that do the work: sync/outbox.ts, sync/clock-correction.ts, one module per table
 * in sync/tables/ (the clock's runs and crossings in runs.ts, targets in targets.ts), and
 * sync/skater-queries.ts.
 */
import { v7 as uuidv7 } from 'uuid';
import type { Phase } from '../shared/cues';
import { HybridClock } from '../shared/hlc';
import type { BoardSession, BoardSessionPatch, Cue, Group, Observation, ObservationPatch, Role, Skater } from '../shared/schemas';
import type { Crossing, CrossingPatch, Run, RunPatch, RunWithCrossings, Target, TargetInput } from '../shared/schemas/clock';
import { correctClock } from './clock-correction';
import { SerialQueue, transaction, type SqlDriver } from './driver';
import * as outbox from './outbox';
import { migrateDevice } from './schema';
import * as skaterQueries from './skater-queries';
import { StoreError, type OwnerFilter, type StoreContext, type SyncedTable } from './store-context';
import * as cues from './tables/cues';
import * as observations from './tables/observations';
import * as runs from './tables/runs';
import * as sessions from './tables/sessions';
import * as tidy from './tables/tidy';
import * as squad from './tables/squad';
import * as targets from './tables/targets';

export { StoreError, type OwnerFilter, type SyncedTable } from './store-context';
export { toOutboxEntry, type OutboxEntry } from './outbox';
export { localDay, sessionIdFor } from './tables/sessions';
export type { NoteFix, TidySession } from './tables/tidy';
export type { RecordInput } from './tables/observations';
export type { CrossingInput, StartHeatInput } from './tables/runs';
export type { SkaterDay, SkaterNote } from './skater-queries';

/**
 * What the sync modules (sync/push.ts, sync/apply.ts, sync/pull.ts) need from the store. Not for
 * screens: they go through the store's methods.
 */
export interface SyncInternals {
  readonly db: SqlDriver;
  /**
   * One device transaction on the store's write queue; the device clock is saved with it. It
   * refuses to run (OwnerChanged) once another person opened the store since these internals were
   * taken: a run started for one user never writes into the next user's rows or outbox.
   */
  transaction<T>(work: () => Promise<T>): Promise<T>;
  /** Folds a clock value seen from the server into the device clock (saved by the transaction). */
  receiveClock(remote: string): void;
  /** The user this run works for (undefined: a store never scoped to a user). */
  readonly owner: string | undefined;
  /** `AND user_id = ?` (and its parameter) for that user; empty when unscoped. */
  readonly mine: OwnerFilter;
  /** The meta keys of this team's sync for that user. */
  keys(teamId: string): SyncKeys;
}

export interface SyncKeys {
  cursor: string;
  lastSyncAt: string;
  resync: string;
}

/** A sync step noticed that another person opened the device store since it started. */
export class OwnerChanged extends Error {
  constructor() {
    super('Someone else signed in on this device meanwhile; this sync stopped without touching their data.');
    this.name = 'OwnerChanged';
  }
}

/**
 * Meta keys the sync keeps per team and user (the user part is left out only by a store that was
 * never scoped to a user: tools and tests that never sign in).
 */
const scoped = (prefix: string, teamId: string, userId?: string) => (userId === undefined ? `${prefix}:${teamId}` : `${prefix}:${teamId}:${userId}`);
export const metaKeys = {
  cursor: (teamId: string, userId?: string) => scoped('cursor', teamId, userId),
  lastSyncAt: (teamId: string, userId?: string) => scoped('last_sync_at', teamId, userId),
  /** Set while a full re-sync runs: rows not confirmed by it are swept when it completes. */
  resync: (teamId: string, userId?: string) => scoped('resync', teamId, userId),
};
/** Prefixes of every per-team sync key: all of them go when the device changes hands. */
const SYNC_META_PREFIXES = ['cursor:', 'last_sync_at:', 'resync:'];

/** Meta key naming the user whose rows the device holds ('' = nobody; absent = never scoped). */
const ROWS_OWNER_KEY = 'rows_owner';

/** Tables holding rows pulled for (or made by) the user the device belongs to right now. */
const HELD_TABLES = ['observations', 'sessions', 'cues', 'skaters', 'groups', 'runs', 'crossings', 'targets', 'sync_shadow'] as const;

export interface StoreOptions {
  /** Physical clock in ms (tests pin it). */
  now?: () => number;
}

export class DeviceStore {
  // Named `queue` on purpose: the board benchmark (bench/board.ts) reaches it from the page.
  private readonly queue = new SerialQueue();
  private clock!: HybridClock;
  private deviceId!: string;
  /** The device's own clock, as it reads. */
  private readonly physical: () => number;
  /** Sessions already queued or synced, so a tap need not check again (cleared by every sync). */
  private readonly sessionsQueued = new Set<string>();
  /** Server time minus device time, learned from the server (0 until then; kept in meta). */
  private offset = 0;
  /** Device time corrected by what the server said: used for clocks, timestamps and the day. */
  private readonly now: () => number;
  /**
   * The user the held rows and the working outbox belong to (meta `rows_owner`): a user id, ''
   * when nobody is signed in, undefined for a store never scoped (tools and tests that never sign
   * in, which see the whole device). The app scopes the store before any screen reads it.
   */
  private owner: string | undefined;
  /** What the modules get (built once the device id and clock are known). */
  private ctx!: StoreContext;

  private constructor(
    private readonly db: SqlDriver,
    options: StoreOptions,
  ) {
    this.physical = options.now ?? Date.now;
    this.now = () => this.physical() + this.offset;
  }

  /** Opens the store: migrates the schema and restores the device id and clock. */
  static async open(db: SqlDriver, options: StoreOptions = {}): Promise<DeviceStore> {
    const store = new DeviceStore(db, options);
    await migrateDevice(db);
    const meta = await db.all<{ key: string; value: string }>(
      `SELECT key, value FROM meta WHERE key IN ('device_id', 'hlc', 'clock_offset', '${ROWS_OWNER_KEY}')`,
    );
    const get = (key: string) => meta.find((m) => m.key === key)?.value;
    store.owner = get(ROWS_OWNER_KEY);
    store.offset = Number(get('clock_offset') ?? 0) || 0;
    store.deviceId = get('device_id') ?? uuidv7();
    if (!get('device_id')) await db.run(`INSERT INTO meta (key, value) VALUES ('device_id', ?)`, [store.deviceId]);
    store.clock = new HybridClock(store.deviceId, store.now, get('hlc'));
    store.ctx = store.context();
    return store;
  }

  private context(): StoreContext {
    const { db, clock, now } = this;
    return {
      db,
      tx: (work) => this.tx(work),
      now,
      tick: () => clock.now(),
      fromDeviceClock: (ms) => ms + this.offset,
      deviceId: this.deviceId,
      mine: () => this.mine(),
      assertWriter: (userId) => this.assertWriter(userId),
      enqueue: (op) => {
        this.assertWriter(op.userId);
        return outbox.writeEntry(db, op, new Date(now()).toISOString());
      },
      sessionsQueued: this.sessionsQueued,
    };
  }

  /**
   * Now, on the device's clock corrected by the server's (what the store stamps instants with).
   * A run's startedAt is in this time: elapsed time since it is correctedNow() - startedAt.
   */
  correctedNow(): number {
    return this.now();
  }

  get device(): string {
    return this.deviceId;
  }

  /** The id this device pushes under (the device id: one per database, kept in meta). */
  get clientId(): string {
    return this.deviceId;
  }

  /**
   * Corrects this device's clock by the server's (asked just before a push), and the changes
   * still waiting to be sent with it (sync/clock-correction.ts). Resolves to the offset in force.
   */
  correctClock(askServer: () => Promise<string>): Promise<number> {
    return correctClock(
      {
        db: this.db,
        tx: (work) => this.tx(work),
        deviceId: this.deviceId,
        physical: this.physical,
        offset: () => this.offset,
        moveClock: (offset, delta) => {
          this.offset = offset;
          this.clock.rebase(delta);
        },
      },
      askServer,
    );
  }

  /**
   * For the sync modules only (see SyncInternals). `forUser` is the user the run works for
   * (left out: whoever the store is open for now); once someone else opens the store, the
   * internals' transactions refuse to run.
   */
  syncInternals(...bound: [forUser: string | undefined] | []): SyncInternals {
    // An explicit `undefined` binds to an unscoped store (so no default parameter here).
    const forUser = bound.length > 0 ? bound[0] : this.owner;
    // Sync may drop or re-create session rows and outbox entries: check sessions afresh.
    this.sessionsQueued.clear();
    return {
      db: this.db,
      transaction: (work) =>
        this.tx(async () => {
          if (this.owner !== forUser) throw new OwnerChanged();
          return work();
        }),
      receiveClock: (remote) => {
        this.clock.receive(remote);
      },
      owner: forUser,
      mine: outbox.ownerFilter(forUser),
      keys: (teamId) => ({
        cursor: metaKeys.cursor(teamId, forUser),
        lastSyncAt: metaKeys.lastSyncAt(teamId, forUser),
        resync: metaKeys.resync(teamId, forUser),
      }),
    };
  }

  /** The user the store is open for (null when nobody is signed in or it was never scoped). */
  get user(): string | null {
    return this.owner ? this.owner : null;
  }

  /** The outbox condition for the user the store is open for. */
  private mine(): OwnerFilter {
    return outbox.ownerFilter(this.owner);
  }

  /**
   * Opens the store for the user who signs in (or for nobody, on sign-out: `null`). The device
   * holds one person's rows at a time (one database file is all the browser allows): when the
   * user changes, in ONE transaction, every held row of every synced table, the shadow, and every
   * cursor and last-sync key go; the outbox stays whole (each entry names its user, and waits,
   * parked, for that user to come back); then the new user's own waiting creates and edits are
   * written back into the tables so their board shows them before the first pull. Their next sync
   * pulls from cursor 0. Opening the store again for the same user changes nothing.
   * Resolves to true when the held rows were wiped.
   */
  async switchUser(userId: string | null): Promise<boolean> {
    const next = userId ?? '';
    const before = this.owner;
    const storedOwner = async () =>
      (await this.db.all<{ value: string }>(`SELECT value FROM meta WHERE key = ?`, [ROWS_OWNER_KEY]))[0]?.value;
    // The common case (the same person again: every app start) writes nothing.
    const same = await this.queue.run(async () => {
      if ((await storedOwner()) !== next) return false;
      this.owner = next;
      this.sessionsQueued.clear();
      return true;
    });
    if (same) return false;
    try {
      return await this.tx(async () => {
        this.sessionsQueued.clear();
        if ((await storedOwner()) === next) {
          this.owner = next;
          return false;
        }
        // One batch (one round trip to the browser's database worker). Values are literals:
        // table names and prefixes are constants, the owner is quoted.
        const quote = (text: string) => `'${text.replace(/'/g, "''")}'`;
        await this.db.exec(
          [
            ...HELD_TABLES.map((table) => `DELETE FROM ${table};`),
            `DELETE FROM meta WHERE ${SYNC_META_PREFIXES.map((prefix) => `key LIKE ${quote(`${prefix}%`)}`).join(' OR ')};`,
            `INSERT INTO meta (key, value) VALUES (${quote(ROWS_OWNER_KEY)}, ${quote(next)}) ON CONFLICT (key) DO UPDATE SET value = excluded.value;`,
          ].join('\n'),
        );
        if (next) await outbox.replayOwnOutbox(this.db, next);
        this.owner = next;
        return true;
      });
    } catch (error) {
      this.owner = before;
      throw error;
    }
  }

  /** Sign-out on this device: the held rows go, the user's unsent changes stay (parked). */
  signOut(): Promise<boolean> {
    return this.switchUser(null);
  }

  async getMeta(key: string): Promise<string | null> {
    const [row] = await this.db.all<{ value: string }>(`SELECT value FROM meta WHERE key = ?`, [key]);
    return row?.value ?? null;
  }

  /** The team's pull cursor for the user the store is open for (0 before their first pull). */
  async cursor(teamId: string, userId: string | undefined = this.owner): Promise<number> {
    return Number((await this.getMeta(metaKeys.cursor(teamId, userId))) ?? 0);
  }

  /** Server time of the team's last successful sync run for this user, or null if none yet. */
  lastSyncAt(teamId: string): Promise<string | null> {
    return this.getMeta(metaKeys.lastSyncAt(teamId, this.owner));
  }

  /** The last HLC value this device issued (persisted with every change). */
  lastClock(): string {
    return this.clock.current();
  }

  close() {
    return this.queue.run(() => this.db.close());
  }

  private tx<T>(work: () => Promise<T>): Promise<T> {
    return transaction(this.db, this.queue, async () => {
      const result = await work();
      // The clock survives restarts so it never goes back, even if the device clock does.
      await this.db.run(`INSERT INTO meta (key, value) VALUES ('hlc', ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value`, [
        this.clock.current(),
      ]);
      return result;
    });
  }

  /** Changes are made by the user the store is open for, or by nobody. */
  private assertWriter(userId: string) {
    if (this.owner !== undefined && userId !== this.owner) {
      throw new StoreError('This device is open for someone else now: sign in again to record.');
    }
  }

  // ---- observations (the board's taps, the skater's "got it") -------------------------------

  /** One tap on a cue chip: an observation for every selected skater, in one transaction. */
  recordObservations(input: observations.RecordInput): Promise<Observation[]> {
    return observations.recordObservations(this.ctx, input);
  }

  /** A coach changes their own notes, the head coach any (`role`; without it, only the author). */
  updateObservation(id: string, userId: string, patch: ObservationPatch, role?: Role): Promise<Observation> {
    return observations.updateObservation(this.ctx, id, userId, patch, role);
  }

  /** Undo, or delete from the feed: gone without a trace if it never left the device. */
  removeObservations(ids: readonly string[], userId: string, role?: Role): Promise<void> {
    return observations.removeObservations(this.ctx, ids, userId, role);
  }

  /** The skater says "got it", once; a guardian (`role`) cannot. Resolves to the acknowledgement time. */
  acknowledgeObservation(id: string, userId: string, role?: Role): Promise<string> {
    return observations.acknowledgeObservation(this.ctx, id, userId, role);
  }

  /** The session's notes, newest first (tombstones excluded). */
  listObservations(sessionId: string): Promise<Observation[]> {
    return observations.listObservations(this.ctx, sessionId);
  }

  countObservations(teamId: string): Promise<number> {
    return observations.countObservations(this.ctx, teamId);
  }

  // ---- tidy-up (the evening review) -------------------------------------------------------------

  /** The team's sessions, newest day first, each with its live notes (sync/tables/tidy.ts). */
  listTidySessions(teamId: string, days?: number): Promise<tidy.TidySession[]> {
    return tidy.listTidySessions(this.ctx, teamId, days);
  }

  /** Fixes one note (mark, cue, text, shared switch) or moves it to another skater. */
  fixNote(id: string, userId: string, fix: tidy.NoteFix, role?: Role): Promise<Observation> {
    return tidy.fixNote(this.ctx, id, userId, fix, role);
  }

  /** Merges two sessions of one day or neighbouring days: notes moved, focus cues united, the emptied one left (never deleted). */
  mergeSessions(teamId: string, userId: string, aId: string, bId: string, role?: Role): Promise<{ kept: string; removed: string; moved: number }> {
    return tidy.mergeSessions(this.ctx, teamId, userId, aId, bId, role);
  }

  // ---- sessions -----------------------------------------------------------------------------

  /** Today's session for the team (the same id on every device), created on first use. */
  startSession(teamId: string, userId: string, day = sessions.localDay(this.now())): Promise<BoardSession> {
    return sessions.startSession(this.ctx, teamId, userId, day);
  }

  updateSession(id: string, userId: string, patch: BoardSessionPatch): Promise<BoardSession> {
    return sessions.updateSession(this.ctx, id, userId, patch);
  }

  getSession(id: string): Promise<BoardSession | null> {
    return sessions.getSession(this.ctx, id);
  }

  // ---- cue library (head coach) -------------------------------------------------------------

  addCue(teamId: string, userId: string, phase: Phase, label: string): Promise<Cue> {
    return cues.addCue(this.ctx, teamId, userId, phase, label);
  }

  renameCue(id: string, userId: string, label: string): Promise<void> {
    return cues.renameCue(this.ctx, id, userId, label);
  }

  setCueArchived(id: string, userId: string, archived: boolean): Promise<void> {
    return cues.setCueArchived(this.ctx, id, userId, archived);
  }

  /** Moves a cue one place up or down within its phase. */
  moveCue(id: string, userId: string, direction: 'up' | 'down'): Promise<void> {
    return cues.moveCue(this.ctx, id, userId, direction);
  }

  listCues(teamId: string): Promise<Cue[]> {
    return cues.listCues(this.ctx, teamId);
  }

  // ---- squad --------------------------------------------------------------------------------

  /** The team's squad and cue library as read from the server (cues with local edits keep them). */
  loadTeam(teamId: string, data: { groups: Group[]; skaters: Skater[]; cues: Cue[] }): Promise<void> {
    return squad.loadTeam(this.ctx, teamId, data);
  }

  listGroups(teamId: string): Promise<Group[]> {
    return squad.listGroups(this.ctx, teamId);
  }

  /** The team's skaters, retired ones included unless `onBoard` (the board's tiles leave them out). */
  listSkaters(teamId: string, options?: squad.SkaterListOptions): Promise<Skater[]> {
    return squad.listSkaters(this.ctx, teamId, options);
  }

  // ---- the clock: runs, crossings, targets --------------------------------------------------

  /** Starts a heat: a run per lane, rows and outbox entries in one transaction. */
  startHeat(input: runs.StartHeatInput): Promise<Run[]> {
    return runs.startHeat(this.ctx, input);
  }

  /** One tap on a lane button: the crossing and its outbox entry, committed at once. */
  recordCrossing(input: runs.CrossingInput): Promise<Crossing> {
    return runs.recordCrossing(this.ctx, input);
  }

  /** Undo, or delete after the race: gone without a trace if it never left the device. */
  removeCrossings(ids: readonly string[], userId: string, role?: Role): Promise<void> {
    return runs.removeCrossings(this.ctx, ids, userId, role);
  }

  updateCrossing(id: string, userId: string, patch: CrossingPatch, role?: Role): Promise<Crossing> {
    return runs.updateCrossing(this.ctx, id, userId, patch, role);
  }

  /** The run's author changes it, the head coach any (`role`; without it, only the author). */
  updateRun(id: string, userId: string, patch: RunPatch, role?: Role): Promise<Run> {
    return runs.updateRun(this.ctx, id, userId, patch, role);
  }

  finishRun(id: string, userId: string, end: { status: 'finished' | 'stopped'; stopReason?: string }, role?: Role): Promise<Run> {
    return runs.finishRun(this.ctx, id, userId, end, role);
  }

  /** Deletes a run (a false start) and its crossings. */
  removeRun(id: string, userId: string, role?: Role): Promise<void> {
    return runs.removeRun(this.ctx, id, userId, role);
  }

  getRun(id: string): Promise<RunWithCrossings | null> {
    return runs.getRun(this.ctx, id);
  }

  /** The team's runs of a rink day, newest first, with their crossings. */
  listRunsOnDay(teamId: string, day: string): Promise<RunWithCrossings[]> {
    return runs.listRunsOnDay(this.ctx, teamId, day);
  }

  /** Runs still running (to resume after a reload), newest first; `createdBy`: only that coach's. */
  listOpenRuns(teamId: string, createdBy?: string): Promise<RunWithCrossings[]> {
    return runs.listOpenRuns(this.ctx, teamId, createdBy);
  }

  /** Sets a skater's target for a distance (one record per skater, track and distance, on every device). */
  setTarget(input: TargetInput & { teamId: string; userId: string; role?: Role }): Promise<Target> {
    return targets.setTarget(this.ctx, input);
  }

  listTargets(teamId: string): Promise<Target[]> {
    return targets.listTargets(this.ctx, teamId);
  }

  // ---- the outbox (the signed-in user's entries only) ---------------------------------------

  /** Outbox entries waiting to be sent (not counting rejected ones, which wait for the coach). */
  pendingCount(teamId?: string): Promise<number> {
    return outbox.countOutbox(this.ctx, 'pending', teamId);
  }

  /** Records with changes waiting to be sent: the one count every "waiting" the coach reads shows. */
  pendingRecordCount(teamId?: string): Promise<number> {
    return outbox.countPendingRecords(this.ctx, teamId);
  }

  rejectedCount(teamId?: string): Promise<number> {
    return outbox.countOutbox(this.ctx, 'rejected', teamId);
  }

  /** Changes the server refused, oldest first, each with its reason. */
  listRejected(teamId?: string): Promise<outbox.OutboxEntry[]> {
    return outbox.listRejected(this.ctx, teamId);
  }

  /** Sends a rejected change again with the next sync, under a new op id. */
  retryRejected(opId: string): Promise<void> {
    this.sessionsQueued.clear();
    return outbox.retryRejected(this.ctx, opId);
  }

  /** Gives up a rejected change (a create takes its record along; an edit puts back the old value). */
  discardRejected(opId: string): Promise<void> {
    this.sessionsQueued.clear();
    return outbox.discardRejected(this.ctx, opId);
  }

  /** Records with waiting changes per table, for a status line that says what is waiting. */
  pendingByTable(teamId?: string): Promise<Record<SyncedTable, number>> {
    return outbox.pendingByTable(this.ctx, teamId);
  }

  /** The signed-in user's outbox, oldest first. */
  listOutbox(limit = 500): Promise<outbox.OutboxEntry[]> {
    return outbox.listOutbox(this.ctx, limit);
  }

  // ---- the skater's view (skater or guardian) ------------------------------------------------

  /** One skater's notes of one rink day, oldest first, with each cue's text and phase. */
  listForSkater(teamId: string, skaterId: string, day: string): Promise<skaterQueries.SkaterNote[]> {
    return skaterQueries.listForSkater(this.ctx, teamId, skaterId, day);
  }

  /** One skater's runs of one rink day, in the order they were timed, with their crossings. */
  runsForSkater(teamId: string, skaterId: string, day: string): Promise<RunWithCrossings[]> {
    return skaterQueries.runsForSkater(this.ctx, teamId, skaterId, day);
  }

  /** The most recent rink days with notes for the skater, newest first, with counts. */
  daysForSkater(teamId: string, skaterId: string, limit = 14): Promise<skaterQueries.SkaterDay[]> {
    return skaterQueries.daysForSkater(this.ctx, teamId, skaterId, limit);
  }
}
