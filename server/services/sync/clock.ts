/**
 * The server's side of the hybrid logical clock (shared/hlc.ts, shared/SYNC.md "Conflicts").
 *
 * - Each clock value an op carries is checked first (`clockProblem`): a counter beyond what any
 *   device reaches, a wall time past year 9999 or a malformed node refuses that op, before the
 *   value touches any clock.
 * - Values more than MAX_CLOCK_LEAD_MS ahead of the server's time are clamped to that limit
 *   (`clampBatch`), so a device whose clock runs a year ahead cannot win every later conflict.
 *   Clamped values keep their order among themselves (and after earlier clamped values of the
 *   team): two edits of one field in one batch from a device far ahead still end with the later.
 * - Every team has its own clock, which folds in the values the team's applied ops carried and is
 *   sent back in the team's replies. One team's input never moves another team's clock.
 *
 * The physical time source can be replaced by tests (setServerTimeSource).
 */
import { decodeHlc, encodeHlc, HybridClock, isHlc, MAX_HLC_WALL } from '../../../shared/hlc';

export const MAX_CLOCK_LEAD_MS = 60_000;
/**
 * The largest counter a pushed value may carry. A device's counter counts events within one
 * millisecond (or while its wall clock lags); tens of thousands is already far beyond real use.
 */
export const MAX_ACCEPTED_COUNTER = 65_535;
const NODE = /^[A-Za-z0-9._:-]{1,64}$/;

let physical: () => number = Date.now;

/** Test hook: replace the server's wall clock (pass nothing to restore Date.now). */
export function setServerTimeSource(source?: () => number) {
  physical = source ?? Date.now;
}

export const serverNow = () => physical();

const clocks = new Map<string, HybridClock>();
/** The last clamped value handed out per team: the next clamped value is after it. */
const lastClamp = new Map<string, { wall: number; counter: number }>();

function teamClock(teamId: string): HybridClock {
  let clock = clocks.get(teamId);
  if (!clock) {
    clock = new HybridClock(`server-${process.pid}`, () => physical());
    clocks.set(teamId, clock);
  }
  return clock;
}

/** Why a pushed clock value cannot be used, or null when it can. */
export function clockProblem(value: string): string | null {
  if (!isHlc(value)) return 'not a clock value (wall-counter-node)';
  const { wall, counter, node } = decodeHlc(value);
  if (wall > MAX_HLC_WALL) return 'the clock value is beyond any real date';
  if (counter > MAX_ACCEPTED_COUNTER) return `the clock value's counter is over ${MAX_ACCEPTED_COUNTER}`;
  if (!NODE.test(node)) return "the clock value's device id must be 1-64 letters, digits or . _ : -";
  return null;
}

/**
 * The values to use for `values` on this server: unchanged when within the allowed lead, else
 * clamped to now + the lead, keeping the order they had among themselves.
 */
export function clampBatch(teamId: string, values: Iterable<string>, now = serverNow()): Map<string, string> {
  const limit = now + MAX_CLOCK_LEAD_MS;
  const result = new Map<string, string>();
  const ahead: string[] = [];
  for (const value of new Set(values)) {
    if (decodeHlc(value).wall > limit) ahead.push(value);
    else result.set(value, value);
  }
  if (ahead.length === 0) return result;
  ahead.sort();
  const last = lastClamp.get(teamId);
  let wall = limit;
  let counter = 0;
  if (last && last.wall >= limit) {
    wall = last.wall;
    counter = last.counter + 1;
  }
  for (const value of ahead) {
    if (counter > MAX_ACCEPTED_COUNTER) {
      wall += 1;
      counter = 0;
    }
    result.set(value, encodeHlc({ wall, counter, node: decodeHlc(value).node }));
    counter += 1;
  }
  lastClamp.set(teamId, { wall, counter: counter - 1 });
  return result;
}

/** Folds a (checked and clamped) clock value from an applied op into the team's clock. */
export const observeHlc = (teamId: string, value: string) => teamClock(teamId).receive(value);

/** A fresh value of the team's clock, for a reply. */
export const serverClock = (teamId: string) => teamClock(teamId).now();

/**
 * For /api/health: how far the furthest team clock runs ahead of real time. A clock more than
 * the allowed lead (and a second of slack) ahead would stamp replies from the future: not ok.
 */
export function clockHealth(): { ok: boolean; teams: number; maxLeadMs: number } {
  const now = physical();
  let maxLeadMs = 0;
  for (const clock of clocks.values()) maxLeadMs = Math.max(maxLeadMs, decodeHlc(clock.current()).wall - now);
  return { ok: maxLeadMs <= MAX_CLOCK_LEAD_MS + 1000, teams: clocks.size, maxLeadMs };
}
