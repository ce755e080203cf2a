/**
 * Clock correction: a device clock that runs far off (a year ahead, say) would win every edit
 * conflict with values stamped from the wrong time. Before a push the engine asks the server's
 * time; past one minute of error the device's clock is moved, and the changes still waiting to be
 * sent are moved by the same amount, so each keeps its place in real time. Changes already sent
 * keep theirs (the server may have applied them).
 *
 * The instants those changes carry move too (the fields marked `instant` in shared/sync-tables.ts:
 * a note's createdAt, a skater's acknowledgedAt), in the op and in the row it wrote here: the
 * server refuses an instant more than a minute after its own clock, so a note taken offline on a
 * phone ten minutes ahead would otherwise be rejected.
 */
import { decodeHlc, encodeHlc } from '../shared/hlc';
import { fieldsOf, pushableTables } from '../shared/sync-tables';
import type { SqlDriver } from './driver';

/** A device clock within a minute of the server's is left alone (the server clamps beyond that). */
export const CLOCK_TOLERANCE_MS = 60_000;

/** Per pushable table: the instant fields and their columns (from the table descriptions). */
const INSTANT_FIELDS = new Map(
  pushableTables.map((table) => [table as string, fieldsOf(table).filter(([, f]) => f.instant).map(([field, f]) => ({ field, column: f.column }))]),
);

export interface ClockContext {
  readonly db: SqlDriver;
  /** One transaction on the store's queue (the device clock is saved with it). */
  tx<T>(work: () => Promise<T>): Promise<T>;
  readonly deviceId: string;
  /** The device's own clock, as it reads (uncorrected). */
  physical(): number;
  /** Server time minus device time, as known so far. */
  offset(): number;
  /** Adopts a new offset and moves the clock by `delta` (inside the correcting transaction). */
  moveClock(offset: number, delta: number): void;
}

/**
 * Measures the device's error against the server's time and, past the tolerance, corrects it.
 * Resolves to the offset in force afterwards.
 *
 * On a shared device this moves the unsent clocks of every user, not only the signed-in one's:
 * the error is the device's, and the offset is kept per device, so a user who signs in later
 * would measure no error any more and their parked changes would keep the wrong time for ever.
 * Nothing else about their changes is touched (not sent, not counted, not shown).
 */
export async function correctClock(ctx: ClockContext, askServer: () => Promise<string>): Promise<number> {
  const { db } = ctx;
  const sentAt = ctx.physical();
  const serverMs = Date.parse(await askServer());
  const receivedAt = ctx.physical();
  if (!Number.isFinite(serverMs)) return ctx.offset();
  const measured = serverMs - (sentAt + receivedAt) / 2;
  const delta = measured - ctx.offset();
  if (Math.abs(delta) <= CLOCK_TOLERANCE_MS) return ctx.offset();
  await ctx.tx(async () => {
    const shift = Math.round(delta);
    const ours = (clock: string | undefined) => clock !== undefined && decodeHlc(clock).node === ctx.deviceId;
    const pending = await db.all<{ seq: number; tbl: string; record_id: string; fields: string; hlc: string }>(
      `SELECT seq, tbl, record_id, fields, hlc FROM outbox WHERE sent_at IS NULL`,
    );
    for (const entry of pending) {
      const clocks = JSON.parse(entry.hlc) as Record<string, string>;
      const moved = Object.fromEntries(
        Object.entries(clocks).map(([field, value]) => {
          const parts = decodeHlc(value);
          // Starting values (clock 0) and values from other devices stay as they are.
          if (parts.wall === 0 || parts.node !== ctx.deviceId) return [field, value];
          return [field, encodeHlc({ ...parts, wall: Math.max(1, parts.wall + shift) })];
        }),
      );
      // An instant this device wrote (its field's clock is this device's, a session's starting
      // clock 0 included: the session was still created here, at the device's wrong time).
      const fields = JSON.parse(entry.fields) as Record<string, unknown>;
      for (const { field, column } of INSTANT_FIELDS.get(entry.tbl) ?? []) {
        const value = fields[field];
        if (typeof value !== 'string' || !ours(clocks[field])) continue;
        const instant = new Date(Date.parse(value) + shift);
        if (!Number.isFinite(instant.getTime())) continue;
        fields[field] = instant.toISOString();
        // The row follows while it still holds the op's value (a pull or a later edit may have replaced it).
        await db.run(`UPDATE ${entry.tbl} SET ${column} = ? WHERE id = ? AND ${column} = ?`, [fields[field] as string, entry.record_id, value]);
      }
      await db.run(`UPDATE outbox SET hlc = ?, fields = ? WHERE seq = ?`, [JSON.stringify(moved), JSON.stringify(fields), entry.seq]);
    }
    const offset = Math.round(measured);
    ctx.moveClock(offset, delta);
    await db.run(`INSERT INTO meta (key, value) VALUES ('clock_offset', ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value`, [String(offset)]);
  });
  return ctx.offset();
}
