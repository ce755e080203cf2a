/**
 * What the device store's modules (sync/outbox.ts, sync/tables/*, sync/skater-queries.ts) get from
 * the DeviceStore: the connection, its serial transactions, the corrected time and clock, and the
 * signed-in user's outbox. A small context instead of the class keeps each module to its own
 * table and keeps the store the one place that owns the queue, the clock and the owner.
 */
import { describeIssues } from '../shared/schemas';
import type { SqlDriver, SqlValue } from './driver';

/** A change the store refuses, with a message fit to show the coach. */
export class StoreError extends Error {}

/** The tables the device changes through the outbox. */
export type SyncedTable = 'observations' | 'sessions' | 'cues' | 'runs' | 'crossings' | 'targets';

/** One clock value per changed field (a delete's under "deleted"). */
export type FieldClocks = Record<string, string>;

/** An SQL condition limiting outbox rows to one user's (empty when the store is not scoped). */
export interface OwnerFilter {
  sql: string;
  params: SqlValue[];
}

/** A local change to queue: written to the outbox in the caller's transaction. */
export interface NewOp {
  teamId: string;
  userId: string;
  table: SyncedTable;
  recordId: string;
  kind: 'upsert' | 'delete';
  fields: Record<string, unknown>;
  hlc: string;
  /** The values the edit replaces (kept as the server's value until the edit is acknowledged). */
  previous?: Record<string, unknown>;
}

export interface StoreContext {
  readonly db: SqlDriver;
  /** One device transaction on the store's serial queue; the device clock is saved with it. */
  tx<T>(work: () => Promise<T>): Promise<T>;
  /** Device time corrected by the server's, in ms: for instants and the rink day. */
  now(): number;
  /**
   * A moment read from the device's own clock elsewhere (Date.now(), an event's time), corrected
   * the same way, so an instant a screen hands in is in the server's time like the store's own.
   */
  fromDeviceClock(ms: number): number;
  /** The next clock value of this device (strictly increasing). */
  tick(): string;
  /** This device's id (the node of its clock values). */
  readonly deviceId: string;
  /** The outbox condition for the user the store is open for. */
  mine(): OwnerFilter;
  /** Changes are made by the user the store is open for, or by nobody: throws otherwise. */
  assertWriter(userId: string): void;
  /** Queues a change (after assertWriter); resolves to the per-field clocks it carries. */
  enqueue(op: NewOp): Promise<FieldClocks>;
  /**
   * Sessions already queued or synced, so a tap need not check again. The store clears it
   * whenever sync or a refused change may have dropped or re-created session rows or entries.
   */
  readonly sessionsQueued: Set<string>;
}

type Parser = { safeParse: (v: unknown) => { success: boolean; data?: unknown; error?: { issues: { path: PropertyKey[]; message: string }[] } } };

/** Parses a coach's input, or refuses it with the schema's message. */
export function validate<T>(schema: Parser, value: unknown): T {
  const result = schema.safeParse(value);
  if (!result.success) throw new StoreError(describeIssues(result.error!.issues).message);
  return result.data as T;
}
