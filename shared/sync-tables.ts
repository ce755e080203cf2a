/**
 * Every synced table, described once (shared/SYNC.md, "On the device"): its fields with their zod
 * rules and column names, which fields a new record needs, which are fixed once it exists, which
 * point at other records, who may write each field, and which rows a skater or guardian may read.
 *
 * Derived from this, and nowhere else declared:
 * - the server's push: the loader's SELECT, the pure settle step's checks, the unnest writer
 *   (server/services/sync/load.ts, settle.ts, write.ts);
 * - the server's pull: the column list per table and the role filter (server/services/sync/pull.ts);
 * - the device: how a field is stored in its SQLite column (sync/fields.ts).
 *
 * A new synced table (review notes, media) is one entry here plus a server migration and a
 * device migration creating its columns. The clock's runs, crossings and targets were added so.
 */
import { v5 as uuidv5 } from 'uuid';
import { z, type ZodType } from 'zod';
import { cueLabelSchema, phaseSchema } from './cues';
import { daySchema, markSchema, noteSchema } from './schemas/board';
import {
  atMsSchema,
  distanceProblem,
  openerMsSchema,
  runDistanceSchema,
  runLaneSchema,
  runStatusSchema,
  sharesPctSchema,
  startOffsetMsSchema,
  stopReasonSchema,
  targetDistanceSchema,
  targetIdFor,
  targetMsSchema,
  targetPlanProblem,
  targetPlanSchema,
  trackSchema,
  type TargetPlan,
  type Track,
} from './schemas/clock';
import { instantSchema, safeText } from './schemas/values';

/** The protocol names of the synced tables. */
export type SyncTableName = 'observations' | 'sessions' | 'cues' | 'skaters' | 'groups' | 'runs' | 'crossings' | 'targets';

/** How the server stores a field (the unnest array type) and how the device stores it. */
export type ServerType = 'uuid' | 'text' | 'bool' | 'int' | 'timestamptz' | 'jsonb';
export type DeviceType = 'text' | 'int' | 'bool' | 'json';

export interface SyncField {
  /** The column, on the server and on the device alike. */
  column: string;
  server: ServerType;
  device: DeviceType;
  /** What a push may carry. Absent: the field only flows down (pull). */
  rule?: ZodType;
  /** Needed to create a record (an upsert of an unknown record without it is `unknown_record`). */
  required?: boolean;
  /** Set when the record is created; later values are ignored (a record does not move). */
  immutable?: boolean;
  /** The value of a new record that does not carry the field. */
  initial?: unknown;
  /** Holds the id (or a list of ids) of a live record of this table in the same team. */
  ref?: SyncTableName;
  /**
   * Who may set the field through push: coaches (the default), or only the skater the record
   * belongs to, signed in as that skater (an acknowledgement: never a guardian on their behalf).
   */
  writer?: 'coach' | 'own_skater';
  /** The author: always the signed-in user (from the token); an op naming someone else is refused. */
  author?: boolean;
  /**
   * The author's display name as it was when the record was made: set by the server from the
   * signed-in user's account on create (any value in the op is ignored), fixed afterwards.
   */
  authorName?: boolean;
  /** An instant the server bounds: not after its clock's allowed lead, not before the team existed. */
  instant?: boolean;
  /** SQL the pull reads instead of the column for a skater or guardian (e.g. a private note's text blanked). */
  viewerRead?: string;
  /** SQL the pull reads instead of the column for everyone (a value computed from other columns). */
  read?: string;
}

export interface SyncTable {
  /** The server's table (the protocol name is the key of `syncTables`). */
  serverTable: string;
  /** Who may push ops to the table: nobody (it only flows down), any coach, or the head coach. */
  pushBy: 'none' | 'coach' | 'head_coach';
  /**
   * Who may change or delete a record that exists: anyone `pushBy` allows (the default), or only
   * its author (the `author` field) and the head coach.
   */
  changeBy?: 'pushers' | 'author_or_head_coach';
  /** The field of the record naming the skater it belongs to (for skaters' own writes and reads). */
  ownerField?: string;
  /**
   * For a table whose `ownerField` may change (a note moved to another skater): a server-only
   * column (a jsonb list of ids, never pulled) listing the skaters the record belonged to before. A skater or
   * guardian of one of them pulls the record as an eviction, so it leaves the old skater's device
   * on their next pull, while the new skater pulls it as a change. A move also clears the
   * record's `writer: 'own_skater'` fields (the old skater's acknowledgement is not the new one's).
   */
  formerOwnersColumn?: string;
  /**
   * The reference field naming the record this one belongs to (a crossing's run). Who may create,
   * change or delete the record is decided on that parent: with `changeBy: 'author_or_head_coach'`,
   * the parent's author and the head coach, for a new record too (a crossing added to someone
   * else's run changes that run). The push loads the parent of every record it touches.
   */
  parentField?: string;
  /**
   * How records are deleted. 'tombstone': a device hides the row (its `deleted` column) until the
   * server's tombstone arrives, and a record that never left the device goes without a trace.
   * 'never': the table has no deletes (its ids are derived from what the record is about, so a
   * tombstone would block that id for good); the server refuses a delete op. Absent: the server
   * accepts deletes and the device drops the row when the tombstone arrives. A table whose ids are
   * derived only for some records (a day's board session) says so in `deleteGuard` instead.
   */
  deletes?: 'tombstone' | 'never';
  /**
   * Limits on a delete beyond `pushBy` (checked by the server's push and by the device store
   * before it queues one). A tombstone blocks its id for good, so:
   * - `by`: only the record's author (its `author` field) and the head coach delete it;
   * - `held`: a delete of an id the server never held is refused (no tombstone for a future id);
   * - `derivedId`: the id the record would have if it were the one derived from its fields (a
   *   day's board session, sessionIdFor(team, day)); a record with that id is never deleted.
   */
  deleteGuard?: {
    by: 'author_or_head_coach';
    held: true;
    derivedId?: (teamId: string, record: Record<string, unknown>) => string | null;
  };
  /**
   * A delete is refused while live records of `table` still point at this one through `field`
   * (a session still holding notes): nothing is deleted out from under them. The push loads
   * those records (notes moved away by earlier ops of the batch no longer count).
   */
  keptWhileReferenced?: { table: SyncTableName; field: string };
  /**
   * A check across fields, on the record as an upsert would leave it (its current values with the
   * op's on top, whatever the clocks later decide): the reason it is refused, or null. Runs on the
   * server per op (a validation rejection) and in the device store before anything is written.
   */
  check?: (record: Record<string, unknown>, context: { id: string; teamId: string }) => string | null;
  /**
   * Which rows a skater or guardian pulls: the whole team's, or an SQL condition in which
   * `$viewer` is their skater's id (for example only that skater's own records).
   */
  viewerRows: 'team' | { where: string };
  fields: Record<string, SyncField>;
}

/** Fixed namespace for session ids: one board session per team and day, the same id on every device. */
const SESSION_NAMESPACE = '6f1d4b52-8f0e-4f7c-9a51-3c2d7e1b9a40';

/** The board's session of a team's day: the same id on every device (sync/tables/sessions.ts uses it) and on the server. */
export const boardSessionIdFor = (teamId: string, day: string) => uuidv5(`${teamId}/${day}`, SESSION_NAMESPACE);

const uuid = (name: string) => z.uuid({ error: `${name} must be a UUID` });

/** A run's distance must fit its track (free laps, 0, always does). */
function runCheck(run: Record<string, unknown>): string | null {
  if (typeof run.distanceM !== 'number' || (run.track !== 'long' && run.track !== 'short')) return null;
  return distanceProblem(run.distanceM, run.track);
}

/** A target's id is its identity (team, skater, track, distance), and its plan fits the distance. */
function targetCheck(target: Record<string, unknown>, { id, teamId }: { id: string; teamId: string }): string | null {
  const { skaterId, track, distanceM, targetMs, plan } = target;
  if (typeof skaterId !== 'string' || (track !== 'long' && track !== 'short') || typeof distanceM !== 'number') return null;
  if (id !== targetIdFor(teamId, skaterId, track, distanceM)) {
    return 'A target\'s id must be derived from its team, skater, track and distance (targetIdFor)';
  }
  if (typeof targetMs !== 'number' || (plan !== 'even' && plan !== 'shares')) return null;
  return targetPlanProblem({
    distanceM,
    track: track as Track,
    targetMs,
    plan: plan as TargetPlan,
    openerMs: (target.openerMs as number | null | undefined) ?? null,
    sharesPct: (target.sharesPct as number[] | null | undefined) ?? null,
  });
}

export const syncTables: Record<SyncTableName, SyncTable> = {
  // Tidy-up (the evening review) moves notes: sessionId, skaterId and cueId are editable fields,
  // last writer wins per field like mark and note, rather than a delete and a re-create. Why:
  // - the note keeps its id, so its author (createdBy, authorName) and createdAt stay fixed
  //   without trusting a device to copy them (a re-create is authored by whoever sends it);
  // - two coaches moving or editing one note offline merge per field (a re-create each would
  //   make two notes; a delete would win over the other coach's edit and lose it);
  // - refs are checked on every change as on a create (settle.ts: live, same team).
  // What a move needs beyond last-writer-wins: the old skater must lose the note (pull: evictions
  // from `formerOwnersColumn`), and its acknowledgement is cleared (it was the old skater's).
  observations: {
    serverTable: 'observations',
    pushBy: 'coach',
    // A coach changes their own notes; the head coach any (PRODUCT.md, "Look and feel").
    changeBy: 'author_or_head_coach',
    ownerField: 'skaterId',
    formerOwnersColumn: 'former_skater_ids',
    deletes: 'tombstone',
    viewerRows: { where: 'skater_id = $viewer' },
    fields: {
      sessionId: { column: 'session_id', server: 'uuid', device: 'text', rule: uuid('sessionId'), required: true, ref: 'sessions' },
      skaterId: { column: 'skater_id', server: 'uuid', device: 'text', rule: uuid('skaterId'), required: true, ref: 'skaters' },
      cueId: { column: 'cue_id', server: 'uuid', device: 'text', rule: uuid('cueId'), required: true, ref: 'cues' },
      mark: { column: 'mark', server: 'text', device: 'text', rule: markSchema, required: true },
      note: {
        column: 'note', server: 'text', device: 'text', rule: noteSchema, initial: '',
        viewerRead: `CASE WHEN note_shared THEN note ELSE '' END`,
      },
      noteShared: { column: 'note_shared', server: 'bool', device: 'bool', rule: z.boolean({ error: 'noteShared must be true or false' }), initial: false },
      createdAt: { column: 'created_at', server: 'timestamptz', device: 'text', rule: instantSchema('createdAt'), required: true, immutable: true, instant: true },
      createdBy: { column: 'created_by', server: 'uuid', device: 'text', rule: uuid('createdBy'), immutable: true, author: true },
      authorName: { column: 'author_name', server: 'text', device: 'text', rule: safeText('authorName', 200), initial: '', immutable: true, authorName: true },
      acknowledgedAt: {
        column: 'acknowledged_at', server: 'timestamptz', device: 'text', rule: instantSchema('acknowledgedAt').nullable(),
        initial: null, writer: 'own_skater', instant: true,
      },
    },
  },
  sessions: {
    serverTable: 'sessions',
    pushBy: 'coach',
    // Tombstone-deleted, never a day's board session (its id is derived from team and day: a
    // tombstone would refuse that day's board on every device for good), never an id the server
    // has not held, only by its author or the head coach, and only once it holds no notes. The
    // device hides the row while the delete waits, so a pull cannot bring it back. A tidy-up merge
    // deletes nothing: it moves the notes, and Tidy-up hides a session without notes.
    deletes: 'tombstone',
    deleteGuard: { by: 'author_or_head_coach', held: true, derivedId: (teamId, s) => (typeof s.day === 'string' ? boardSessionIdFor(teamId, s.day) : null) },
    keptWhileReferenced: { table: 'observations', field: 'sessionId' },
    viewerRows: 'team',
    fields: {
      day: { column: 'day', server: 'text', device: 'text', rule: daySchema, required: true, immutable: true },
      rink: { column: 'rink', server: 'text', device: 'text', rule: safeText('Rink', 80), initial: '' },
      title: { column: 'title', server: 'text', device: 'text', rule: safeText('Title', 80), initial: '' },
      focusCueIds: {
        column: 'focus_cue_ids', server: 'jsonb', device: 'json', initial: [], ref: 'cues',
        rule: z.array(uuid('focusCueIds'), { error: 'focusCueIds must be a list' }).max(6, 'Pin at most 6 focus cues'),
      },
      createdAt: { column: 'created_at', server: 'timestamptz', device: 'text', rule: instantSchema('createdAt'), required: true, immutable: true, instant: true },
      createdBy: { column: 'created_by', server: 'uuid', device: 'text', rule: uuid('createdBy'), immutable: true, author: true },
    },
  },
  cues: {
    serverTable: 'cues',
    pushBy: 'head_coach',
    viewerRows: 'team',
    fields: {
      phase: { column: 'phase', server: 'text', device: 'text', rule: phaseSchema, required: true },
      label: { column: 'label', server: 'text', device: 'text', rule: cueLabelSchema, required: true },
      sortOrder: {
        column: 'sort_order', server: 'int', device: 'int', initial: 0,
        rule: z.number({ error: 'sortOrder must be a number' }).int('sortOrder must be a whole number').min(-1_000_000).max(1_000_000),
      },
      archived: { column: 'archived', server: 'bool', device: 'bool', rule: z.boolean({ error: 'archived must be true or false' }), initial: false },
    },
  },
  skaters: {
    serverTable: 'skaters',
    pushBy: 'none',
    viewerRows: { where: 'id = $viewer' },
    fields: {
      displayName: { column: 'display_name', server: 'text', device: 'text' },
      groupId: { column: 'group_id', server: 'uuid', device: 'text' },
      hasAccount: { column: 'has_account', server: 'bool', device: 'bool', read: 'user_id IS NOT NULL' },
      // Retired: off the board, kept in history (the head coach sets it through the team routes).
      retired: { column: 'retired', server: 'bool', device: 'bool', read: 'retired_at IS NOT NULL' },
    },
  },
  groups: {
    serverTable: 'skater_groups',
    pushBy: 'none',
    // A skater sees their own group only, not how the rest of the squad is split.
    viewerRows: { where: 'id = (SELECT v.group_id FROM skaters v WHERE v.team_id = $1 AND v.id = $viewer)' },
    fields: {
      name: { column: 'name', server: 'text', device: 'text' },
      sortOrder: { column: 'sort_order', server: 'int', device: 'int' },
    },
  },
  // The clock (issue #9). A run is one skater's timed effort; a pair is two runs sharing heatId.
  runs: {
    serverTable: 'runs',
    pushBy: 'coach',
    // Two coaches timing the two sides each write their own runs; the head coach may fix any.
    changeBy: 'author_or_head_coach',
    ownerField: 'skaterId',
    viewerRows: { where: 'skater_id = $viewer' },
    deletes: 'tombstone',
    check: runCheck,
    fields: {
      // Groups the runs started together; not a reference (a heat is no record of its own).
      heatId: { column: 'heat_id', server: 'uuid', device: 'text', rule: uuid('heatId'), required: true, immutable: true },
      skaterId: { column: 'skater_id', server: 'uuid', device: 'text', rule: uuid('skaterId'), required: true, immutable: true, ref: 'skaters' },
      day: { column: 'day', server: 'text', device: 'text', rule: daySchema, required: true, immutable: true },
      distanceM: { column: 'distance_m', server: 'int', device: 'int', rule: runDistanceSchema, required: true },
      track: { column: 'track', server: 'text', device: 'text', rule: trackSchema, required: true },
      lane: { column: 'lane', server: 'text', device: 'text', rule: runLaneSchema, required: true },
      startedAt: { column: 'started_at', server: 'timestamptz', device: 'text', rule: instantSchema('startedAt'), required: true, immutable: true, instant: true },
      startOffsetMs: { column: 'start_offset_ms', server: 'int', device: 'int', rule: startOffsetMsSchema, initial: 0 },
      targetMs: { column: 'target_ms', server: 'int', device: 'int', rule: targetMsSchema.nullable(), initial: null },
      status: { column: 'status', server: 'text', device: 'text', rule: runStatusSchema, required: true },
      stopReason: { column: 'stop_reason', server: 'text', device: 'text', rule: stopReasonSchema, initial: '' },
      note: { column: 'note', server: 'text', device: 'text', rule: noteSchema, initial: '' },
      createdBy: { column: 'created_by', server: 'uuid', device: 'text', rule: uuid('createdBy'), immutable: true, author: true },
      authorName: { column: 'author_name', server: 'text', device: 'text', rule: safeText('authorName', 200), initial: '', immutable: true, authorName: true },
      createdAt: { column: 'created_at', server: 'timestamptz', device: 'text', rule: instantSchema('createdAt'), required: true, immutable: true, instant: true },
    },
  },
  // One tap on a lane button: the skater crossed the line, atMs after the start signal.
  crossings: {
    serverTable: 'crossings',
    pushBy: 'coach',
    // Part of its run: the run's author and the head coach add, change and delete them.
    changeBy: 'author_or_head_coach',
    parentField: 'runId',
    viewerRows: { where: 'run_id IN (SELECT r.id FROM runs r WHERE r.team_id = $1 AND r.skater_id = $viewer)' },
    deletes: 'tombstone',
    fields: {
      runId: { column: 'run_id', server: 'uuid', device: 'text', rule: uuid('runId'), required: true, immutable: true, ref: 'runs' },
      atMs: { column: 'at_ms', server: 'int', device: 'int', rule: atMsSchema, required: true },
      handTimed: { column: 'hand_timed', server: 'bool', device: 'bool', rule: z.boolean({ error: 'handTimed must be true or false' }), initial: false },
      createdAt: { column: 'created_at', server: 'timestamptz', device: 'text', rule: instantSchema('createdAt'), required: true, immutable: true, instant: true },
    },
  },
  // A skater's target for a distance and its pace plan. The id is targetIdFor(team, skater, track,
  // distance): two coaches setting it offline write one record, merged per field.
  targets: {
    serverTable: 'targets',
    pushBy: 'coach',
    ownerField: 'skaterId',
    viewerRows: { where: 'skater_id = $viewer' },
    deletes: 'never',
    check: targetCheck,
    fields: {
      skaterId: { column: 'skater_id', server: 'uuid', device: 'text', rule: uuid('skaterId'), required: true, immutable: true, ref: 'skaters' },
      distanceM: { column: 'distance_m', server: 'int', device: 'int', rule: targetDistanceSchema, required: true, immutable: true },
      track: { column: 'track', server: 'text', device: 'text', rule: trackSchema, required: true, immutable: true },
      targetMs: { column: 'target_ms', server: 'int', device: 'int', rule: targetMsSchema, required: true },
      plan: { column: 'plan', server: 'text', device: 'text', rule: targetPlanSchema, initial: 'even' },
      openerMs: { column: 'opener_ms', server: 'int', device: 'int', rule: openerMsSchema.nullable(), initial: null },
      sharesPct: { column: 'shares_pct', server: 'jsonb', device: 'json', rule: sharesPctSchema.nullable(), initial: null },
      note: { column: 'note', server: 'text', device: 'text', rule: noteSchema, initial: '' },
      // The coach who set it last (a push carrying another user is refused).
      updatedBy: { column: 'updated_by', server: 'uuid', device: 'text', rule: uuid('updatedBy'), author: true },
    },
  },
};

/** The description of a table by its protocol name (typed loosely for generic code). */
export const tableSpec = (name: SyncTableName): SyncTable => syncTables[name];

export const syncTableNames = Object.keys(syncTables) as SyncTableName[];

/** Tables the device may change through push, in the order a batch writes them (referenced first). */
export const pushableTables = syncTableNames.filter((name) => tableSpec(name).pushBy !== 'none');

export const isSyncTableName = (value: string): value is SyncTableName => Object.prototype.hasOwnProperty.call(syncTables, value);

/** A field of a table, or undefined: never an Object member such as `constructor` or `toString`. */
export function fieldSpec(table: SyncTableName, field: string): SyncField | undefined {
  const fields = tableSpec(table).fields;
  return Object.prototype.hasOwnProperty.call(fields, field) ? fields[field] : undefined;
}

/** The table's fields as [name, spec] pairs, in declaration order. */
export const fieldsOf = (table: SyncTableName): [string, SyncField][] => Object.entries(tableSpec(table).fields);
