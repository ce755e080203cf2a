/**
 * Properties of the clock's arithmetic (shared/timing.ts), fast-check with fixed seeds: splits
 * increase and end on the distance, schedules add up to the target exactly with no negative
 * section, formatting never rounds up, and crossings and laps convert into each other exactly.
 */
import fc from 'fast-check';
import {
  distanceLayout,
  formatGap,
  formatRaceTime,
  lapsFromCrossings,
  paceSchedule,
  parseRaceTime,
  points500,
  type Track,
} from '../../shared/timing';

const longDistance = fc.integer({ min: 1, max: 1000 }).map((k) => k * 100);
/** Multiples of 100 m and the junior half-lap distances (222, 333, 444, 777 and 111 m). */
const shortDistance = fc.oneof(longDistance, fc.constantFrom(111, 222, 333, 444, 777));
const race = fc.oneof(
  longDistance.map((distanceM) => ({ distanceM, track: 'long' as Track })),
  shortDistance.map((distanceM) => ({ distanceM, track: 'short' as Track })),
);
/** Targets from 50 to 500 ms per metre: 72 km/h down to 7.2 km/h. */
const withTarget = race.chain((r) =>
  fc.integer({ min: r.distanceM * 50, max: r.distanceM * 500 }).map((targetMs) => ({ ...r, targetMs })),
);

const run = { numRuns: 300 };

describe('distanceLayout (property, fixed seeds)', () => {
  it('splits strictly increase, the last is the distance, no section is empty', () => {
    fc.assert(
      fc.property(race, ({ distanceM, track }) => {
        const { splitsAtM, openerM } = distanceLayout(distanceM, track);
        expect(splitsAtM.length).toBeGreaterThan(0);
        expect(splitsAtM[splitsAtM.length - 1]).toBe(distanceM);
        splitsAtM.forEach((at, i) => expect(at).toBeGreaterThan(i === 0 ? 0 : splitsAtM[i - 1]));
        if (openerM > 0) expect(splitsAtM[0]).toBe(openerM);
      }),
      { ...run, seed: 90_001 },
    );
  });

  it('long track: every section after the opener is a 400 m lap', () => {
    fc.assert(
      fc.property(longDistance, (distanceM) => {
        const { splitsAtM, openerM, laps } = distanceLayout(distanceM, 'long');
        expect(openerM + laps * 400).toBe(distanceM);
        expect(splitsAtM).toHaveLength(laps + (openerM > 0 ? 1 : 0));
        splitsAtM.slice(1).forEach((at, i) => expect(at - splitsAtM[i]).toBe(400));
      }),
      { ...run, seed: 90_002 },
    );
  });
});

describe('paceSchedule (property, fixed seeds)', () => {
  const checkSchedule = (distanceM: number, track: Track, targetMs: number, schedule: ReturnType<typeof paceSchedule>) => {
    const { splitsAtM } = distanceLayout(distanceM, track);
    expect(schedule.map((e) => e.atM)).toEqual(splitsAtM);
    expect(schedule[schedule.length - 1].cumulativeMs).toBe(targetMs);
    expect(schedule.reduce((sum, e) => sum + e.sectionMs, 0)).toBe(targetMs);
    let cumulative = 0;
    for (const e of schedule) {
      expect(Number.isSafeInteger(e.sectionMs)).toBe(true);
      expect(e.sectionMs).toBeGreaterThanOrEqual(0);
      cumulative += e.sectionMs;
      expect(e.cumulativeMs).toBe(cumulative);
    }
  };

  it('even pace sums to the target exactly, every section ≥ 0', () => {
    fc.assert(
      fc.property(withTarget, ({ distanceM, track, targetMs }) => {
        checkSchedule(distanceM, track, targetMs, paceSchedule(distanceM, targetMs, { track }));
      }),
      { ...run, seed: 90_003 },
    );
  });

  it('a fixed opener is kept and the rest still sums to the target', () => {
    const withOpener = withTarget
      .filter(({ distanceM, track }) => distanceLayout(distanceM, track).splitsAtM.length > 1)
      .chain((r) => fc.integer({ min: 1, max: r.targetMs - 1 }).map((openerMs) => ({ ...r, openerMs })));
    fc.assert(
      fc.property(withOpener, ({ distanceM, track, targetMs, openerMs }) => {
        const schedule = paceSchedule(distanceM, targetMs, { track, openerMs });
        checkSchedule(distanceM, track, targetMs, schedule);
        expect(schedule[0].sectionMs).toBe(openerMs);
      }),
      { ...run, seed: 90_004 },
    );
  });

  it('section shares summing to 100 (as floats do) give the target exactly', () => {
    const withShares = withTarget
      .filter(({ distanceM, track }) => distanceLayout(distanceM, track).splitsAtM.length <= 40)
      .chain((r) => {
        const n = distanceLayout(r.distanceM, r.track).splitsAtM.length;
        return fc.array(fc.integer({ min: 1, max: 1000 }), { minLength: n, maxLength: n }).map((weights) => {
          const total = weights.reduce((a, b) => a + b, 0);
          return { ...r, sharesPct: weights.map((w) => (w * 100) / total) };
        });
      });
    fc.assert(
      fc.property(withShares, ({ distanceM, track, targetMs, sharesPct }) => {
        checkSchedule(distanceM, track, targetMs, paceSchedule(distanceM, targetMs, { track, sharesPct }));
      }),
      { ...run, seed: 90_005 },
    );
  });
});

describe('formatting (property, fixed seeds)', () => {
  const ms = fc.integer({ min: 0, max: 100 * 3_600_000 });

  it('formatRaceTime never rounds up: the shown time is ≤ the time and within 10 ms of it', () => {
    fc.assert(
      fc.property(ms, (t) => {
        const shown = parseRaceTime(formatRaceTime(t));
        expect(shown).toBeLessThanOrEqual(t);
        expect(shown).toBeGreaterThan(t - 10);
        expect(shown % 10).toBe(0);
      }),
      { numRuns: 1000, seed: 90_006 },
    );
  });

  it('formatRaceTime keeps order: a later time never shows as earlier', () => {
    fc.assert(
      fc.property(ms, ms, (a, b) => {
        const [lo, hi] = a <= b ? [a, b] : [b, a];
        expect(parseRaceTime(formatRaceTime(lo))).toBeLessThanOrEqual(parseRaceTime(formatRaceTime(hi)));
      }),
      { ...run, seed: 90_007 },
    );
  });

  it('formatGap truncates toward zero: never shows a bigger gap than there is', () => {
    fc.assert(
      fc.property(fc.integer({ min: -3_600_000, max: 3_600_000 }), (gap) => {
        const text = formatGap(gap);
        const sign = text.startsWith('\u2212') ? -1 : 1;
        const shown = sign * parseRaceTime(text.replace(/^[+\u2212]/, ''));
        expect(Math.abs(shown)).toBeLessThanOrEqual(Math.abs(gap));
        expect(Math.abs(shown)).toBeGreaterThan(Math.abs(gap) - 10);
        if (shown !== 0) expect(Math.sign(shown)).toBe(Math.sign(gap));
      }),
      { numRuns: 1000, seed: 90_008 },
    );
  });

  it('points500 is truncated to the thousandth, never rounded up', () => {
    fc.assert(
      fc.property(longDistance, fc.integer({ min: 1, max: 20_000_000 }), (distanceM, t) => {
        const thousandths = Math.round(points500(distanceM, t) * 1000);
        expect(Math.abs(points500(distanceM, t) * 1000 - thousandths)).toBeLessThan(1e-6);
        // thousandths ≤ t × 500 / distance < thousandths + 1, in exact integers.
        expect(BigInt(thousandths) * BigInt(distanceM) <= BigInt(t) * 500n).toBe(true);
        expect((BigInt(thousandths) + 1n) * BigInt(distanceM) > BigInt(t) * 500n).toBe(true);
      }),
      { numRuns: 1000, seed: 90_009 },
    );
  });
});

describe('lapsFromCrossings (property, fixed seeds)', () => {
  it('the sections sum back to the last crossing, and laps → crossings → laps is the identity', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 1, max: 600_000 }), { maxLength: 60 }), (laps) => {
        let t = 0;
        const crossings = laps.map((lap) => (t += lap));
        const back = lapsFromCrossings(crossings);
        expect(back).toEqual(laps);
        expect(back.reduce((a, b) => a + b, 0)).toBe(crossings.length ? crossings[crossings.length - 1] : 0);
      }),
      { ...run, seed: 90_010 },
    );
  });

  it('refuses any list that does not strictly increase', () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 1, max: 600_000 }), { minLength: 2, maxLength: 30 }),
        fc.nat(),
        (values, pick) => {
          const sorted = [...values].sort((a, b) => a - b);
          const i = 1 + (pick % (sorted.length - 1));
          sorted[i] = sorted[i - 1]; // one crossing no later than the one before
          expect(() => lapsFromCrossings(sorted)).toThrow(/must increase/);
        },
      ),
      { ...run, seed: 90_011 },
    );
  });
});
