/**
 * The clock's arithmetic (shared/timing.ts), table-driven. Each row names where its expected
 * value comes from: the ISU Special Regulations & Technical Rules (speed skating / short track)
 * for layouts, lap lengths and the truncation rule, published results and pacing studies, plain
 * kinematics, or "common practice" / "from memory" where that is all it is.
 */
import {
  consistency,
  distanceLayout,
  fadeMs,
  formatGap,
  formatRaceTime,
  gunSoundDelayMs,
  lapsFromCrossings,
  lapsToGo,
  numberWords,
  oneLaneLapM,
  paceSchedule,
  parseRaceTime,
  points500,
  runResult,
  predictFinishMs,
  PUBLISHED_1500_PROFILE,
  speakSplit,
  speedKmh,
  splitGapMs,
  splitTable,
  spokenGap,
  spokenTime,
  type Track,
} from '../../shared/timing';

const ISU_LT = 'ISU SR&TR Speed Skating (from memory): fixed finish line, 400 m laps, part lap first';
const ISU_ST = 'ISU SR&TR Short Track (from memory): 111.12 m lap, start lines at whole half laps';
const ISU_TRUNC = 'ISU SR&TR (from memory): times in hundredths, thousandths cut off, never rounded';
const KINEMATICS = 'plain kinematics: km/h = m / s × 3.6';
const SAMALOG = 'samalog rule: s × 500 / distance, 3 decimals, truncated (Wikipedia "Samalog")';

describe('distanceLayout', () => {
  it.each<[number, Track, number, number, number[] | { length: number; first: number }, string]>([
    [500, 'long', 100, 1, [100, 500], `${ISU_LT}: 500 m = 100 m + 1 lap`],
    [1000, 'long', 200, 2, [200, 600, 1000], `${ISU_LT}: 1000 m = 200 m + 2 laps`],
    [1500, 'long', 300, 3, [300, 700, 1100, 1500], 'issue #9; Muehlbauer, Schindler & Panzer 2010, Res Q Exerc Sport 81(1): first 300 m + three 400 m laps'],
    [3000, 'long', 200, 7, [200, 600, 1000, 1400, 1800, 2200, 2600, 3000], `${ISU_LT}: 3000 m = 200 m + 7 laps`],
    [5000, 'long', 200, 12, { length: 13, first: 200 }, `${ISU_LT}: 5000 m = 200 m + 12 laps`],
    [10000, 'long', 0, 25, { length: 25, first: 400 }, 'issue #9: 10000 → opener 0, 25 laps, 25 entries'],
    [400, 'long', 0, 1, [400], `${ISU_LT}: whole laps, no opener`],
    [100, 'long', 100, 0, [100], 'arithmetic of the rule: 100 mod 400 = 100, no full lap'],
    [500, 'short', 55.56, 4.5, [55.56, 166.67, 277.78, 388.89, 500], `issue #9 (4.5 laps); ${ISU_ST}`],
    [1000, 'short', 0, 9, { length: 9, first: 111.11 }, `issue #9 (9 laps); ${ISU_ST}`],
    [1500, 'short', 55.56, 13.5, { length: 14, first: 55.56 }, `issue #9 (13.5 laps); ${ISU_ST}`],
    [3000, 'short', 0, 27, { length: 27, first: 111.11 }, `${ISU_ST}: 3000 m = 27 laps`],
    [5000, 'short', 0, 45, { length: 45, first: 111.11 }, `${ISU_ST}: relay 5000 m = 45 laps`],
    [777, 'short', 0, 7, [111, 222, 333, 444, 555, 666, 777], 'from memory: 777 m junior short-track distance = 7 laps'],
    [333, 'short', 0, 3, [111, 222, 333], 'from memory: 333 m junior short-track distance = 3 laps'],
    [400, 'short', 66.64, 3.6, [66.64, 177.76, 288.88, 400], 'our rule for training distances: real 111.12 m laps after the part lap (400 − 3 × 111.12)'],
  ])('%i m %s track: opener %d m, %d laps (%#)', (distance, track, openerM, laps, splits, source) => {
    expect(source).not.toBe('');
    const layout = distanceLayout(distance, track);
    expect(layout.openerM).toBe(openerM);
    expect(layout.laps).toBe(laps);
    if (Array.isArray(splits)) {
      expect(layout.splitsAtM).toEqual(splits);
    } else {
      expect(layout.splitsAtM).toHaveLength(splits.length);
      expect(layout.splitsAtM[0]).toBe(splits.first);
    }
    expect(layout.splitsAtM[layout.splitsAtM.length - 1]).toBe(distance);
  });

  it.each<[number, Track, RegExp, string]>([
    [450, 'long', /positive multiple of 100 m on long track \(got 450\)/, 'issue #9'],
    [0, 'long', /must be positive \(got 0\)/, 'issue #9'],
    [-500, 'long', /must be positive/, 'issue #9'],
    [NaN, 'long', /finite number of metres \(got NaN\)/, 'issue #9'],
    [Infinity, 'short', /finite number of metres/, 'issue #9'],
    [100_100, 'long', /at most 100000 m \(100 km\)/, 'issue #9: over 100 km'],
    [250, 'short', /multiple of 100 m or a whole number of half laps/, 'our short-track rule'],
    [500.5, 'short', /whole metres/, 'our short-track rule'],
  ])('%d m %s track is refused (%#)', (distance, track, message, source) => {
    expect(source).not.toBe('');
    expect(() => distanceLayout(distance, track)).toThrow(RangeError);
    expect(() => distanceLayout(distance, track)).toThrow(message);
  });

  it('refuses a track that is neither long nor short', () => {
    expect(() => distanceLayout(500, 'medium' as Track)).toThrow(/track must be 'long' or 'short' \(got "medium"\)/);
  });

  it('accepts exactly 100 km', () => {
    expect(distanceLayout(100_000, 'long').splitsAtM).toHaveLength(250);
  });
});

describe('speedKmh', () => {
  it.each<[number, number, number, string]>([
    [400, 30_000, 48, KINEMATICS],
    [500, 36_000, 50, KINEMATICS],
    [1000, 72_000, 50, KINEMATICS],
    [100, 10_000, 36, KINEMATICS],
    [1500, 108_000, 50, KINEMATICS],
    [111.12, 8_000, 50.004, KINEMATICS],
    [10_000, 780_000, 46.15384615, KINEMATICS],
  ])('%d m in %i ms → %d km/h (%#)', (distance, ms, kmh, source) => {
    expect(source).not.toBe('');
    expect(speedKmh(distance, ms)).toBeCloseTo(kmh, 7);
  });

  it.each([
    [400, 0, /ms must be a positive whole number/],
    [400, 1.5, /ms must be a positive whole number/],
    [0, 30_000, /distanceM must be a positive finite/],
    [NaN, 30_000, /distanceM must be a positive finite/],
  ])('speedKmh(%d, %d) is refused', (distance, ms, message) => {
    expect(() => speedKmh(distance, ms)).toThrow(message);
  });
});

describe('formatRaceTime', () => {
  it.each<[number, string, string]>([
    [105_009, '1:45.00', `issue #9; ${ISU_TRUNC}`],
    [33_619, '33.61', `issue #9; ${ISU_TRUNC}`],
    [34_999, '34.99', ISU_TRUNC],
    [0, '0.00', 'common practice'],
    [9_999, '9.99', ISU_TRUNC],
    [59_999, '59.99', `${ISU_TRUNC}; no leading minute under 60 s (issue #9)`],
    [60_000, '1:00.00', 'common practice'],
    [612_345, '10:12.34', ISU_TRUNC],
    [3_599_999, '59:59.99', ISU_TRUNC],
    [3_723_450, '1:02:03.45', 'issue #9: hours when needed'],
    [36_000_000, '10:00:00.00', 'common practice'],
  ])('%i ms → %s (%#)', (ms, text, source) => {
    expect(source).not.toBe('');
    expect(formatRaceTime(ms)).toBe(text);
  });

  it.each([[-1], [1.5], [NaN], [Infinity], [2 ** 53]])('refuses %d', (ms) => {
    expect(() => formatRaceTime(ms)).toThrow(/ms must be a non-negative whole number of milliseconds/);
  });
});

describe('parseRaceTime', () => {
  it.each<[string, number]>([
    ['33.61', 33_610],
    ['1:45.00', 105_000],
    ['1:02:03.45', 3_723_450],
    ['1:45', 105_000],
    ['33.6', 33_600],
    ['33,615', 33_615],
    [' 9.99 ', 9_990],
    ['75.3', 75_300],
  ])('%s → %i ms', (text, ms) => {
    expect(parseRaceTime(text)).toBe(ms);
  });

  it.each(['', '1:75.00', '1:5.00', '1:2:03.45', 'abc', '33.6161', '-1.00', '1:02:03:04'])('refuses %j', (text) => {
    expect(() => parseRaceTime(text)).toThrow(/not a race time/);
  });
});

describe('formatGap', () => {
  it.each<[number, string, string]>([
    [300, '+0.30', 'issue #9: +/- in hundredths'],
    [-129, '\u22120.12', 'truncated toward zero, true minus sign (our choice)'],
    [309, '+0.30', 'truncated toward zero'],
    [-9, '0.00', 'under a hundredth: no sign (our choice)'],
    [0, '0.00', 'common practice'],
    [62_309, '+1:02.30', 'minutes when needed'],
  ])('%i ms → %s (%#)', (ms, text, source) => {
    expect(source).not.toBe('');
    expect(formatGap(ms)).toBe(text);
  });
});

describe('points500', () => {
  it.each<[number, number, number, string]>([
    [500, 35_000, 35, `${SAMALOG}: 500 m points = the time`],
    [1000, 70_000, 35, SAMALOG],
    [1500, 110_000, 36.666, `${SAMALOG}: 36.6666… truncated, not 36.667`],
    [5000, 390_000, 39, SAMALOG],
    [10_000, 810_000, 40.5, SAMALOG],
    [500, 37_510, 37.51, 'Wikipedia "Samalog", Adelskalender example (Klassen 500 m 37.51)'],
    [1500, 111_790, 37.263, 'Wikipedia "Samalog", Adelskalender example (Klassen 1500 m 1:51.79)'],
    [3000, 233_340, 38.89, 'Wikipedia "Samalog", Adelskalender example (Klassen 3000 m 3:53.34)'],
    [5000, 408_970, 40.897, 'Wikipedia "Samalog", Adelskalender example (Klassen 5000 m 6:48.97)'],
    [1500, 102_560, 34.186, 'Wikipedia "Samalog" (Roest 1500 m 1:42.56): 34.1866…, the published total needs the truncated 34.186'],
    [10_000, 767_890, 38.394, 'Wikipedia "Samalog" (Roest 10000 m 12:47.89): 38.3945, the published total needs the truncated 38.394'],
  ])('%i m in %i ms → %d points (%#)', (distance, ms, points, source) => {
    expect(source).not.toBe('');
    expect(points500(distance, ms)).toBe(points);
  });

  it.each<[string, [number, number][], number]>([
    ['Klassen', [[500, 37_510], [1500, 111_790], [3000, 233_340], [5000, 408_970]], 154_560],
    ['Roest', [[500, 35_740], [1500, 102_560], [5000, 363_700], [10_000, 767_890]], 144_690],
  ])('%s: the published Adelskalender total adds up from truncated points (Wikipedia "Samalog")', (_name, races, totalThousandths) => {
    const total = races.reduce((sum, [d, ms]) => sum + Math.round(points500(d, ms) * 1000), 0);
    expect(total).toBe(totalThousandths);
  });

  it.each([
    [1500, 0, /ms must be a positive whole number/],
    [1500, -1, /ms must be a positive whole number/],
    [0, 110_000, /distanceM must be positive/],
    [1500.5, 110_000, /whole metres/],
  ])('points500(%d, %d) is refused', (distance, ms, message) => {
    expect(() => points500(distance, ms)).toThrow(message);
  });
});

describe('oneLaneLapM', () => {
  const ONE_LANE = 'ISU SR&TR Speed Skating (from memory): race lap = 2 straights + 1 inner + 1 outer bend = 400 m, measured 0.5 m inside each lane; semicircle bends differ by π·w';
  it.each<['inner' | 'outer', number | undefined, number, string]>([
    ['inner', undefined, 387.43, `${ONE_LANE}; 4 m lanes by default`],
    ['outer', undefined, 412.57, `${ONE_LANE}; 4 m lanes by default`],
    ['inner', 4, 400 - 4 * Math.PI, ONE_LANE],
    ['outer', 3, 400 + 3 * Math.PI, `${ONE_LANE} (the rules allow narrower outer lanes on older tracks, from memory)`],
    ['inner', 3, 390.58, ONE_LANE],
  ])('%s lane, width %s → %d m (%#)', (lane, width, metres, source) => {
    expect(source).not.toBe('');
    expect(oneLaneLapM(lane, width)).toBeCloseTo(metres, 2);
  });

  it('the inner and outer one-lane laps average the 400 m race lap', () => {
    expect((oneLaneLapM('inner') + oneLaneLapM('outer')) / 2).toBeCloseTo(400, 10);
  });

  it.each([
    ['middle', 4, /lane must be 'inner' or 'outer'/],
    ['inner', 0, /laneWidthM must be/],
    ['inner', -4, /laneWidthM must be/],
    ['outer', NaN, /laneWidthM must be/],
  ])('oneLaneLapM(%s, %d) is refused', (lane, width, message) => {
    expect(() => oneLaneLapM(lane as 'inner', width)).toThrow(message);
  });
});

describe('paceSchedule', () => {
  const sections = (entries: { sectionMs: number }[]) => entries.map((e) => e.sectionMs);

  it.each<[number, number, Parameters<typeof paceSchedule>[2], number[], string]>([
    [1500, 110_000, {}, [22_000, 29_333, 29_333, 29_334], 'common practice: even pace per metre; remainder in the last (issue #9)'],
    [1500, 110_000, { openerMs: 25_000 }, [25_000, 28_333, 28_333, 28_334], 'common practice: fixed opener, then even laps'],
    [1000, 70_000, {}, [14_000, 28_000, 28_000], 'common practice: even pace per metre'],
    [500, 36_000, { openerMs: 10_400 }, [10_400, 25_600], 'common practice: 100 m opener + one lap'],
    [10_000, 780_000, { openerMs: 33_000 }, [33_000, ...Array<number>(24).fill(31_125)], 'common practice: no part lap, the first (standing-start) lap is the fixed one'],
    [500, 42_000, { track: 'short' }, [4_667, 9_333, 9_333, 9_333, 9_334], `${ISU_ST}; even pace: the half-lap opener gets half a lap's time`],
    [
      1500,
      110_000,
      { sharesPct: PUBLISHED_1500_PROFILE.sharesPct },
      [24_310, 27_060, 28_820, 29_810],
      'Wiersma et al. 2017, Int J Sports Physiol Perform 12(9): elite U19 1500 m 22.1 / 24.6 / 26.2 % (last = remainder 27.1 %)',
    ],
    [1500, 100_000, { sharesPct: [22, 25, 26, 26.99] }, [22_000, 25_000, 26_000, 27_000], 'issue #9: shares within 100 ± 0.01; remainder goes to the last'],
    [400, 30_000, {}, [30_000], 'one section: the target itself'],
  ])('%i m in %i ms with %j (%#)', (distance, target, opts, expected, source) => {
    expect(source).not.toBe('');
    const schedule = paceSchedule(distance, target, opts);
    expect(sections(schedule)).toEqual(expected);
    expect(schedule.map((e) => e.atM)).toEqual(distanceLayout(distance, opts?.track ?? 'long').splitsAtM);
    expect(schedule[schedule.length - 1].cumulativeMs).toBe(target);
  });

  it('never leaves a negative section when an opener takes nearly the whole target (found by fast-check)', () => {
    const schedule = paceSchedule(8600, 1_677_033, { openerMs: 1_676_994 }); // 39 ms over 21 laps
    expect(schedule[0].sectionMs).toBe(1_676_994);
    expect(schedule.every((e) => e.sectionMs >= 0)).toBe(true);
    expect(schedule.slice(1).map((e) => e.sectionMs).reduce((a, b) => a + b, 0)).toBe(39);
    expect(schedule[schedule.length - 1].cumulativeMs).toBe(1_677_033);
  });

  it('cumulative times are the running sums of the sections', () => {
    expect(paceSchedule(1500, 110_000, { openerMs: 25_000 }).map((e) => e.cumulativeMs)).toEqual([25_000, 53_333, 81_666, 110_000]);
  });

  it.each<[number, number, Parameters<typeof paceSchedule>[2], RegExp]>([
    [1500, 110_000, { sharesPct: [22, 25, 26, 26.9] }, /sum to 100 ± 0.01 \(got 99.9\)/],
    [1500, 110_000, { sharesPct: [25, 25, 50] }, /one share per section: 4 for 1500 m long track \(got 3\)/],
    [1500, 110_000, { sharesPct: [25, 25, 50, 0] }, /sharesPct\[3\] must be a positive finite percentage/],
    [1500, 110_000, { sharesPct: [25, 25, 50, NaN] }, /sharesPct\[3\] must be a positive finite percentage/],
    [1500, 110_000, { openerMs: 25_000, sharesPct: [25, 25, 25, 25] }, /either openerMs or sharesPct, not both/],
    [1500, 110_000, { openerMs: 110_000 }, /openerMs \(110000\) must be less than targetMs/],
    [1500, 110_000, { openerMs: 0 }, /openerMs must be a positive whole number/],
    [400, 30_000, { openerMs: 10_000 }, /single section: openerMs must equal targetMs/],
    [1500, 0, {}, /targetMs must be a positive whole number/],
    [1500, 1.5, {}, /targetMs must be a positive whole number/],
    [450, 30_000, {}, /positive multiple of 100 m/],
  ])('paceSchedule(%i, %d, %j) is refused', (distance, target, opts, message) => {
    expect(() => paceSchedule(distance, target, opts)).toThrow(RangeError);
    expect(() => paceSchedule(distance, target, opts)).toThrow(message);
  });

  it('the published profile has one share per 1500 m section and sums to 100', () => {
    expect(PUBLISHED_1500_PROFILE.sharesPct).toHaveLength(distanceLayout(1500, 'long').splitsAtM.length);
    expect(PUBLISHED_1500_PROFILE.sharesPct.reduce((a, b) => a + b, 0)).toBeCloseTo(100, 9);
  });
});

describe('lapsFromCrossings', () => {
  it.each<[number[], number[], string]>([
    [[24_310, 51_370, 80_190, 110_000], [24_310, 27_060, 28_820, 29_810], 'arithmetic: section = crossing − previous crossing, first from the gun'],
    [[10_400, 36_000], [10_400, 25_600], 'arithmetic'],
    [[], [], 'no crossings yet'],
  ])('%j → %j (%#)', (crossings, laps, source) => {
    expect(source).not.toBe('');
    expect(lapsFromCrossings(crossings)).toEqual(laps);
  });

  it.each<[number[], RegExp]>([
    [[1000, 1000], /crossingsMs\[1\] \(1000\) must be after crossingsMs\[0\] \(1000\): crossings must increase/],
    [[2000, 1500], /crossingsMs\[1\] \(1500\) must be after/],
    [[0], /crossingsMs\[0\] must be after the gun/],
    [[-5], /crossingsMs\[0\] must be a non-negative whole number/],
    [[1000, 1500.5], /crossingsMs\[1\] must be a non-negative whole number/],
  ])('%j is refused', (crossings, message) => {
    expect(() => lapsFromCrossings(crossings)).toThrow(message);
  });
});

describe('live figures', () => {
  const layout = distanceLayout(1500, 'long');
  const schedule = paceSchedule(1500, 114_000, { openerMs: 25_000 }); // laps 29667, 29667, 29666
  const crossings = [25_000, 54_870, 84_670, 114_870];

  it('splitGapMs: elapsed minus planned, positive behind', () => {
    expect(schedule.map((e) => e.cumulativeMs)).toEqual([25_000, 54_667, 84_334, 114_000]);
    expect(splitGapMs(schedule, 1, 54_870)).toBe(203);
    expect(splitGapMs(schedule, 2, 84_000)).toBe(-334);
    expect(() => splitGapMs(schedule, 4, 1)).toThrow(/crossingIndex must be 0 to 3/);
    expect(() => splitGapMs(schedule, 0, -1)).toThrow(/elapsedMs must be a non-negative/);
  });

  it('predictFinishMs with a schedule: the target plus the current gap', () => {
    expect(predictFinishMs(layout.splitsAtM, [], schedule)).toBeNull();
    expect(predictFinishMs(layout.splitsAtM, crossings.slice(0, 1), schedule)).toBe(114_000);
    expect(predictFinishMs(layout.splitsAtM, crossings.slice(0, 3), schedule)).toBe(114_000 + 336);
    expect(predictFinishMs(layout.splitsAtM, crossings, schedule)).toBe(114_870);
  });

  it('predictFinishMs without a schedule: the remaining metres at the last section pace', () => {
    expect(predictFinishMs(layout.splitsAtM, crossings.slice(0, 1))).toBeNull();
    // 700 m at 54.87 s, last lap 29.87 s for 400 m, 800 m to go → 54.87 + 2 × 29.87.
    expect(predictFinishMs(layout.splitsAtM, crossings.slice(0, 2))).toBe(114_610);
    expect(() => predictFinishMs(layout.splitsAtM, [...crossings, 130_000])).toThrow(/5 crossings for a distance with 4 splits/);
    expect(() => predictFinishMs(layout.splitsAtM, crossings, schedule.slice(1))).toThrow(/schedule has 3 entries for 4 splits/);
  });

  it('consistency and fade leave out the opener', () => {
    const laps = [25_000, 29_870, 29_800, 30_200];
    expect(consistency(laps)).toEqual({
      laps: 3,
      meanMs: 29_957,
      spreadMs: 400,
      sdMs: 174,
      cvPct: expect.closeTo(0.5822, 3),
    });
    expect(fadeMs(laps)).toBe(400);
    expect(consistency([25_000, 29_870])).toBeNull();
    expect(fadeMs([25_000, 29_870])).toBeNull();
    expect(fadeMs([10_000, 30_000, 29_000, 29_000])).toBe(0);
    expect(() => consistency([25_000, 0, 1])).toThrow(/lapsMs\[1\] must be positive/);
  });

  it('lapsToGo counts the crossings still to come', () => {
    expect(lapsToGo(layout.splitsAtM, 0)).toBe(4);
    expect(lapsToGo(layout.splitsAtM, 1)).toBe(3);
    expect(lapsToGo(layout.splitsAtM, 5)).toBe(0);
    expect(() => lapsToGo(layout.splitsAtM, -1)).toThrow(/crossingsDone/);
  });

  it('splitTable gives every lap and split with km/h and the gap', () => {
    const rows = splitTable(layout.splitsAtM, crossings, schedule);
    expect(rows.map((r) => [r.atM, r.sectionM, r.sectionMs, r.splitMs, r.gapMs])).toEqual([
      [300, 300, 25_000, 25_000, 0],
      [700, 400, 29_870, 54_870, 203],
      [1100, 400, 29_800, 84_670, 336],
      [1500, 400, 30_200, 114_870, 870],
    ]);
    expect(rows[0].kmh).toBeCloseTo(43.2, 9);
    expect(rows[2].kmh).toBeCloseTo(48.3221, 3);
    expect(splitTable(layout.splitsAtM, crossings.slice(0, 2)).map((r) => r.gapMs)).toEqual([null, null]);
  });
});

describe('spoken splits', () => {
  it.each<[number, string, string]>([
    [29_870, 'twenty-nine eight', 'issue #9 example ("twenty-nine eight"), truncated to tenths'],
    [30_000, 'thirty flat', 'common practice'],
    [10_460, 'ten four', 'truncated, not rounded'],
    [112_430, 'one fifty-two four', 'common practice'],
    [65_300, 'one oh five three', 'common practice'],
    [60_400, 'one minute point four', 'our wording'],
    [3_723_450, 'one oh two oh three four', 'our wording'],
  ])('spokenTime(%i) → %s (%#)', (ms, words, source) => {
    expect(source).not.toBe('');
    expect(spokenTime(ms)).toBe(words);
  });

  it.each<[number, string]>([
    [300, 'plus three tenths'],
    [-129, 'minus one tenth'],
    [99, 'on schedule'],
    [-99, 'on schedule'],
    [1_430, 'plus one point four'],
    [-2_050, 'minus two seconds'],
    [1_000, 'plus one second'],
  ])('spokenGap(%i) → %s', (ms, words) => {
    expect(spokenGap(ms)).toBe(words);
  });

  it.each<[number, string]>([
    [0, 'zero'],
    [29, 'twenty-nine'],
    [40, 'forty'],
    [250, 'two hundred fifty'],
    [1_205, 'one thousand two hundred five'],
  ])('numberWords(%i) → %s', (n, words) => {
    expect(numberWords(n)).toBe(words);
  });

  const layout = distanceLayout(1500, 'long');
  const schedule = paceSchedule(1500, 114_000, { openerMs: 25_000 });

  it.each<[string, string, number[], Parameters<typeof speakSplit>[1]]>([
    ['1500 m finish, 0.87 s behind', 'Finish, one fifty-four eight, plus eight tenths', [25_000, 54_870, 84_670, 114_870], { layout, schedule }],
    ['1500 m second full lap', 'Lap two, twenty-nine eight, plus three tenths', [25_000, 54_870, 84_670], { layout, schedule }],
    ['10000 m has no opener: the first lap is lap one', 'Lap five, twenty-nine eight', [25_000, 54_870, 84_670, 114_670, 144_470], { layout: distanceLayout(10_000, 'long') }],
    ['500 m opener, no schedule', 'Opener, ten four', [10_460], { layout: distanceLayout(500, 'long') }],
    ['free laps (no layout)', 'Lap two, twenty-nine eight', [30_000, 59_870], {}],
  ])('%s → "%s"', (_label, sentence, crossings, plan) => {
    expect(speakSplit(crossings, plan)).toBe(sentence);
  });

  it.each<[number[], string]>([
    [[20_000, 50_000, 80_500, 110_370], 'Lap three, twenty-nine eight, plus three tenths'],
    [[20_000, 50_000, 80_000, 109_870], 'Lap three, twenty-nine eight, minus one tenth'],
  ])('issue #9\'s example sentence: 3000 m, 30 s laps planned after a 20 s opener, %j → %s', (crossings, sentence) => {
    const plan = paceSchedule(3000, 230_000, { openerMs: 20_000 });
    expect(plan.map((e) => e.cumulativeMs).slice(0, 4)).toEqual([20_000, 50_000, 80_000, 110_000]);
    expect(speakSplit(crossings, { layout: distanceLayout(3000, 'long'), schedule: plan })).toBe(sentence);
  });

  it('refuses no crossings and more crossings than splits', () => {
    expect(() => speakSplit([])).toThrow(/at least one crossing/);
    expect(() => speakSplit([100, 200, 300], { layout: distanceLayout(500, 'long') })).toThrow(/3 crossings for a distance with 2 splits/);
  });
});

describe('gunSoundDelayMs', () => {
  it.each<[number, number | undefined, number, string]>([
    [100, 0, 302, 'physics: c = 331.3 m/s at 0 °C'],
    [100, 20, 291, 'physics: c ≈ 343.2 m/s at 20 °C'],
    [100, undefined, 299, 'physics at 5 °C: issue #9 "~0.3 s per 100 m"'],
    [0, 5, 0, 'physics'],
  ])('%d m at %s °C → %i ms (%#)', (distance, temp, ms, source) => {
    expect(source).not.toBe('');
    expect(gunSoundDelayMs(distance, temp)).toBe(ms);
  });

  it('refuses distances outside 0–1000 m and implausible temperatures', () => {
    expect(() => gunSoundDelayMs(-1)).toThrow(/between 0 and 1000 m/);
    expect(() => gunSoundDelayMs(100, 80)).toThrow(/airTempC/);
  });
});

describe('runResult (one rule for the CSV, the weekly sheet, the lap chart and the follow-up)', () => {
  it('a finished 500 m with one crossing per split has a finish and its laps', () => {
    expect(distanceLayout(500, 'long').splitsAtM).toEqual([100, 500]);
    expect(runResult(500, 'long', 'finished', [10_400, 37_000])).toEqual({
      laps: [10_400, 26_600],
      finishMs: 37_000,
      complete: true,
      ordered: true,
    });
  });

  it('a stray tap after the gun: not complete, no finish (no crossing dropped to make one)', () => {
    expect(runResult(500, 'long', 'finished', [50, 10_400, 37_000])).toEqual({
      laps: [50, 10_350, 26_600],
      finishMs: null,
      complete: false,
      ordered: true,
    });
  });

  it('a double tap at the line: not complete, no finish', () => {
    const r = runResult(500, 'long', 'finished', [10_400, 37_000, 37_012]);
    expect(r.complete).toBe(false);
    expect(r.finishMs).toBeNull();
    expect(r.laps).toEqual([10_400, 26_600, 12]);
  });

  it('crossings that do not increase give no laps and no finish', () => {
    expect(runResult(500, 'long', 'finished', [10_400, 10_400])).toEqual({ laps: [], finishMs: null, complete: false, ordered: false });
    expect(runResult(500, 'long', 'finished', [0, 37_000]).ordered).toBe(false);
  });

  it('a missing crossing, a stopped run, free laps and an unknown distance have no finish', () => {
    expect(runResult(500, 'long', 'finished', [37_000]).finishMs).toBeNull();
    expect(runResult(500, 'long', 'stopped', [10_400, 37_000]).finishMs).toBeNull();
    expect(runResult(500, 'long', 'running', [10_400, 37_000]).complete).toBe(false);
    const free = runResult(0, 'long', 'finished', [30_000, 60_000]);
    expect(free).toEqual({ laps: [30_000, 30_000], finishMs: null, complete: false, ordered: true });
    expect(runResult(-5, 'short', 'finished', [30_000]).finishMs).toBeNull();
  });
});
