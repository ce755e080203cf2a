/**
 * The device store: everything the board needs, on the device, with or without a network.
 *
 * Every change writes the row and its outbox entry in one transaction (shared/SYNC.md, "On the
 * device"): ids are UUID v7 made here, and each changed field carries a hybrid-logical-clock value
 * so that the server can settle edit conflicts per field. Components never talk to SQLite: they
 * call these methods (through the react-query hooks in store/).
 */
import { v5 as uuidv5, v7 as uuidv7 } from 'uuid';
import { cueLabelSchema, type Phase } from '../shared/cues';
import { decodeHlc, encodeHlc, HybridClock } from '../shared/hlc';
import {
  boardSessionPatchSchema,
  describeIssues,
  noteSchema,
  observationPatchSchema,
  type BoardSession,
  type BoardSessionPatch,
  type Cue,
  type Group,
  type Mark,
  type Observation,
  type ObservationPatch,
  type Skater,
} from '../shared/schemas';
import { SerialQueue, transaction, type SqlDriver, type SqlValue } from './driver';
import { migrateDevice } from './schema';
import { encodeFields } from './fields';
import { captureShadow, releaseDiscarded, writeFields } from './shadow';

/** A change the store refuses, with a message fit to show the coach. */
export class StoreError extends Error {}

export type SyncedTable = 'observations' | 'sessions' | 'cues';

export interface OutboxEntry {
  seq: number;
  opId: string;
  teamId: string;
  userId: string;
  table: SyncedTable;
  recordId: string;
  kind: 'upsert' | 'delete';
  fields: Record<string, unknown>;
  hlc: Record<string, string>;
  attempts: number;
  lastError: string | null;
  status: 'pending' | 'rejected';
  /** For a rejected op: the server's reason (validation | permission | unknown_record). */
  rejectReason: string | null;
  sentAt: string | null;
  createdAt: string;
}

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

/** An SQL condition limiting outbox rows to one user's (empty when the store is not scoped). */
export interface OwnerFilter {
  sql: string;
  params: SqlValue[];
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

type OutboxRow = {
  seq: number;
  op_id: string;
  team_id: string;
  user_id: string;
  tbl: SyncedTable;
  record_id: string;
  kind: 'upsert' | 'delete';
  fields: string;
  hlc: string;
  attempts: number;
  last_error: string | null;
  status: 'pending' | 'rejected';
  reject_reason: string | null;
  sent_at: string | null;
  created_at: string;
};

export const toOutboxEntry = (r: OutboxRow): OutboxEntry => ({
  seq: r.seq,
  opId: r.op_id,
  teamId: r.team_id,
  userId: r.user_id,
  table: r.tbl,
  recordId: r.record_id,
  kind: r.kind,
  fields: JSON.parse(r.fields),
  hlc: JSON.parse(r.hlc),
  attempts: r.attempts,
  lastError: r.last_error,
  status: r.status,
  rejectReason: r.reject_reason ?? null,
  sentAt: r.sent_at,
  createdAt: r.created_at,
});

/** A device clock within a minute of the server's is left alone (the server clamps beyond that). */
const CLOCK_TOLERANCE_MS = 60_000;

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
export const ROWS_OWNER_KEY = 'rows_owner';

/** Tables holding rows pulled for (or made by) the user the device belongs to right now. */
const HELD_TABLES = ['observations', 'sessions', 'cues', 'skaters', 'groups', 'sync_shadow'] as const;

/**
 * The fields an outbox upsert must carry to stand for the record's creation (every column the
 * table needs): only such ops can put a record back on the device after a hand-over.
 */
const CREATE_FIELDS: Record<SyncedTable, readonly string[]> = {
  observations: ['sessionId', 'skaterId', 'cueId', 'mark', 'createdAt', 'createdBy'],
  sessions: ['day', 'createdAt', 'createdBy'],
  cues: ['phase', 'label'],
};

export const ownerFilter = (owner: string | undefined, column = 'user_id'): OwnerFilter =>
  owner === undefined ? { sql: '', params: [] } : { sql: ` AND ${column} = ?`, params: [owner] };

export interface RecordInput {
  teamId: string;
  userId: string;
  sessionId: string;
  skaterIds: readonly string[];
  cueId: string;
  mark: Mark;
  note?: string;
  noteShared?: boolean;
  /** Ids for the new observations, one per skater (made by the caller to paint optimistically). */
  ids?: readonly string[];
}

export interface StoreOptions {
  /** Physical clock in ms (tests pin it). */
  now?: () => number;
}

/** Fixed namespace for session ids: one session per team and day, the same id on every device. */
const SESSION_NAMESPACE = '6f1d4b52-8f0e-4f7c-9a51-3c2d7e1b9a40';

/** The local calendar day (YYYY-MM-DD) of a moment: sessions follow the rink's day, not UTC's. */
export function localDay(ms: number): string {
  const d = new Date(ms);
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`;
}

export const sessionIdFor = (teamId: string, day: string) => uuidv5(`${teamId}/${day}`, SESSION_NAMESPACE);

const validate = <T>(schema: { safeParse: (v: unknown) => { success: boolean; data?: T; error?: { issues: { path: PropertyKey[]; message: string }[] } } }, value: unknown): T => {
  const result = schema.safeParse(value);
  if (!result.success) throw new StoreError(describeIssues(result.error!.issues).message);
  return result.data as T;
};

type ObservationRow = {
  id: string;
  team_id: string;
  session_id: string;
  skater_id: string;
  cue_id: string;
  mark: Mark;
  note: string;
  note_shared: number;
  created_at: string;
  created_by: string;
  acknowledged_at?: string | null;
};

const toObservation = (r: ObservationRow): Observation => ({
  id: r.id,
  teamId: r.team_id,
  sessionId: r.session_id,
  skaterId: r.skater_id,
  cueId: r.cue_id,
  mark: r.mark,
  note: r.note,
  noteShared: r.note_shared === 1,
  createdAt: r.created_at,
  createdBy: r.created_by,
  acknowledgedAt: r.acknowledged_at ?? null,
});

type SessionRow = {
  id: string;
  team_id: string;
  day: string;
  rink: string;
  title: string;
  focus_cue_ids: string;
  created_at: string;
  created_by: string;
};

const toSession = (r: SessionRow): BoardSession => ({
  id: r.id,
  teamId: r.team_id,
  day: r.day,
  rink: r.rink,
  title: r.title,
  focusCueIds: JSON.parse(r.focus_cue_ids) as string[],
  createdAt: r.created_at,
  createdBy: r.created_by,
});

/** A note as the skater (or guardian) reads it: the observation with its cue's text and phase. */
export interface SkaterNote {
  id: string;
  sessionId: string;
  cueId: string;
  /** The cue's text; null if the cue has not reached this device. */
  cueLabel: string | null;
  phase: Phase | null;
  /** The cue's place within its phase (for a stable order). */
  cueOrder: number;
  mark: Mark;
  note: string;
  noteShared: boolean;
  createdAt: string;
  createdBy: string;
  acknowledgedAt: string | null;
}

/** A rink day with notes for one skater. */
export interface SkaterDay {
  day: string;
  count: number;
  /** Notes not acknowledged yet. */
  unacknowledged: number;
}

type SkaterNoteRow = Omit<ObservationRow, 'team_id' | 'skater_id'> & {
  acknowledged_at: string | null;
  cue_label: string | null;
  cue_phase: Phase | null;
  cue_order: number | null;
};

const toSkaterNote = (r: SkaterNoteRow): SkaterNote => ({
  id: r.id,
  sessionId: r.session_id,
  cueId: r.cue_id,
  cueLabel: r.cue_label,
  phase: r.cue_phase,
  cueOrder: r.cue_order ?? 0,
  mark: r.mark,
  note: r.note,
  noteShared: r.note_shared === 1,
  createdAt: r.created_at,
  createdBy: r.created_by,
  acknowledgedAt: r.acknowledged_at,
});

const OBSERVATION_COLUMNS = 'id, team_id, session_id, skater_id, cue_id, mark, note, note_shared, created_at, created_by';

export class DeviceStore {
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
    return store;
  }

  get device(): string {
    return this.deviceId;
  }

  /** The id this device pushes under (the device id: one per database, kept in meta). */
  get clientId(): string {
    return this.deviceId;
  }

  /**
   * Corrects this device's clock by the server's (asked just before a push). A device whose clock
   * runs far off (a year ahead, say) would otherwise win every edit conflict with values stamped
   * from the wrong time. Past one minute of error: the clock is moved, and the changes still
   * waiting to be sent get their clock values moved by the same amount, so each keeps its place
   * in real time. Changes already sent keep theirs (the server may have applied them).
   *
   * On a shared device this moves the unsent clocks of every user, not only the signed-in one's:
   * the error is the device's, and the offset is kept per device, so a user who signs in later
   * would measure no error any more and their parked changes would keep the wrong time for ever.
   * Nothing else about their changes is touched (not sent, not counted, not shown).
   */
  async correctClock(askServer: () => Promise<string>): Promise<number> {
    const sentAt = this.physical();
    const serverMs = Date.parse(await askServer());
    const receivedAt = this.physical();
    if (!Number.isFinite(serverMs)) return this.offset;
    const measured = serverMs - (sentAt + receivedAt) / 2;
    const delta = measured - this.offset;
    if (Math.abs(delta) <= CLOCK_TOLERANCE_MS) return this.offset;
    await this.tx(async () => {
      const pending = await this.db.all<{ seq: number; hlc: string }>(`SELECT seq, hlc FROM outbox WHERE sent_at IS NULL`);
      for (const entry of pending) {
        const moved = Object.fromEntries(
          Object.entries(JSON.parse(entry.hlc) as Record<string, string>).map(([field, value]) => {
            const parts = decodeHlc(value);
            // Starting values (clock 0) and values from other devices stay as they are.
            if (parts.wall === 0 || parts.node !== this.deviceId) return [field, value];
            return [field, encodeHlc({ ...parts, wall: Math.max(1, Math.round(parts.wall + delta)) })];
          }),
        );
        await this.db.run(`UPDATE outbox SET hlc = ? WHERE seq = ?`, [JSON.stringify(moved), entry.seq]);
      }
      this.offset = Math.round(measured);
      this.clock.rebase(delta);
      await this.db.run(`INSERT INTO meta (key, value) VALUES ('clock_offset', ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value`, [
        String(this.offset),
      ]);
    });
    return this.offset;
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
      mine: ownerFilter(forUser),
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
  private mine(column = 'user_id'): OwnerFilter {
    return ownerFilter(this.owner, column);
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
        if (next) await this.replayOwnOutbox(next);
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

  /**
   * Puts a user's own waiting changes back into the emptied tables, oldest first: a create (an
   * upsert carrying every field the table needs) inserts the record, a later edit updates it, a
   * delete hides it. Edits of records the device does not hold wait for the pull, which keeps
   * their local values (sync/apply.ts).
   */
  private async replayOwnOutbox(userId: string) {
    const rows = await this.db.all<OutboxRow>(`SELECT * FROM outbox WHERE user_id = ? ORDER BY seq`, [userId]);
    for (const entry of rows.map(toOutboxEntry)) {
      if (entry.kind === 'delete') {
        if (entry.table === 'observations') await this.db.run(`UPDATE observations SET deleted = 1 WHERE id = ?`, [entry.recordId]);
        continue;
      }
      const [held] = await this.db.all<{ id: string }>(`SELECT id FROM ${entry.table} WHERE id = ?`, [entry.recordId]);
      if (held) {
        await writeFields(this.db, entry.table, entry.recordId, entry.fields);
      } else if (CREATE_FIELDS[entry.table].every((field) => Object.prototype.hasOwnProperty.call(entry.fields, field))) {
        const { columns, values } = encodeFields(entry.table, entry.fields);
        await this.db.run(
          `INSERT INTO ${entry.table} (id, team_id, ${columns.map((c) => `${c}, `).join('')}synced) VALUES (?, ?, ${columns.map(() => '?, ').join('')}0)`,
          [entry.recordId, entry.teamId, ...values],
        );
      } else {
        continue;
      }
      await this.stampRow(entry.table, entry.recordId, entry.hlc);
    }
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

  close() {
    return this.queue.run(() => this.db.close());
  }

  // ---- writes -------------------------------------------------------------------------------

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

  private async enqueue(op: {
    teamId: string;
    userId: string;
    table: SyncedTable;
    recordId: string;
    kind: 'upsert' | 'delete';
    fields: Record<string, unknown>;
    hlc: string;
    /** The values the edit replaces (kept as the server's value until the edit is acknowledged). */
    previous?: Record<string, unknown>;
  }) {
    this.assertWriter(op.userId);
    if (op.previous) await captureShadow(this.db, op.table, op.recordId, op.previous);
    // A delete carries its clock under "deleted" so the server can order it against edits.
    const fieldHlc =
      op.kind === 'delete' ? { deleted: op.hlc } : Object.fromEntries(Object.keys(op.fields).map((field) => [field, op.hlc]));
    await this.db.run(
      `INSERT INTO outbox (op_id, team_id, user_id, tbl, record_id, kind, fields, hlc, created_at)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
      [uuidv7(), op.teamId, op.userId, op.table, op.recordId, op.kind, JSON.stringify(op.fields), JSON.stringify(fieldHlc), new Date(this.now()).toISOString()],
    );
    return fieldHlc;
  }

  /** Changes are made by the user the store is open for, or by nobody. */
  private assertWriter(userId: string) {
    if (this.owner !== undefined && userId !== this.owner) {
      throw new StoreError('This device is open for someone else now: sign in again to record.');
    }
  }

  /** Merges per-field clock values into a row's `hlc` column. */
  private async stampRow(table: SyncedTable, id: string, fieldHlc: Record<string, string>) {
    await this.db.run(`UPDATE ${table} SET hlc = json_patch(hlc, ?) WHERE id = ?`, [JSON.stringify(fieldHlc), id]);
  }

  /** One tap on a cue chip: an observation for every selected skater, in one transaction. */
  async recordObservations(input: RecordInput): Promise<Observation[]> {
    if (input.skaterIds.length === 0) throw new StoreError('Pick at least one skater first');
    if (input.ids && input.ids.length !== input.skaterIds.length) throw new StoreError('One id per skater is needed');
    const note = validate<string>(noteSchema, input.note ?? '');
    const createdAt = new Date(this.now()).toISOString();
    return this.tx(async () => {
      // A tap is the hot path: once a session is known to be queued (or synced), skip the two
      // look-ups that check it, so a tap costs two inserts and the commit.
      if (!this.sessionsQueued.has(input.sessionId)) {
        const session = await this.getSession(input.sessionId);
        if (!session) throw new StoreError('Start the session first');
        await this.ensureSessionQueued(session, input.userId);
        this.sessionsQueued.add(input.sessionId);
      }
      const created: Observation[] = [];
      for (const [index, skaterId] of input.skaterIds.entries()) {
        const observation: Observation = {
          id: input.ids?.[index] ?? uuidv7(),
          teamId: input.teamId,
          sessionId: input.sessionId,
          skaterId,
          cueId: input.cueId,
          mark: input.mark,
          note,
          noteShared: input.noteShared ?? false,
          createdAt,
          createdBy: input.userId,
        };
        const hlc = this.clock.now();
        const { id: _id, teamId: _team, ...fields } = observation;
        // The row carries its clock values from the start (no second statement to stamp them).
        const fieldHlc = Object.fromEntries(Object.keys(fields).map((field) => [field, hlc]));
        await this.db.run(
          `INSERT INTO observations (${OBSERVATION_COLUMNS}, hlc) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
          [observation.id, observation.teamId, observation.sessionId, skaterId, observation.cueId, observation.mark, note, observation.noteShared ? 1 : 0, createdAt, input.userId, JSON.stringify(fieldHlc)],
        );
        await this.enqueue({ teamId: input.teamId, userId: input.userId, table: 'observations', recordId: observation.id, kind: 'upsert', fields, hlc });
        created.push(observation);
      }
      return created;
    });
  }

  async updateObservation(id: string, userId: string, patch: ObservationPatch): Promise<Observation> {
    const changes = validate<ObservationPatch>(observationPatchSchema, patch);
    return this.tx(async () => {
      const row = await this.observationRow(id);
      const fields: Record<string, unknown> = {};
      const previous = { mark: row.mark, note: row.note, noteShared: row.note_shared === 1 };
      const sets: string[] = [];
      const params: SqlValue[] = [];
      if (changes.mark !== undefined && changes.mark !== row.mark) {
        fields.mark = changes.mark;
        sets.push('mark = ?');
        params.push(changes.mark);
      }
      if (changes.note !== undefined && changes.note !== row.note) {
        fields.note = changes.note;
        sets.push('note = ?');
        params.push(changes.note);
      }
      if (changes.noteShared !== undefined && changes.noteShared !== (row.note_shared === 1)) {
        fields.noteShared = changes.noteShared;
        sets.push('note_shared = ?');
        params.push(changes.noteShared ? 1 : 0);
      }
      if (sets.length > 0) {
        await this.db.run(`UPDATE observations SET ${sets.join(', ')} WHERE id = ?`, [...params, id]);
        const fieldHlc = await this.enqueue({
          teamId: row.team_id, userId, table: 'observations', recordId: id, kind: 'upsert', fields, hlc: this.clock.now(),
          previous: Object.fromEntries(Object.keys(fields).map((f) => [f, previous[f as keyof typeof previous]])),
        });
        await this.stampRow('observations', id, fieldHlc);
      }
      return toObservation(await this.observationRow(id));
    });
  }

  /**
   * Removes observations (undo, or delete from the feed). One that never left the device simply
   * disappears with its outbox entries, so it never shows up anywhere; one the server may have
   * seen becomes a tombstone with a delete in the outbox.
   */
  async removeObservations(ids: readonly string[], userId: string): Promise<void> {
    await this.tx(async () => {
      for (const id of ids) {
        const row = await this.observationRow(id);
        const [{ sent, synced }] = await this.db.all<{ sent: number; synced: number }>(
          `SELECT (SELECT count(*) FROM outbox WHERE tbl = 'observations' AND record_id = ? AND sent_at IS NOT NULL) AS sent,
                  (SELECT synced FROM observations WHERE id = ?) AS synced`,
          [id, id],
        );
        if (sent === 0 && synced === 0) {
          this.assertWriter(userId);
          const mine = this.mine();
          await this.db.run(`DELETE FROM outbox WHERE tbl = 'observations' AND record_id = ?${mine.sql}`, [id, ...mine.params]);
          await this.db.run(`DELETE FROM sync_shadow WHERE tbl = 'observations' AND record_id = ?`, [id]);
          await this.db.run(`DELETE FROM observations WHERE id = ?`, [id]);
        } else {
          await this.db.run(`UPDATE observations SET deleted = 1 WHERE id = ?`, [id]);
          await this.enqueue({ teamId: row.team_id, userId, table: 'observations', recordId: id, kind: 'delete', fields: {}, hlc: this.clock.now() });
        }
      }
    });
  }

  private async observationRow(id: string): Promise<ObservationRow & { deleted: number }> {
    const [row] = await this.db.all<ObservationRow & { deleted: number }>(
      `SELECT ${OBSERVATION_COLUMNS}, acknowledged_at, deleted FROM observations WHERE id = ?`,
      [id],
    );
    if (!row || row.deleted) throw new StoreError('That note no longer exists');
    return row;
  }

  /**
   * Today's session for the team: the same id on every device, created on first use. Opening the
   * board alone sends nothing: the session joins the outbox with its first note or edit.
   */
  async startSession(teamId: string, userId: string, day = localDay(this.now())): Promise<BoardSession> {
    this.assertWriter(userId);
    const id = sessionIdFor(teamId, day);
    const existing = await this.getSession(id);
    if (existing) return existing;
    return this.tx(async () => {
      const again = await this.getSession(id);
      if (again) return again;
      const createdAt = new Date(this.now()).toISOString();
      await this.db.run(
        `INSERT INTO sessions (id, team_id, day, rink, title, focus_cue_ids, created_at, created_by) VALUES (?, ?, ?, '', '', '[]', ?, ?)`,
        [id, teamId, day, createdAt, userId],
      );
      return (await this.getSession(id))!;
    });
  }

  /**
   * Queues the whole session once, before the first change that depends on it. Another user's
   * parked create of the same session does not count: it is sent only when they come back.
   */
  private async ensureSessionQueued(session: BoardSession, userId: string) {
    const [{ queued }] = await this.db.all<{ queued: number }>(
      `SELECT (SELECT synced FROM sessions WHERE id = ?)
            + (SELECT count(*) FROM outbox WHERE tbl = 'sessions' AND record_id = ? AND user_id = ?) AS queued`,
      [session.id, session.id, userId],
    );
    if (queued > 0) return;
    const { id: _id, teamId: _team, ...fields } = session;
    // Every device creates the same session (one per team and day). Its starting values carry
    // the oldest possible clock, so they never overwrite a rink, title or focus another coach set.
    const fieldHlc = await this.enqueue({
      teamId: session.teamId,
      userId,
      table: 'sessions',
      recordId: session.id,
      kind: 'upsert',
      fields,
      hlc: encodeHlc({ wall: 0, counter: 0, node: this.deviceId }),
    });
    await this.stampRow('sessions', session.id, fieldHlc);
  }

  async updateSession(id: string, userId: string, patch: BoardSessionPatch): Promise<BoardSession> {
    const changes = validate<BoardSessionPatch>(boardSessionPatchSchema, patch);
    return this.tx(async () => {
      const session = await this.getSession(id);
      if (!session) throw new StoreError('That session no longer exists');
      await this.ensureSessionQueued(session, userId);
      const fields: Record<string, unknown> = {};
      if (changes.rink !== undefined && changes.rink !== session.rink) fields.rink = changes.rink;
      if (changes.title !== undefined && changes.title !== session.title) fields.title = changes.title;
      if (changes.focusCueIds !== undefined && JSON.stringify(changes.focusCueIds) !== JSON.stringify(session.focusCueIds)) {
        fields.focusCueIds = changes.focusCueIds;
      }
      if (Object.keys(fields).length > 0) {
        await this.db.run(`UPDATE sessions SET rink = ?, title = ?, focus_cue_ids = ? WHERE id = ?`, [
          (fields.rink as string) ?? session.rink,
          (fields.title as string) ?? session.title,
          JSON.stringify(fields.focusCueIds ?? session.focusCueIds),
          id,
        ]);
        const fieldHlc = await this.enqueue({
          teamId: session.teamId, userId, table: 'sessions', recordId: id, kind: 'upsert', fields, hlc: this.clock.now(),
          previous: Object.fromEntries(Object.keys(fields).map((f) => [f, session[f as keyof BoardSession]])),
        });
        await this.stampRow('sessions', id, fieldHlc);
      }
      return (await this.getSession(id))!;
    });
  }

  // ---- cue library (head coach) -------------------------------------------------------------

  async addCue(teamId: string, userId: string, phase: Phase, label: string): Promise<Cue> {
    const text = validate<string>(cueLabelSchema, label);
    return this.tx(async () => {
      const [{ next }] = await this.db.all<{ next: number }>(
        `SELECT coalesce(max(sort_order), 0) + 1 AS next FROM cues WHERE team_id = ? AND phase = ?`,
        [teamId, phase],
      );
      const cue: Cue = { id: uuidv7(), phase, label: text, sortOrder: next, archived: false };
      await this.db.run(`INSERT INTO cues (id, team_id, phase, label, sort_order, archived) VALUES (?, ?, ?, ?, ?, 0)`, [cue.id, teamId, phase, text, next]);
      const { id: _id, ...fields } = cue;
      const fieldHlc = await this.enqueue({ teamId, userId, table: 'cues', recordId: cue.id, kind: 'upsert', fields, hlc: this.clock.now() });
      await this.stampRow('cues', cue.id, fieldHlc);
      return cue;
    });
  }

  async renameCue(id: string, userId: string, label: string): Promise<void> {
    const text = validate<string>(cueLabelSchema, label);
    await this.tx(async () => {
      const cue = await this.cueRow(id);
      if (cue.label === text) return;
      await this.db.run(`UPDATE cues SET label = ? WHERE id = ?`, [text, id]);
      await this.cueChanged(cue.team_id, userId, id, { label: text }, { label: cue.label });
    });
  }

  async setCueArchived(id: string, userId: string, archived: boolean): Promise<void> {
    await this.tx(async () => {
      const cue = await this.cueRow(id);
      if ((cue.archived === 1) === archived) return;
      await this.db.run(`UPDATE cues SET archived = ? WHERE id = ?`, [archived ? 1 : 0, id]);
      await this.cueChanged(cue.team_id, userId, id, { archived }, { archived: cue.archived === 1 });
    });
  }

  /** Moves a cue one place up or down within its phase (swaps order with its neighbour). */
  async moveCue(id: string, userId: string, direction: 'up' | 'down'): Promise<void> {
    await this.tx(async () => {
      const cue = await this.cueRow(id);
      const siblings = await this.db.all<{ id: string; sort_order: number }>(
        `SELECT id, sort_order FROM cues WHERE team_id = ? AND phase = ? AND archived = 0 ORDER BY sort_order, label`,
        [cue.team_id, cue.phase],
      );
      const index = siblings.findIndex((s) => s.id === id);
      const other = siblings[direction === 'up' ? index - 1 : index + 1];
      if (index < 0 || !other) return;
      // Renumber the phase densely so equal sort orders cannot make a swap a no-op.
      const order = siblings.map((s) => s.id);
      [order[index], order[order.indexOf(other.id)]] = [other.id, id];
      for (const [position, cueId] of order.entries()) {
        const sortOrder = position + 1;
        const before = siblings.find((s) => s.id === cueId)!.sort_order;
        if (before === sortOrder) continue;
        await this.db.run(`UPDATE cues SET sort_order = ? WHERE id = ?`, [sortOrder, cueId]);
        await this.cueChanged(cue.team_id, userId, cueId, { sortOrder }, { sortOrder: before });
      }
    });
  }

  private async cueChanged(teamId: string, userId: string, id: string, fields: Record<string, unknown>, previous: Record<string, unknown>) {
    const fieldHlc = await this.enqueue({ teamId, userId, table: 'cues', recordId: id, kind: 'upsert', fields, hlc: this.clock.now(), previous });
    await this.stampRow('cues', id, fieldHlc);
  }

  private async cueRow(id: string) {
    const [row] = await this.db.all<{ id: string; team_id: string; phase: Phase; label: string; archived: number }>(
      `SELECT id, team_id, phase, label, archived FROM cues WHERE id = ?`,
      [id],
    );
    if (!row) throw new StoreError('That cue no longer exists');
    return row;
  }

  /**
   * Loads the team's squad and cue library as read from the server. Cues with local edits still
   * waiting in the outbox keep their local values.
   */
  async loadTeam(teamId: string, data: { groups: Group[]; skaters: Skater[]; cues: Cue[] }): Promise<void> {
    await transaction(this.db, this.queue, async () => {
      await this.db.run(`DELETE FROM groups WHERE team_id = ?`, [teamId]);
      for (const g of data.groups) {
        await this.db.run(`INSERT INTO groups (id, team_id, name, sort_order) VALUES (?, ?, ?, ?)`, [g.id, teamId, g.name, g.sortOrder]);
      }
      await this.db.run(`DELETE FROM skaters WHERE team_id = ?`, [teamId]);
      for (const s of data.skaters) {
        await this.db.run(`INSERT INTO skaters (id, team_id, display_name, group_id, has_account) VALUES (?, ?, ?, ?, ?)`, [
          s.id,
          teamId,
          s.displayName,
          s.groupId,
          s.hasAccount ? 1 : 0,
        ]);
      }
      for (const c of data.cues) {
        await this.db.run(
          `INSERT INTO cues (id, team_id, phase, label, sort_order, archived, synced) VALUES (?, ?, ?, ?, ?, ?, 1)
           ON CONFLICT (id) DO UPDATE SET phase = excluded.phase, label = excluded.label,
             sort_order = excluded.sort_order, archived = excluded.archived, synced = 1
           WHERE NOT EXISTS (SELECT 1 FROM outbox WHERE tbl = 'cues' AND record_id = excluded.id)`,
          [c.id, teamId, c.phase, c.label, c.sortOrder, c.archived ? 1 : 0],
        );
      }
    });
  }

  // ---- reads --------------------------------------------------------------------------------

  async listGroups(teamId: string): Promise<Group[]> {
    const rows = await this.db.all<{ id: string; name: string; sort_order: number }>(
      `SELECT id, name, sort_order FROM groups WHERE team_id = ? ORDER BY sort_order, name`,
      [teamId],
    );
    return rows.map((r) => ({ id: r.id, name: r.name, sortOrder: r.sort_order }));
  }

  async listSkaters(teamId: string): Promise<Skater[]> {
    const rows = await this.db.all<{ id: string; display_name: string; group_id: string | null; has_account: number }>(
      `SELECT id, display_name, group_id, has_account FROM skaters WHERE team_id = ? ORDER BY display_name`,
      [teamId],
    );
    return rows.map((r) => ({ id: r.id, displayName: r.display_name, groupId: r.group_id, hasAccount: r.has_account === 1 }));
  }

  async listCues(teamId: string): Promise<Cue[]> {
    const rows = await this.db.all<{ id: string; phase: Phase; label: string; sort_order: number; archived: number }>(
      `SELECT id, phase, label, sort_order, archived FROM cues WHERE team_id = ? ORDER BY sort_order, label`,
      [teamId],
    );
    return rows.map((r) => ({ id: r.id, phase: r.phase, label: r.label, sortOrder: r.sort_order, archived: r.archived === 1 }));
  }

  async getSession(id: string): Promise<BoardSession | null> {
    const [row] = await this.db.all<SessionRow>(
      `SELECT id, team_id, day, rink, title, focus_cue_ids, created_at, created_by FROM sessions WHERE id = ?`,
      [id],
    );
    return row ? toSession(row) : null;
  }

  /** The session's notes, newest first (tombstones excluded). */
  async listObservations(sessionId: string): Promise<Observation[]> {
    const rows = await this.db.all<ObservationRow>(
      `SELECT ${OBSERVATION_COLUMNS}, acknowledged_at FROM observations WHERE session_id = ? AND deleted = 0 ORDER BY created_at DESC, id DESC`,
      [sessionId],
    );
    return rows.map(toObservation);
  }

  async countObservations(teamId: string): Promise<number> {
    const [{ n }] = await this.db.all<{ n: number }>(`SELECT count(*) AS n FROM observations WHERE team_id = ? AND deleted = 0`, [teamId]);
    return n;
  }

  /**
   * Changes waiting to be sent (not counting rejected ones, which wait for the coach). Only the
   * signed-in user's: other people's changes parked on a shared device are never counted here.
   */
  async pendingCount(teamId?: string): Promise<number> {
    return this.countOutbox('pending', teamId);
  }

  /** Changes the server refused, oldest first, each with its reason (the signed-in user's only). */
  async listRejected(teamId?: string): Promise<OutboxEntry[]> {
    const mine = this.mine();
    const team = teamId ? ' AND team_id = ?' : '';
    const rows = await this.db.all<OutboxRow>(`SELECT * FROM outbox WHERE status = 'rejected'${team}${mine.sql} ORDER BY seq`, [
      ...(teamId ? [teamId] : []),
      ...mine.params,
    ]);
    return rows.map(toOutboxEntry);
  }

  async rejectedCount(teamId?: string): Promise<number> {
    return this.countOutbox('rejected', teamId);
  }

  private async countOutbox(status: 'pending' | 'rejected', teamId?: string): Promise<number> {
    const mine = this.mine();
    const team = teamId ? ' AND team_id = ?' : '';
    const [{ n }] = await this.db.all<{ n: number }>(`SELECT count(*) AS n FROM outbox WHERE status = ?${team}${mine.sql}`, [
      status,
      ...(teamId ? [teamId] : []),
      ...mine.params,
    ]);
    return n;
  }

  /**
   * Sends a rejected change again with the next sync (the coach fixed what was wrong). It goes
   * under a new op id: the server's op log has settled the old one as rejected and would only
   * repeat that answer.
   */
  async retryRejected(opId: string): Promise<void> {
    this.sessionsQueued.clear();
    await this.tx(async () => {
      const mine = this.mine();
      const { changes } = await this.db.run(
        `UPDATE outbox SET op_id = ?, status = 'pending', attempts = 0, last_error = NULL, reject_reason = NULL, sent_at = NULL
         WHERE op_id = ? AND status = 'rejected'${mine.sql}`,
        [uuidv7(), opId, ...mine.params],
      );
      if (changes === 0) throw new StoreError('That change is no longer waiting');
    });
  }

  /**
   * Gives up a rejected change. A rejected create takes its local record (and the edits queued
   * on it) along; a rejected edit puts back the previous value; a rejected delete shows the
   * record again.
   */
  async discardRejected(opId: string): Promise<void> {
    this.sessionsQueued.clear();
    await this.tx(async () => {
      // Only the signed-in user's own refused changes can be given up (another user's are parked).
      const mine = this.mine();
      const [row] = await this.db.all<OutboxRow>(`SELECT * FROM outbox WHERE op_id = ? AND status = 'rejected'${mine.sql}`, [opId, ...mine.params]);
      if (!row) throw new StoreError('That change is no longer waiting');
      const entry = toOutboxEntry(row);
      const own = ownerFilter(entry.userId);
      const [first] = await this.db.all<{ seq: number }>(`SELECT min(seq) AS seq FROM outbox WHERE tbl = ? AND record_id = ?${own.sql}`, [
        entry.table,
        entry.recordId,
        ...own.params,
      ]);
      const [record] = await this.db.all<{ synced: number }>(`SELECT synced FROM ${entry.table} WHERE id = ?`, [entry.recordId]);
      const isCreate = entry.kind === 'upsert' && first.seq === entry.seq && (!record || record.synced === 0);
      if (isCreate) {
        await this.db.run(`DELETE FROM outbox WHERE tbl = ? AND record_id = ?${own.sql}`, [entry.table, entry.recordId, ...own.params]);
        await this.db.run(`DELETE FROM sync_shadow WHERE tbl = ? AND record_id = ?`, [entry.table, entry.recordId]);
        await this.db.run(`DELETE FROM ${entry.table} WHERE id = ?`, [entry.recordId]);
        return;
      }
      await this.db.run(`DELETE FROM outbox WHERE seq = ?`, [entry.seq]);
      if (entry.kind === 'delete') {
        const [{ n }] = await this.db.all<{ n: number }>(
          `SELECT count(*) AS n FROM outbox WHERE tbl = ? AND record_id = ? AND kind = 'delete'${own.sql}`,
          [entry.table, entry.recordId, ...own.params],
        );
        if (n === 0 && entry.table === 'observations') await this.db.run(`UPDATE observations SET deleted = 0 WHERE id = ?`, [entry.recordId]);
        return;
      }
      await releaseDiscarded(this.db, entry.table, entry.recordId, { seq: entry.seq, fields: entry.fields }, entry.userId);
    });
  }

  /** Waiting changes per table, for a status line that says what is waiting. */
  async pendingByTable(): Promise<Record<SyncedTable, number>> {
    const mine = this.mine();
    const rows = await this.db.all<{ tbl: SyncedTable; n: number }>(
      `SELECT tbl, count(*) AS n FROM outbox WHERE status = 'pending'${mine.sql} GROUP BY tbl`,
      mine.params,
    );
    const counts: Record<SyncedTable, number> = { observations: 0, sessions: 0, cues: 0 };
    for (const r of rows) counts[r.tbl] = r.n;
    return counts;
  }

  /** The signed-in user's outbox, oldest first. */
  async listOutbox(limit = 500): Promise<OutboxEntry[]> {
    const mine = this.mine();
    const rows = await this.db.all<OutboxRow>(`SELECT * FROM outbox WHERE 1 = 1${mine.sql} ORDER BY seq LIMIT ?`, [...mine.params, limit]);
    return rows.map(toOutboxEntry);
  }

  // ---- the skater's view (skater or guardian) ------------------------------------------------

  /**
   * One skater's notes of one rink day (the session's `day`), oldest first, with each cue's text
   * and phase. Tombstones are left out. A note whose session has not reached this device yet
   * counts under the UTC day of its creation time. The note text is returned as stored: screens
   * show it only when `noteShared` (the server blanks private text for skaters anyway).
   */
  async listForSkater(teamId: string, skaterId: string, day: string): Promise<SkaterNote[]> {
    const rows = await this.db.all<SkaterNoteRow>(
      `SELECT o.id, o.session_id, o.cue_id, o.mark, o.note, o.note_shared, o.created_at, o.created_by, o.acknowledged_at,
              c.label AS cue_label, c.phase AS cue_phase, c.sort_order AS cue_order
       FROM observations o
       LEFT JOIN sessions s ON s.id = o.session_id
       LEFT JOIN cues c ON c.id = o.cue_id
       WHERE o.team_id = ? AND o.skater_id = ? AND o.deleted = 0 AND coalesce(s.day, substr(o.created_at, 1, 10)) = ?
       ORDER BY o.created_at, o.id`,
      [teamId, skaterId, day],
    );
    return rows.map(toSkaterNote);
  }

  /** The most recent rink days with notes for the skater, newest first, with counts. */
  async daysForSkater(teamId: string, skaterId: string, limit = 14): Promise<SkaterDay[]> {
    const rows = await this.db.all<{ day: string; total: number; open: number }>(
      `SELECT coalesce(s.day, substr(o.created_at, 1, 10)) AS day, count(*) AS total,
              sum(CASE WHEN o.acknowledged_at IS NULL THEN 1 ELSE 0 END) AS open
       FROM observations o
       LEFT JOIN sessions s ON s.id = o.session_id
       WHERE o.team_id = ? AND o.skater_id = ? AND o.deleted = 0
       GROUP BY 1 ORDER BY 1 DESC LIMIT ?`,
      [teamId, skaterId, Math.max(1, Math.trunc(limit))],
    );
    return rows.map((r) => ({ day: r.day, count: r.total, unacknowledged: r.open }));
  }

  /**
   * The skater (or their guardian) says "got it": sets acknowledged_at and queues the change, in
   * one transaction. A note already acknowledged stays as it is (no second change is queued).
   * Resolves to the acknowledgement time.
   */
  async acknowledgeObservation(id: string, userId: string): Promise<string> {
    return this.tx(async () => {
      const row = await this.observationRow(id);
      const [{ acknowledged_at: already }] = await this.db.all<{ acknowledged_at: string | null }>(
        `SELECT acknowledged_at FROM observations WHERE id = ?`,
        [id],
      );
      if (already) return already;
      const acknowledgedAt = new Date(this.now()).toISOString();
      await this.db.run(`UPDATE observations SET acknowledged_at = ? WHERE id = ?`, [acknowledgedAt, id]);
      const fieldHlc = await this.enqueue({
        teamId: row.team_id, userId, table: 'observations', recordId: id, kind: 'upsert', fields: { acknowledgedAt }, hlc: this.clock.now(),
        previous: { acknowledgedAt: null },
      });
      await this.stampRow('observations', id, fieldHlc);
      return acknowledgedAt;
    });
  }

  /** The last HLC value this device issued (persisted with every change). */
  lastClock(): string {
    return this.clock.current();
  }
}
