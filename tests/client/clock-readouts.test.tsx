/**
 * What a lane shows after its crossings, as strings the coach reads: a 1500 m pair on long track
 * (opener 300 m + 3 laps: ISU layout, as shared/timing.ts gives it) against a 1:58.00 target at
 * even pace (23.60 opener, then 31.47 / 31.47 / 31.46 per 400 m). km/h is plain kinematics
 * (metres × 3600 / ms); times are truncated to hundredths, never rounded; the gap is elapsed minus
 * planned, + behind and − ahead (true minus sign). Also: the finished run's table, the start offset
 * for a gun heard from the far side, the double-tap rule and the crossing time from an event stamp.
 */
import { paceSchedule } from '../../shared/timing';
import {
  DOUBLE_TAP_MS,
  crossingAtMs,
  gunOffsetMs,
  isDoubleTap,
  laneReadout,
  parseOffset,
  rowLabel,
  runTable,
  scheduleForRun,
  splitSentence,
  tableLegend,
  type ClockRun,
  type ClockTarget,
} from '../../components/clock/clock-math';

const run1500 = { distanceM: 1500, track: 'long' as const };
const target = paceSchedule(1500, 118_000, { track: 'long' });
const anna = [24_310, 55_930, 87_410, 118_950];

describe('the live readouts of a 1500 m lane', () => {
  it('the schedule for 1:58.00 at even pace is 23.60, 55.06, 1:26.53, 1:58.00', () => {
    expect(target.map((e) => e.cumulativeMs)).toEqual([23_600, 55_067, 86_534, 118_000]);
  });

  it('before the first crossing: nothing timed, "Opener + 3 laps"', () => {
    const r = laneReadout(run1500, [], target);
    expect(r).toMatchObject({ crossings: 0, lastLap: null, lastSplit: null, kmh: null, gap: null, toGo: 'Opener + 3 laps', predicted: null });
  });

  it.each([
    // crossings, name, lap, split, at, km/h, gap text, gap word, to go, predicted
    [1, 'Opener', '24.31', '24.31', '300 m', '44.43', '+0.71', 'behind', '3 laps to go', '1:58.71'],
    [2, 'Lap 1', '31.62', '55.93', '700 m', '45.54', '+0.86', 'behind', '2 laps to go', '1:58.86'],
    [3, 'Lap 2', '31.48', '1:27.41', '1100 m', '45.74', '+0.87', 'behind', 'Last lap', '1:58.87'],
    [4, 'Finish', '31.54', '1:58.95', '1500 m', '45.66', '+0.95', 'behind', 'Finished', '1:58.95'],
  ])('after %i crossing(s): %s %s, split %s at %s, %s km/h, gap %s %s, %s, finish about %s', (n, name, lap, split, at, kmh, gap, word, toGo, predicted) => {
    const r = laneReadout(run1500, anna.slice(0, n), target);
    expect(r.lastName).toBe(name);
    expect(r.lastLap).toBe(lap);
    expect(r.lastSplit).toBe(split);
    expect(r.lastAt).toBe(at);
    expect(r.kmh).toBe(kmh);
    expect(r.gap?.text).toBe(gap);
    expect(r.gap?.word).toBe(word);
    expect(r.toGo).toBe(toGo);
    expect(r.predicted).toBe(predicted);
    expect(r.finished).toBe(n === 4);
  });

  it('ahead of the schedule shows a minus sign and the word "ahead"; within a hundredth "on schedule"', () => {
    expect(laneReadout(run1500, [23_410], target).gap).toMatchObject({ text: '\u22120.19', side: 'ahead', word: 'ahead' });
    expect(laneReadout(run1500, [23_609], target).gap).toMatchObject({ text: '0.00', side: 'level', word: 'on schedule' });
  });

  it('times are truncated, not rounded: a 24.319 opener shows 24.31', () => {
    expect(laneReadout(run1500, [24_319], target).lastLap).toBe('24.31');
  });

  it('without a target: no gap, and the prediction carries the last lap (from the second crossing)', () => {
    const r1 = laneReadout(run1500, [24_310]);
    expect(r1.gap).toBeNull();
    expect(r1.predicted).toBeNull();
    // 55.93 + 2 more laps at 31.62 = 1:59.17
    expect(laneReadout(run1500, anna.slice(0, 2)).predicted).toBe('1:59.17');
  });

  it('free laps: every crossing is a 400 m lap, counted up, never "finished"', () => {
    const r = laneReadout({ distanceM: 0, track: 'long' }, [40_000, 72_000, 104_500]);
    expect(r).toMatchObject({ lastName: 'Lap 3', lastLap: '32.50', lastSplit: '1:44.50', kmh: '44.31', toGo: '3 laps', finished: false, predicted: null, gap: null });
  });

  it('short track 500 m (4.5 laps): the half-lap opener, then laps; km/h from the nominal lap', () => {
    const r = laneReadout({ distanceM: 500, track: 'short' }, [7_000, 16_000]);
    expect(r.lastName).toBe('Lap 1');
    expect(r.toGo).toBe('3 laps to go');
    // 500 / 4.5 = 111.11 m per nominal lap in 9.00 s = 44.44 km/h
    expect(r.kmh).toBe('44.44');
  });
});

describe('the spoken split', () => {
  it('one short sentence: section, time in tenths as a coach says it, the gap', () => {
    expect(splitSentence(run1500, anna.slice(0, 1), target)).toBe('Opener, twenty-four three, plus seven tenths');
    expect(splitSentence(run1500, anna.slice(0, 3), target)).toBe('Lap two, thirty-one four, plus eight tenths');
    expect(splitSentence(run1500, anna, target)).toBe('Finish, one fifty-eight nine, plus nine tenths');
  });
  it('in a pair the skater is named first', () => {
    expect(splitSentence(run1500, anna.slice(0, 2), target, 'Anna')).toBe('Anna, lap one, thirty-one six, plus eight tenths');
  });
});

describe('the finished run table', () => {
  const run: Pick<ClockRun, 'distanceM' | 'track' | 'crossings'> = {
    ...run1500,
    crossings: anna.map((atMs, i) => ({ id: `c${i}`, atMs, handTimed: i === 2 })),
  };
  it('has a row per crossing with lap, split, km/h, gap and the hand-timed mark', () => {
    const rows = runTable(run, target);
    expect(rows.map((r) => [r.name, r.atM, r.lap, r.split, r.kmh, r.gap?.text, r.handTimed])).toEqual([
      ['Opener', '300 m', '24.31', '24.31', '44.43', '+0.71', false],
      ['Lap 1', '700 m', '31.62', '55.93', '45.54', '+0.86', false],
      ['Lap 2', '1100 m', '31.48', '1:27.41', '45.74', '+0.87', true],
      ['Finish', '1500 m', '31.54', '1:58.95', '45.66', '+0.95', false],
    ]);
  });
  it('sorts crossings by time and names any beyond the last split as extra', () => {
    const rows = runTable({ ...run, crossings: [...run.crossings, { id: 'x', atMs: 10_000, handTimed: false }].reverse() });
    expect(rows.map((r) => r.name)).toEqual(['Opener', 'Lap 1', 'Lap 2', 'Finish', 'Extra 1']);
    expect(rows[0].split).toBe('10.00');
  });
  it('labels a hand-timed section and says what the marks under the table mean', () => {
    const rows = runTable(run, target);
    expect(rows.map(rowLabel)).toEqual(['Opener', 'Lap 1', 'Lap 2 (hand)', 'Finish']);
    expect(tableLegend(rows, true, 'the')).toBe('Gap to the schedule: + behind, \u2212 ahead. (hand): hand-timed.');
    expect(tableLegend(rows, false, 'your')).toBe('(hand): hand-timed.');
    const noneByHand = rows.map((r) => ({ ...r, handTimed: false }));
    expect(tableLegend(noneByHand, true, 'your')).toBe('Gap to your schedule: + behind, \u2212 ahead.');
    expect(tableLegend(noneByHand, false, 'the')).toBeNull();
  });
});

describe('the schedule a run is measured against', () => {
  const base = { skaterId: 's1', ...run1500, targetMs: 118_000 };
  const withOpener: ClockTarget = { skaterId: 's1', ...run1500, targetMs: 118_000, plan: 'even', openerMs: 26_000, sharesPct: null };
  it('uses the target plan while the target still has the run’s time', () => {
    expect(scheduleForRun(base, [withOpener])?.[0].cumulativeMs).toBe(26_000);
  });
  it('paces the run’s own snapshot evenly once the target has changed', () => {
    expect(scheduleForRun(base, [{ ...withOpener, targetMs: 117_000 }])?.[0].cumulativeMs).toBe(23_600);
  });
  it('has none for free laps or without a target time', () => {
    expect(scheduleForRun({ ...base, targetMs: null })).toBeUndefined();
    expect(scheduleForRun({ ...base, distanceM: 0 })).toBeUndefined();
  });
});

describe('taps and offsets', () => {
  it('a crossing is ms since the start tap, from the event stamps, plus the start offset', () => {
    expect(crossingAtMs(10_000.4 + 24_310, 10_000.4, 0)).toBe(24_310);
    expect(crossingAtMs(5_000 + 24_010, 5_000, 300)).toBe(24_310);
  });
  it(`a same-lane tap within ${DOUBLE_TAP_MS} ms of the last one is a double tap; at ${DOUBLE_TAP_MS} ms it counts`, () => {
    expect(isDoubleTap(1_000, 1_300)).toBe(true);
    expect(isDoubleTap(1_000, 1_000 + DOUBLE_TAP_MS - 1)).toBe(true);
    expect(isDoubleTap(1_000, 1_000 + DOUBLE_TAP_MS)).toBe(false);
    expect(isDoubleTap(undefined, 1_300)).toBe(false);
  });
  it('gun from the far side: 100 m of 5 °C air is 0.30 s (331.3·√(1+T/273.15) m/s, textbook physics)', () => {
    expect(gunOffsetMs(100)).toBe(299);
    expect(gunOffsetMs(0)).toBe(0);
  });
  it('a typed offset reads seconds with a point or a comma, up to 5 s', () => {
    expect(parseOffset('0.30')).toBe(300);
    expect(parseOffset('0,5')).toBe(500);
    expect(parseOffset('6')).toBeNull();
    expect(parseOffset('abc')).toBeNull();
  });
});
