/**
 * How the protocol's camelCase record fields (pull changes, outbox ops, the shadow of hidden
 * server values) map onto the device tables' columns. Unknown fields are ignored, so a newer
 * server can add fields without breaking older apps.
 */
import type { PullTable } from '../shared/schemas/sync';
import type { SqlValue } from './driver';

type Encode = (value: unknown) => SqlValue;

const text: Encode = (v) => (v === null || v === undefined ? null : typeof v === 'string' ? v : String(v));
const int: Encode = (v) => (v === null || v === undefined ? null : Math.trunc(Number(v)));
const bool: Encode = (v) => (v ? 1 : 0);
const json: Encode = (v) => JSON.stringify(v ?? []);

export interface Column {
  field: string;
  column: string;
  encode: Encode;
}

const col = (field: string, column: string, encode: Encode = text): Column => ({ field, column, encode });

export const TABLE_COLUMNS: Record<PullTable, readonly Column[]> = {
  observations: [
    col('sessionId', 'session_id'),
    col('skaterId', 'skater_id'),
    col('cueId', 'cue_id'),
    col('mark', 'mark'),
    col('note', 'note'),
    col('noteShared', 'note_shared', bool),
    col('createdAt', 'created_at'),
    col('createdBy', 'created_by'),
    col('acknowledgedAt', 'acknowledged_at'),
  ],
  sessions: [
    col('day', 'day'),
    col('rink', 'rink'),
    col('title', 'title'),
    col('focusCueIds', 'focus_cue_ids', json),
    col('createdAt', 'created_at'),
    col('createdBy', 'created_by'),
  ],
  cues: [col('phase', 'phase'), col('label', 'label'), col('sortOrder', 'sort_order', int), col('archived', 'archived', bool)],
  skaters: [col('displayName', 'display_name'), col('groupId', 'group_id'), col('hasAccount', 'has_account', bool)],
  groups: [col('name', 'name'), col('sortOrder', 'sort_order', int)],
};

export const PULL_TABLES = Object.keys(TABLE_COLUMNS) as PullTable[];

export const isPullTable = (value: string): value is PullTable => Object.prototype.hasOwnProperty.call(TABLE_COLUMNS, value);

/** The known columns present in `fields`, in the table's column order, with encoded values. */
export function encodeFields(
  table: PullTable,
  fields: Record<string, unknown>,
): { names: string[]; columns: string[]; values: SqlValue[] } {
  const names: string[] = [];
  const columns: string[] = [];
  const values: SqlValue[] = [];
  for (const c of TABLE_COLUMNS[table]) {
    if (!Object.prototype.hasOwnProperty.call(fields, c.field)) continue;
    names.push(c.field);
    columns.push(c.column);
    values.push(c.encode(fields[c.field]));
  }
  return { names, columns, values };
}
