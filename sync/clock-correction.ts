/**
 * Clock correction: a device clock that runs far off (a year ahead, say) would win every edit
 * conflict with values stamped from the wrong time. Before a push the engine asks the server's
 * time; past one minute of error the device's clock is moved, and the changes still waiting to be
 * sent are moved by the same amount, so each keeps its place in real time. Changes already sent
 * keep theirs (the server may have applied them).
 */
import { decodeHlc, encodeHlc } from '../shared/hlc';
import type { SqlDriver } from './driver';

/** A device clock within a minute of the server's is left alone (the server clamps beyond that). */
export const CLOCK_TOLERANCE_MS = 60_000;

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
    const pending = await db.all<{ seq: number; hlc: string }>(`SELECT seq, hlc FROM outbox WHERE sent_at IS NULL`);
    for (const entry of pending) {
      const moved = Object.fromEntries(
        Object.entries(JSON.parse(entry.hlc) as Record<string, string>).map(([field, value]) => {
          const parts = decodeHlc(value);
          // Starting values (clock 0) and values from other devices stay as they are.
          if (parts.wall === 0 || parts.node !== ctx.deviceId) return [field, value];
          return [field, encodeHlc({ ...parts, wall: Math.max(1, Math.round(parts.wall + delta)) })];
        }),
      );
      await db.run(`UPDATE outbox SET hlc = ? WHERE seq = ?`, [JSON.stringify(moved), entry.seq]);
    }
    const offset = Math.round(measured);
    ctx.moveClock(offset, delta);
    await db.run(`INSERT INTO meta (key, value) VALUES ('clock_offset', ?) ON CONFLICT (key) DO UPDATE SET value = excluded.value`, [String(offset)]);
  });
  return ctx.offset();
}
