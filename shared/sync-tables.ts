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
 * A new synced table (the clock's runs and laps, review notes, media) is one entry here plus a
 * server migration and a device migration creating its columns.
 */
import { z, type ZodType } from 'zod';
import { cueLabelSchema, phaseSchema } from './cues';
import { daySchema, markSchema, noteSchema } from './schemas/board';
import { instantSchema, safeText } from './schemas/values';

/** The protocol names of the synced tables. */
export type SyncTableName = 'observations' | 'sessions' | 'cues' | 'skaters' | 'groups';

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
   * Which rows a skater or guardian pulls: the whole team's, or an SQL condition in which
   * `$viewer` is their skater's id (for example only that skater's own records).
   */
  viewerRows: 'team' | { where: string };
  fields: Record<string, SyncField>;
}

const uuid = (name: string) => z.uuid({ error: `${name} must be a UUID` });

export const syncTables: Record<SyncTableName, SyncTable> = {
  observations: {
    serverTable: 'observations',
    pushBy: 'coach',
    // A coach changes their own notes; the head coach any (PRODUCT.md, "Look and feel").
    changeBy: 'author_or_head_coach',
    ownerField: 'skaterId',
    viewerRows: { where: 'skater_id = $viewer' },
    fields: {
      sessionId: { column: 'session_id', server: 'uuid', device: 'text', rule: uuid('sessionId'), required: true, immutable: true, ref: 'sessions' },
      skaterId: { column: 'skater_id', server: 'uuid', device: 'text', rule: uuid('skaterId'), required: true, immutable: true, ref: 'skaters' },
      cueId: { column: 'cue_id', server: 'uuid', device: 'text', rule: uuid('cueId'), required: true, immutable: true, ref: 'cues' },
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
