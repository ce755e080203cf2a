/**
 * ISO 8601 weeks in a team's time zone (shared/weeks.ts, over date-fns + @date-fns/tz), and the
 * review's trend rule (server/services/review/trend.ts). The same cases run through PostgreSQL
 * in tests/integration/review-weeks.test.ts.
 */
import { getISOWeek, getISOWeekYear } from 'date-fns';
import { TZDate } from '@date-fns/tz';
import type { ReviewTrend } from '../../shared/schemas/review';
import { trendOf, type WeekCount } from '../../server/services/review/trend';
import {
  addIsoWeeks,
  canonicalTimeZone,
  defaultWeekRange,
  isIsoWeek,
  isoWeekSchema,
  timeZoneSchema,
  weekOf,
  weekSpan,
  weekStartDay,
  weeksBetween,
} from '../../shared/weeks';

/**
 * Calendar dates and their ISO week. Sources: issue #10 (the first three, from the standard's
 * rule that week 1 holds the year's first Thursday) and the worked examples of ISO 8601 week
 * dates listed in Wikipedia's "ISO week date" article (the rest).
 */
const calendar: [day: string, week: string, source: string][] = [
  ['2026-01-01', '2026-W01', 'issue #10: a Thursday opens week 1'],
  ['2027-01-01', '2026-W53', 'issue #10: a Friday belongs to the previous year'],
  ['2024-12-30', '2025-W01', 'issue #10: a Monday in the week of the next year\'s first Thursday'],
  ['2005-01-01', '2004-W53', 'ISO week date examples'],
  ['2005-01-02', '2004-W53', 'ISO week date examples'],
  ['2005-12-31', '2005-W52', 'ISO week date examples'],
  ['2006-01-01', '2005-W52', 'ISO week date examples'],
  ['2006-01-02', '2006-W01', 'ISO week date examples'],
  ['2007-01-01', '2007-W01', 'ISO week date examples'],
  ['2007-12-30', '2007-W52', 'ISO week date examples'],
  ['2007-12-31', '2008-W01', 'ISO week date examples'],
  ['2008-01-01', '2008-W01', 'ISO week date examples'],
  ['2008-12-28', '2008-W52', 'ISO week date examples'],
  ['2008-12-29', '2009-W01', 'ISO week date examples'],
  ['2009-12-31', '2009-W53', 'ISO week date examples'],
  ['2010-01-03', '2009-W53', 'ISO week date examples'],
];

describe('ISO weeks of calendar dates', () => {
  it.each(calendar)('%s is in %s (%s)', (day, week) => {
    // Noon local in three zones: the calendar day alone decides the week.
    for (const zone of ['UTC', 'Europe/Amsterdam', 'Pacific/Auckland', 'America/Los_Angeles']) {
      const [y, m, d] = day.split('-').map(Number);
      const noon = new TZDate(y, m - 1, d, 12, 0, zone);
      expect(weekOf(noon, zone)).toBe(week);
      // The reference library's own fields agree.
      expect(`${getISOWeekYear(noon)}-W${String(getISOWeek(noon)).padStart(2, '0')}`).toBe(week);
    }
  });
});

/**
 * Instants whose UTC day differs from the team's local day: the local day decides. The Los
 * Angeles case is also the night the clocks go forward (2026-03-08).
 */
const zoned: [instant: string, zone: string, local: string, utc: string, why: string][] = [
  ['2026-03-09T06:30:00Z', 'America/Los_Angeles', '2026-W10', '2026-W11', 'Sunday 23:30 PDT is Monday in UTC'],
  ['2026-01-12T07:30:00Z', 'America/Los_Angeles', '2026-W02', '2026-W03', 'Sunday 23:30 PST is Monday in UTC'],
  ['2027-01-04T07:30:00Z', 'America/Los_Angeles', '2026-W53', '2027-W01', 'Sunday 2027-01-03 23:30 PST: still 2026-W53'],
  ['2026-01-04T19:00:00Z', 'Pacific/Auckland', '2026-W02', '2026-W01', 'Monday 08:00 NZDT is Sunday in UTC'],
  ['2026-03-08T10:30:00Z', 'Pacific/Auckland', '2026-W10', '2026-W10', 'Sunday 23:30 NZDT: same week in UTC'],
  ['2024-12-29T11:30:00Z', 'Pacific/Auckland', '2025-W01', '2024-W52', 'Monday 2024-12-30 00:30 NZDT is 2025-W01'],
];

describe('ISO weeks of instants in a time zone', () => {
  it.each(zoned)('%s in %s is %s (UTC %s): %s', (instant, zone, local, utc) => {
    expect(weekOf(instant, zone)).toBe(local);
    expect(weekOf(instant, 'UTC')).toBe(utc);
  });

  it('a Sunday 23:30 in Los Angeles is the Sunday of that week, not the Monday', () => {
    const sunday = new TZDate(2026, 2, 8, 23, 30, 'America/Los_Angeles');
    expect(sunday.toISOString()).toBe('2026-03-08T23:30:00.000-07:00');
    expect(new Date(sunday.getTime()).toISOString()).toBe('2026-03-09T06:30:00.000Z');
    expect(weekOf(sunday, 'America/Los_Angeles')).toBe('2026-W10');
  });
});

describe('week labels', () => {
  it.each([
    ['2026-W53', true],
    ['2020-W53', true],
    ['2026-W01', true],
    ['2025-W53', false],
    ['2026-W54', false],
    ['2026-W00', false],
    ['1999-W52', false],
    ['2101-W01', false],
    ['2026-W5', false],
    ['2026W05', false],
    ['constructor', false],
    ['2026-W05\u0000', false],
  ])('%j is a week: %s', (week, ok) => {
    expect(isIsoWeek(week)).toBe(ok);
    expect(isoWeekSchema('from').safeParse(week).success).toBe(ok);
  });

  it('says what is wrong', () => {
    const bad = isoWeekSchema('from').safeParse('2025-W53');
    expect(bad.success).toBe(false);
    expect(bad.error!.issues[0].message).toMatch(/from is not a week of that year/);
    expect(isoWeekSchema('to').safeParse('soon').error!.issues[0].message).toMatch(/to must be an ISO week like 2026-W05/);
  });

  it('Mondays, steps and spans across a 53-week year', () => {
    expect(weekStartDay('2026-W01')).toBe('2025-12-29');
    expect(weekStartDay('2026-W53')).toBe('2026-12-28');
    expect(weekStartDay('2025-W01')).toBe('2024-12-30');
    expect(addIsoWeeks('2026-W52', 1)).toBe('2026-W53');
    expect(addIsoWeeks('2026-W53', 1)).toBe('2027-W01');
    expect(addIsoWeeks('2025-W52', 1)).toBe('2026-W01');
    expect(addIsoWeeks('2026-W02', -3)).toBe('2025-W51');
    expect(weeksBetween('2026-W51', '2027-W02')).toEqual(['2026-W51', '2026-W52', '2026-W53', '2027-W01', '2027-W02']);
    expect(weeksBetween('2026-W05', '2026-W05')).toEqual(['2026-W05']);
    expect(weeksBetween('2026-W06', '2026-W05')).toEqual([]);
    expect(weekSpan('2025-W01', '2026-W53')).toBe(52 + 53);
    expect(weekSpan('2026-W06', '2026-W05')).toBe(0);
  });

  it('the default range is the last 8 weeks ending with the current week in the team zone', () => {
    // Monday 2026-01-05 08:00 in Auckland is still Sunday 2026-01-04 in UTC.
    const now = Date.parse('2026-01-04T19:00:00Z');
    expect(defaultWeekRange('Pacific/Auckland', now)).toEqual({ from: '2025-W47', to: '2026-W02' });
    expect(defaultWeekRange('UTC', now)).toEqual({ from: '2025-W46', to: '2026-W01' });
    expect(weeksBetween('2025-W47', '2026-W02')).toHaveLength(8);
  });
});

describe('time zone names', () => {
  it.each([
    ['Europe/Amsterdam', 'Europe/Amsterdam'],
    ['UTC', 'UTC'],
    ['America/Argentina/Buenos_Aires', 'America/Argentina/Buenos_Aires'],
    ['europe/amsterdam', 'Europe/Amsterdam'],
  ])('%s is known as %s', (name, canonical) => {
    expect(canonicalTimeZone(name)).toBe(canonical);
    expect(timeZoneSchema.parse(name)).toBe(canonical);
  });

  it.each(['Mars/Olympus_Mons', '+05:00', 'EST5EDT,M3.2.0,M11.1.0', '', 'constructor', 'Europe/Amsterdam\u0000', 'x'.repeat(80)])(
    '%j is refused with a message',
    (name) => {
      expect(canonicalTimeZone(name)).toBeUndefined();
      const result = timeZoneSchema.safeParse(name);
      expect(result.success).toBe(false);
      expect(result.error!.issues[0].message).toMatch(/time zone name like Europe\/Amsterdam/);
    },
  );
});

describe('the review trend rule (last 4 weeks against the 4 before)', () => {
  const weeks = weeksBetween('2026-W01', '2026-W08');
  const at = (week: string, needsWork: number, good: number) => ({ week, needsWork, good });
  const cases: [ReviewTrend, WeekCount[], string][] = [
    ['fewer', [at('2026-W01', 4, 0), at('2026-W06', 1, 3)], 'share 100% -> 25%'],
    ['more', [at('2026-W02', 1, 3), at('2026-W08', 3, 0)], 'share 25% -> 100%'],
    ['steady', [at('2026-W03', 2, 2), at('2026-W07', 3, 2)], 'share 50% -> 60%'],
    ['fewer', [at('2026-W04', 2, 2), at('2026-W05', 1, 2), at('2026-W06', 1, 2)], 'share 50% -> 33%: at least 15 points'],
    ['not enough data', [at('2026-W01', 5, 5), at('2026-W08', 1, 1)], 'only 2 marks lately'],
    ['not enough data', [at('2026-W08', 5, 0)], 'no marks before'],
    ['not enough data', [], 'no marks at all'],
  ];
  it.each(cases)('%s: %j (%s)', (trend, counts) => {
    expect(trendOf(weeks, counts)).toBe(trend);
  });

  it('a range shorter than 8 weeks has not enough data', () => {
    expect(trendOf(weeks.slice(1), [at('2026-W02', 5, 0), at('2026-W08', 0, 5)])).toBe('not enough data');
  });
});
