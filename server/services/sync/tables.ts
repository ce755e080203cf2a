/**
 * What a push may carry per table: each field's zod rule, which fields a new record needs, which
 * are fixed once the record exists (later values for them are ignored, not merged), the defaults
 * of a new record, and the ids a field points at (checked to exist in the same team).
 *
 * Field names are the device's camelCase names (sync/store.ts builds the ops); pull answers with
 * the same names.
 */
import { z, type ZodType } from 'zod';
import { cueLabelSchema, phaseSchema } from '../../../shared/cues';
import { daySchema, markSchema, noteSchema } from '../../../shared/schemas/board';
import type { PushTable } from '../../../shared/schemas/sync';

const uuid = (name: string) => z.uuid({ error: `${name} must be a UUID` });
const instant = (name: string) => z.iso.datetime({ offset: true, error: `${name} must be an ISO date-time` });

export type RefTable = 'sessions' | 'skaters' | 'cues';

export interface TableSpec {
  fields: Record<string, ZodType>;
  /** Needed to create a record; an upsert of an unknown record without them is `unknown_record`. */
  required: readonly string[];
  /** Set when the record is created; later values are ignored (a record does not move). */
  immutable: ReadonlySet<string>;
  defaults: Record<string, unknown>;
  /** Fields holding ids (or arrays of ids) of other records of the same team. */
  refs: Record<string, RefTable>;
}

export const tableSpecs: Record<PushTable, TableSpec> = {
  observations: {
    fields: {
      sessionId: uuid('sessionId'),
      skaterId: uuid('skaterId'),
      cueId: uuid('cueId'),
      mark: markSchema,
      note: noteSchema,
      noteShared: z.boolean({ error: 'noteShared must be true or false' }),
      createdAt: instant('createdAt'),
      createdBy: uuid('createdBy'),
      acknowledgedAt: instant('acknowledgedAt').nullable(),
    },
    required: ['sessionId', 'skaterId', 'cueId', 'mark', 'createdAt', 'createdBy'],
    immutable: new Set(['sessionId', 'skaterId', 'cueId', 'createdAt', 'createdBy']),
    defaults: { note: '', noteShared: false, acknowledgedAt: null },
    refs: { sessionId: 'sessions', skaterId: 'skaters', cueId: 'cues' },
  },
  sessions: {
    fields: {
      day: daySchema,
      rink: z.string({ error: 'Rink must be text' }).max(80, 'Rink must be at most 80 characters'),
      title: z.string({ error: 'Title must be text' }).max(80, 'Title must be at most 80 characters'),
      focusCueIds: z.array(uuid('focusCueIds'), { error: 'focusCueIds must be a list' }).max(6, 'Pin at most 6 focus cues'),
      createdAt: instant('createdAt'),
      createdBy: uuid('createdBy'),
    },
    required: ['day', 'createdAt', 'createdBy'],
    immutable: new Set(['day', 'createdAt', 'createdBy']),
    defaults: { rink: '', title: '', focusCueIds: [] },
    refs: { focusCueIds: 'cues' },
  },
  cues: {
    fields: {
      phase: phaseSchema,
      label: cueLabelSchema,
      sortOrder: z.number({ error: 'sortOrder must be a number' }).int().min(-1_000_000).max(1_000_000),
      archived: z.boolean({ error: 'archived must be true or false' }),
    },
    required: ['phase', 'label'],
    immutable: new Set(),
    defaults: { sortOrder: 0, archived: false },
    refs: {},
  },
};
