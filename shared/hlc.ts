/**
 * Hybrid logical clock (HLC) values: wall-clock milliseconds, a counter for events within the
 * same millisecond (or while the wall clock lags a clock already seen), and the node id as the
 * final tie-break. Encoded as fixed-width strings, so string order is clock order and values can
 * be compared in SQL as well as in code. Used per field to decide edit conflicts (newest wins).
 */

export interface HlcParts {
  wall: number;
  counter: number;
  node: string;
}

const WALL_DIGITS = 15;
const COUNTER_DIGITS = 6;
export const MAX_HLC_COUNTER = 10 ** COUNTER_DIGITS - 1;
const MAX_COUNTER = MAX_HLC_COUNTER;
/** The largest wall time a clock value may carry (year 10,000 and beyond is nobody's clock). */
export const MAX_HLC_WALL = 253_402_300_799_999;

export function encodeHlc({ wall, counter, node }: HlcParts): string {
  if (!Number.isSafeInteger(wall) || wall < 0) throw new RangeError(`HLC wall time out of range: ${wall}`);
  if (counter > MAX_COUNTER) throw new RangeError('HLC counter overflow');
  return `${String(wall).padStart(WALL_DIGITS, '0')}-${String(counter).padStart(COUNTER_DIGITS, '0')}-${node}`;
}

export function decodeHlc(value: string): HlcParts {
  const match = /^(\d{15})-(\d{6})-(.+)$/.exec(value);
  if (!match) throw new SyntaxError(`Not an HLC value: ${value}`);
  return { wall: Number(match[1]), counter: Number(match[2]), node: match[3] };
}

export const isHlc = (value: unknown): value is string => typeof value === 'string' && /^\d{15}-\d{6}-.+$/.test(value);

/** A clock for one node. `now()` is strictly increasing; `receive()` folds in a remote value. */
export class HybridClock {
  private wall: number;
  private counter: number;

  constructor(
    readonly node: string,
    private readonly physical: () => number = Date.now,
    last?: string,
  ) {
    const start = last ? decodeHlc(last) : { wall: 0, counter: 0 };
    this.wall = start.wall;
    this.counter = start.counter;
  }

  now(): string {
    const pt = this.physical();
    if (pt > this.wall) {
      this.wall = pt;
      this.counter = 0;
    } else {
      this.counter += 1;
    }
    this.carry();
    return this.current();
  }

  /** Folds a clock value seen from elsewhere (a server reply, a pulled row) into this clock. */
  receive(remote: string): string {
    const r = decodeHlc(remote);
    const pt = this.physical();
    const wall = Math.max(this.wall, r.wall, pt);
    if (wall === this.wall && wall === r.wall) this.counter = Math.max(this.counter, r.counter) + 1;
    else if (wall === this.wall) this.counter += 1;
    else if (wall === r.wall) this.counter = r.counter + 1;
    else this.counter = 0;
    this.wall = wall;
    this.carry();
    return this.current();
  }

  /**
   * A counter past its largest value moves the clock one millisecond on instead of failing: a
   * value with the largest counter (from anywhere) must never leave a clock that cannot tick.
   */
  private carry(): void {
    if (this.counter > MAX_COUNTER) {
      this.wall += 1;
      this.counter = 0;
    }
  }

  current(): string {
    return encodeHlc({ wall: this.wall, counter: this.counter, node: this.node });
  }

  /**
   * Moves the clock by `deltaMs` after the device learned that its wall clock was wrong (a
   * negative delta for a clock that ran ahead). The only way the clock goes back, on purpose:
   * values issued from a wrong wall clock must not keep winning conflicts.
   */
  rebase(deltaMs: number): void {
    this.wall = Math.max(0, this.wall + Math.round(deltaMs));
  }
}
