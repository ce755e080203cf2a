/**
 * The cue follow-up rule (shared/follow-up.ts), with figures worked out by hand: stressed at
 * exactly N, a follow-up week without marks, fewer marks than the minimum, exactly half good,
 * exactly 15 points, weeks still to come; and the related lap times from crossings.
 */
import {
  DEFAULT_STRESS_THRESHOLD,
  FOLLOW_UP_CHANGE,
  FOLLOW_UP_MIN_MARKS,
  FOLLOW_UP_RULE,
  followUpVerdict,
  isStressed,
  lapBasisOf,
  lapChangeMs,
  lapsAfterOpener,
  lapsInWeeks,
  type FollowUpWeekMarks,
  type TimedRun,
} from '../../shared/follow-up';
import { followUpQuerySchema } from '../../shared/schemas/review-follow-up';
import { TREND_MIN_MARKS, TREND_THRESHOLD } from '../../server/services/review/trend';

const weeks = (...counts: [number, number, boolean?][]): FollowUpWeekMarks[] =>
  counts.map(([needsWork, good, counted = true], i) => ({ week: `2026-W1${i + 1}`, needsWork, good, counted }));

describe('stressed', () => {
  it('is at least N "needs work" marks in the week: exactly N counts, N - 1 does not', () => {
    expect(isStressed({ needsWork: 3, good: 0 }, 3)).toBe(true);
    expect(isStressed({ needsWork: 2, good: 9 }, 3)).toBe(false);
    expect(isStressed({ needsWork: 1, good: 0 }, 1)).toBe(true);
    expect(DEFAULT_STRESS_THRESHOLD).toBe(3);
  });

  it('uses the trend rule’s figures (3 marks, 15 points)', () => {
    expect(FOLLOW_UP_MIN_MARKS).toBe(TREND_MIN_MARKS);
    expect(FOLLOW_UP_CHANGE).toBe(TREND_THRESHOLD);
    expect(FOLLOW_UP_RULE).toContain('fewer than 3 marks');
    expect(FOLLOW_UP_RULE).toContain('15 points');
  });
});

describe('followUpVerdict', () => {
  it('fading: 3 needs work + 1 good (25 %), then 4 good of 6 (66.7 %) with an empty week among them', () => {
    // After: W+1 1 nw 2 good, W+2 no marks, W+3 2 good, W+4 1 nw  ->  good 4, marks 6.
    const result = followUpVerdict({ needsWork: 3, good: 1 }, weeks([1, 2], [0, 0], [0, 2], [1, 0]));
    expect(result).toEqual({
      verdict: 'fading',
      stressedGood: 1,
      stressedMarks: 4,
      afterGood: 4,
      afterMarks: 6,
      weeksCounted: 4,
      changePoints: 41.7, // 66.67 % - 25 %
    });
  });

  it('persisting: 3 needs work, then 2 good of 5 (40 %, under half though 40 points up)', () => {
    const result = followUpVerdict({ needsWork: 3, good: 0 }, weeks([2, 1], [1, 1], [0, 0], [0, 0]));
    expect(result).toMatchObject({ verdict: 'persisting', afterGood: 2, afterMarks: 5, changePoints: 40 });
  });

  it('exactly half good and 25 points up is fading', () => {
    const result = followUpVerdict({ needsWork: 3, good: 1 }, weeks([1, 1], [1, 1], [0, 0], [0, 0]));
    expect(result).toMatchObject({ verdict: 'fading', afterGood: 2, afterMarks: 4, changePoints: 25 });
  });

  it('exactly 15 points up is fading; 14 points is persisting', () => {
    // Stressed 4 nw + 4 good = 50 %; after 13 good of 20 = 65 % (+15); 16 of 25 = 64 % (+14).
    expect(followUpVerdict({ needsWork: 4, good: 4 }, weeks([7, 13], [0, 0], [0, 0], [0, 0]))).toMatchObject({
      verdict: 'fading',
      changePoints: 15,
    });
    expect(followUpVerdict({ needsWork: 4, good: 4 }, weeks([9, 16], [0, 0], [0, 0], [0, 0]))).toMatchObject({
      verdict: 'persisting',
      changePoints: 14,
    });
  });

  it('a mostly good stressed week followed by only good marks is fading, though the rise is under 15 points', () => {
    // Stressed: 3 needs work, 20 good (87 %); after: 6 good, 0 needs work (100 %, +13 points).
    const clean = followUpVerdict({ needsWork: 3, good: 20 }, weeks([0, 4], [0, 2], [0, 0], [0, 0]));
    expect(clean).toMatchObject({ verdict: 'fading', afterGood: 6, afterMarks: 6, changePoints: 13 });
    // One needs-work mark after and the rise still under 15 points: persisting.
    const oneBack = followUpVerdict({ needsWork: 3, good: 20 }, weeks([1, 4], [0, 2], [0, 0], [0, 0]));
    expect(oneBack).toMatchObject({ verdict: 'persisting', afterGood: 6, afterMarks: 7 });
    // The floor still holds: two clean marks are not enough data.
    expect(followUpVerdict({ needsWork: 3, good: 20 }, weeks([0, 2], [0, 0], [0, 0], [0, 0])).verdict).toBe('not enough data');
  });

  it('fewer than 3 marks over the four weeks is not enough data, with the counts kept', () => {
    const two = followUpVerdict({ needsWork: 5, good: 0 }, weeks([0, 1], [0, 0], [0, 1], [0, 0]));
    expect(two).toMatchObject({ verdict: 'not enough data', afterGood: 2, afterMarks: 2, stressedMarks: 5, changePoints: 100 });
    // Exactly the minimum gives a verdict.
    expect(followUpVerdict({ needsWork: 5, good: 0 }, weeks([0, 1], [0, 1], [0, 1], [0, 0])).verdict).toBe('fading');
  });

  it('no marks at all after: not enough data and no change figure', () => {
    const none = followUpVerdict({ needsWork: 3, good: 0 }, weeks([0, 0], [0, 0], [0, 0], [0, 0]));
    expect(none).toEqual({
      verdict: 'not enough data',
      stressedGood: 0,
      stressedMarks: 3,
      afterGood: 0,
      afterMarks: 0,
      weeksCounted: 4,
      changePoints: null,
    });
  });

  it('weeks still to come are not counted', () => {
    // W+1 has begun (3 good); W+2..W+4 are to come, their (impossible) marks are ignored.
    const result = followUpVerdict({ needsWork: 3, good: 0 }, weeks([0, 3], [9, 0, false], [9, 0, false], [9, 0, false]));
    expect(result).toMatchObject({ verdict: 'fading', afterGood: 3, afterMarks: 3, weeksCounted: 1 });
  });
});

describe('related lap times', () => {
  // 1500 m long track: opener 300 m + 3 laps = 4 crossings.
  const runA: TimedRun = { week: '2026-W11', distanceM: 1500, track: 'long', crossingsMs: [25_310, 54_020, 82_900, 111_450] };
  const runB: TimedRun = { week: '2026-W11', distanceM: 1500, track: 'long', crossingsMs: [26_000, 55_000, 84_500, 114_000] };
  const runC: TimedRun = { week: '2026-W12', distanceM: 1500, track: 'long', crossingsMs: [25_000, 53_000, 81_500, 110_000] };
  const missingOne: TimedRun = { week: '2026-W11', distanceM: 1500, track: 'long', crossingsMs: [25_000, 53_000, 81_500] };
  const thousand: TimedRun = { week: '2026-W11', distanceM: 1000, track: 'long', crossingsMs: [18_000, 47_000, 76_500] };

  it('leaves out the first section of a fully timed run', () => {
    expect(lapsAfterOpener(runA)).toEqual([28_710, 28_880, 28_550]);
    expect(lapsAfterOpener(missingOne)).toBeNull();
    expect(lapsAfterOpener({ distanceM: 0, track: 'long', crossingsMs: [30_000, 60_000] })).toBeNull();
    expect(lapsAfterOpener({ distanceM: 1500, track: 'long', crossingsMs: [25_000, 25_000, 50_000, 75_000] })).toBeNull();
  });

  it('picks the most-timed distance (a tie: the shorter)', () => {
    expect(lapBasisOf([runA, runB, thousand, missingOne])).toEqual({ distanceM: 1500, track: 'long', runs: 2 });
    expect(lapBasisOf([runA, thousand])).toEqual({ distanceM: 1000, track: 'long', runs: 1 });
    expect(lapBasisOf([missingOne])).toBeNull();
  });

  it('pools the laps of a week’s runs and counts the runs', () => {
    const basis = lapBasisOf([runA, runB, runC])!;
    // W11: A 28710 + 28880 + 28550, B 29000 + 29500 + 29500 = 174140 over 6 laps = 29023.3.
    const w11 = lapsInWeeks([runA, runB, runC, missingOne, thousand], basis, ['2026-W11']);
    expect(w11).toEqual({ runs: 2, laps: 6, meanLapMs: 29_023 });
    // W12: C 28000 + 28500 + 28500 = 85000 over 3 = 28333.3.
    const w12 = lapsInWeeks([runA, runB, runC], basis, ['2026-W12']);
    expect(w12).toEqual({ runs: 1, laps: 3, meanLapMs: 28_333 });
    expect(lapChangeMs(w11, w12)).toBe(-690);
    expect(lapsInWeeks([runA], basis, ['2026-W13'])).toEqual({ runs: 0, laps: 0, meanLapMs: null });
    expect(lapChangeMs(w11, { runs: 0, laps: 0, meanLapMs: null })).toBeNull();
  });
});

describe('the query string', () => {
  it('defaults the threshold to 3 and refuses 0, 21 and words, naming the field', () => {
    expect(followUpQuerySchema.parse({})).toEqual({ threshold: 3 });
    expect(followUpQuerySchema.parse({ threshold: '20' }).threshold).toBe(20);
    for (const bad of ['0', '21', 'three', '2.5', '']) {
      const result = followUpQuerySchema.safeParse({ threshold: bad });
      expect(result.success).toBe(false);
      expect(result.error!.issues[0]).toMatchObject({ path: ['threshold'], message: 'threshold must be a whole number from 1 to 20' });
    }
  });
});
