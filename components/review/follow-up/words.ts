/**
 * The follow-up's figures in words (issue #10 §3): a verdict never goes out without its counts.
 * Times through shared/timing.ts, weeks through components/review/format.ts (date-fns); nothing
 * here counts or decides a verdict (shared/follow-up.ts does).
 */
import { FOLLOW_UP_MIN_MARKS, FOLLOW_UP_WEEKS } from '../../../shared/follow-up';
import type { FollowUpItem, FollowUpReply, WeekLapsReply } from '../../../shared/schemas/review-follow-up';
import { formatGap, formatRaceTime } from '../../../shared/timing';
import { distanceLabel, trackLabel } from '../../clock/clock-math';

export const verdictSigns: Record<FollowUpItem['verdict'], { glyph: string; word: string }> = {
  fading: { glyph: '\u2193', word: 'Fault fading' },
  persisting: { glyph: '\u2192', word: 'Fault persisting' },
  'not enough data': { glyph: '\u2013', word: 'Not enough data' },
};

const pct = (good: number, marks: number) => `${Math.round((good / marks) * 100)} %`;
const marksWord = (n: number) => (n === 1 ? '1 mark' : `${n} marks`);
export const runsWord = (n: number) => (n === 1 ? '1 run' : `${n} runs`);

/** "3/4 good (75 %)" or "no marks". */
export const goodOf = (good: number, marks: number) => (marks === 0 ? 'no marks' : `${good}/${marks} good (${pct(good, marks)})`);

/** The verdict with the counts it rests on, as one sentence. */
export function verdictSentence(item: FollowUpItem): string {
  const weeks = item.weeksCounted === FOLLOW_UP_WEEKS ? `the next ${FOLLOW_UP_WEEKS} weeks` : `${item.weeksCounted} of the next ${FOLLOW_UP_WEEKS} weeks so far`;
  const before = `${item.stressedGood}/${item.stressedMarks} (${pct(item.stressedGood, item.stressedMarks)}) in the stressed week`;
  if (item.afterMarks === 0) return `No marks for this cue in ${weeks}; ${FOLLOW_UP_MIN_MARKS} are needed for a verdict.`;
  const after = `${item.afterGood} good of ${marksWord(item.afterMarks)} in ${weeks} (${pct(item.afterGood, item.afterMarks)})`;
  const change = item.changePoints === null ? '' : `, ${item.changePoints >= 0 ? '+' : '\u2212'}${Math.abs(item.changePoints)} points`;
  if (item.verdict === 'not enough data') return `${after}; ${FOLLOW_UP_MIN_MARKS} marks are needed for a verdict.`;
  return `${after}, against ${before}${change}.`;
}

/** "28.71 (1 run)" or "no runs". */
export const lapCell = (laps: WeekLapsReply) =>
  laps.meanLapMs === null ? 'no runs' : `${formatRaceTime(laps.meanLapMs)} (${runsWord(laps.runs)})`;

/** The distance the lap times are of: "1500 m long track". */
export const basisWords = (basis: NonNullable<FollowUpReply['lapBasis']>) =>
  `${distanceLabel(basis.distanceM)} ${trackLabel(basis.track).toLowerCase()}`;

/** The lap times beside the verdict, in one sentence. */
export function lapSentence(item: FollowUpItem, basis: FollowUpReply['lapBasis']): string {
  if (!basis) return 'Lap times: no fully timed, finished runs in these weeks.';
  const where = `Mean lap at ${basisWords(basis)}, opener left out`;
  if (item.laps.meanLapMs === null && item.afterLaps.meanLapMs === null) return `${where}: no runs in the stressed week or after.`;
  const then = `stressed week ${lapCell(item.laps)}`;
  const after = `after ${lapCell(item.afterLaps)}`;
  if (item.lapChangeMs === null) return `${where}: ${then}; ${after}.`;
  const change =
    Math.trunc(item.lapChangeMs / 10) === 0
      ? 'the same'
      : `${formatGap(item.lapChangeMs).replace('+', '').replace('\u2212', '')} s ${item.lapChangeMs > 0 ? 'slower' : 'faster'} per lap`;
  return `${where}: ${then}; ${after}: ${change}.`;
}
