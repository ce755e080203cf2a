/**
 * The sync protocol between the device and the server (see ../shared/SYNC.md): the push body and
 * its per-op answers, and the pull page. Both sides parse with these; `.strict()` everywhere so an
 * unexpected field is refused rather than silently dropped.
 */
import { z } from 'zod';
import { isHlc } from '../hlc';
import { pushableTables, syncTableNames, type SyncTableName } from '../sync-tables';

export const SYNC_PUSH_MAX_OPS = 500;
export const SYNC_PULL_MAX_LIMIT = 1000;
/** Tombstones are kept this long; a cursor older than that must re-sync from scratch (410). */
export const TOMBSTONE_RETENTION_DAYS = 180;

/** Tables the device may change through push. Skaters and groups only flow down (pull). */
export const pushTables = pushableTables;
export const pushTableSchema = z.enum(pushTables as [SyncTableName, ...SyncTableName[]], {
  error: `table must be one of: ${pushTables.join(', ')}`,
});
export type PushTable = SyncTableName;

export const pullTables = syncTableNames;
export type PullTable = SyncTableName;

export const hlcSchema = z.string().refine(isHlc, { error: 'not a clock value (wall-counter-node)' }).max(120);

export const opSchema = z
  .object({
    opId: z.uuid({ error: 'opId must be a UUID' }),
    table: pushTableSchema,
    recordId: z.uuid({ error: 'recordId must be a UUID' }),
    kind: z.enum(['upsert', 'delete'], { error: 'kind must be upsert or delete' }),
    /** The changed fields (all of them for a new record); validated per table on the server. */
    fields: z
      .unknown()
      // A "__proto__" key would be dropped by the parse below (it sets a prototype instead of a
      // field): refuse it rather than apply an op missing a field its sender meant.
      .refine((value) => !(value && typeof value === 'object' && Object.prototype.hasOwnProperty.call(value, '__proto__')), {
        error: 'a field cannot be named __proto__',
      })
      .pipe(z.record(z.string(), z.unknown())),
    /** One clock value per changed field (a delete carries one under "deleted"). */
    hlc: z.record(z.string(), hlcSchema),
  })
  .strict();
export type Op = z.infer<typeof opSchema>;

export const pushBodySchema = z
  .object({
    clientId: z.uuid({ error: 'clientId must be a UUID' }),
    teamId: z.uuid({ error: 'teamId must be a UUID' }),
    ops: z.array(opSchema).min(1, 'ops must not be empty').max(SYNC_PUSH_MAX_OPS, `at most ${SYNC_PUSH_MAX_OPS} ops per push`),
  })
  .strict();
export type PushBody = z.infer<typeof pushBodySchema>;

export const opResultSchema = z.object({
  opId: z.uuid(),
  status: z.enum(['applied', 'duplicate', 'rejected']),
  /**
   * For rejected ops, with a sentence for the coach: validation (a value, a clock value or the
   * database refused it), permission, unknown_record, or conflict (the op id is another user's).
   */
  reason: z.enum(['validation', 'permission', 'unknown_record', 'conflict']).optional(),
  message: z.string().optional(),
});
export type OpResult = z.infer<typeof opResultSchema>;

export const pushReplySchema = z.object({
  results: z.array(opResultSchema),
  /** The server's clock: devices fold it into their own so their next edits order after it. */
  serverClock: hlcSchema,
  serverTime: z.string(),
});
export type PushReply = z.infer<typeof pushReplySchema>;

export const changeSchema = z.object({
  table: z.enum(pullTables as [SyncTableName, ...SyncTableName[]]),
  id: z.uuid(),
  serverSeq: z.number().int(),
  fields: z.record(z.string(), z.unknown()),
});
export type Change = z.infer<typeof changeSchema>;

export const tombstoneSchema = z.object({ table: z.enum(pullTables as [SyncTableName, ...SyncTableName[]]), id: z.uuid(), serverSeq: z.number().int() });
export type Tombstone = z.infer<typeof tombstoneSchema>;

export const pullReplySchema = z.object({
  changes: z.array(changeSchema),
  tombstones: z.array(tombstoneSchema),
  /** Records this caller may no longer see (e.g. a note made private): remove them locally. */
  evictions: z.array(z.object({ table: z.enum(pullTables as [SyncTableName, ...SyncTableName[]]), id: z.uuid() })),
  nextCursor: z.number().int(),
  hasMore: z.boolean(),
  remaining: z.number().int(),
  serverClock: hlcSchema,
  serverTime: z.string(),
});
export type PullReply = z.infer<typeof pullReplySchema>;

export const pullQuerySchema = z
  .object({
    teamId: z.uuid({ error: 'teamId must be a UUID' }),
    cursor: z.coerce.number({ error: 'cursor must be a number' }).int().min(0, 'cursor must be 0 or more').default(0),
    limit: z.coerce
      .number({ error: 'limit must be a number' })
      .int()
      .min(1, 'limit must be at least 1')
      .max(SYNC_PULL_MAX_LIMIT, `limit must be at most ${SYNC_PULL_MAX_LIMIT}`)
      .default(SYNC_PULL_MAX_LIMIT),
  })
  .strict();
