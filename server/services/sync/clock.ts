/**
 * The server's side of the hybrid logical clock (shared/hlc.ts, shared/SYNC.md "Conflicts").
 *
 * Incoming clock values more than MAX_CLOCK_LEAD_MS ahead of the server's own time are clamped
 * to now + MAX_CLOCK_LEAD_MS before they are compared or stored, so a device whose clock runs a
 * year ahead cannot win every later conflict. The server clock folds in every (clamped) value it
 * receives and is sent back in each reply; devices fold it into their own clocks.
 *
 * The physical time source can be replaced by tests (setServerTimeSource) to stand for time
 * passing without waiting.
 */
import { decodeHlc, encodeHlc, HybridClock } from '../../../shared/hlc';

export const MAX_CLOCK_LEAD_MS = 60_000;

let physical: () => number = Date.now;

/** Test hook: replace the server's wall clock (pass nothing to restore Date.now). */
export function setServerTimeSource(source?: () => number) {
  physical = source ?? Date.now;
}

export const serverNow = () => physical();

const clock = new HybridClock(`server-${process.pid}`, () => physical());

/** The value to use for `value` on this server: unchanged, or clamped to now + the allowed lead. */
export function clampHlc(value: string, now = serverNow()): string {
  const parts = decodeHlc(value);
  const limit = now + MAX_CLOCK_LEAD_MS;
  return parts.wall > limit ? encodeHlc({ ...parts, wall: limit }) : value;
}

/** Folds a (clamped) received clock value into the server clock. */
export const observeHlc = (value: string) => clock.receive(value);

/** A fresh server clock value for a reply. */
export const serverClock = () => clock.now();
