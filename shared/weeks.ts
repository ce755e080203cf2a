/**
 * ISO 8601 weeks ("2026-W01": weeks start on Monday; week 1 holds the year's first Thursday) in a
 * team's own time zone, for the evening review. All the calendar work is date-fns with its tz
 * companion (@date-fns/tz): no week arithmetic is written here by hand. The server counts in SQL
 * with PostgreSQL's own ISO fields (to_char ... 'IYYY-"W"IW'); tests/unit/weeks.test.ts and
 * tests/integration/review-weeks.test.ts check both against the standard's examples.
 *
 * Week labels are handled as their Monday at midnight in UTC (TZDate 'UTC'), so the arithmetic
 * never depends on the machine's own zone; an instant becomes a label in the team's zone.
 */
import { addWeeks, differenceInCalendarISOWeeks, format, isValid, parse } from 'date-fns';
import { TZDate } from '@date-fns/tz';
import { z } from 'zod';

/** Weeks the review looks at, at most (two seasons). */
export const MAX_REVIEW_WEEKS = 104;
/** Weeks shown when no range is asked for: the current week and the seven before it. */
export const DEFAULT_REVIEW_WEEKS = 8;

const LABEL = "RRRR-'W'II";
const DAY = 'yyyy-MM-dd';
const shape = /^(\d{4})-W(\d{2})$/;

/**
 * Labels already parsed: their Monday's time, or null for a label that names no week. Parsing
 * through the tz companion costs about a millisecond and every review request parses a few
 * labels; the shape and the years 2000-2100 bound this to 10,100 entries.
 */
const parsedLabels = new Map<string, number | null>();

/** The Monday (UTC midnight) of a well-formed label, or undefined when no such week exists. */
function mondayOf(week: string): TZDate | undefined {
  const match = shape.exec(week);
  if (!match) return undefined;
  const year = Number(match[1]);
  if (year < 2000 || year > 2100) return undefined;
  let time = parsedLabels.get(week);
  if (time === undefined) {
    const monday = parse(week, LABEL, new TZDate(2000, 0, 1, 'UTC'));
    // A week past the year's last (2025-W53) parses into the next year: the round trip tells.
    time = !isValid(monday) || format(monday, LABEL) !== week ? null : monday.getTime();
    parsedLabels.set(week, time);
  }
  return time === null ? undefined : new TZDate(time, 'UTC');
}

/** True for a label of a week that exists ("2026-W53" yes, "2025-W53" no). */
export const isIsoWeek = (week: string): boolean => mondayOf(week) !== undefined;

/** An ISO week label from a request: "YYYY-Www", a real week of years 2000-2100. */
export const isoWeekSchema = (name = 'week') =>
  z
    .string({ error: `${name} must be an ISO week like 2026-W05` })
    .regex(shape, `${name} must be an ISO week like 2026-W05`)
    .refine(isIsoWeek, { error: `${name} is not a week of that year (ISO years have 52 or 53 weeks; years 2000-2100)` });

/** The ISO week an instant falls in, in `timeZone` (an IANA name). */
export function weekOf(instant: Date | string | number, timeZone: string): string {
  return format(new TZDate(new Date(instant).getTime(), timeZone), LABEL);
}

/** The local day (YYYY-MM-DD) of an instant in `timeZone`. */
export function dayOf(instant: Date | string | number, timeZone: string): string {
  return format(new TZDate(new Date(instant).getTime(), timeZone), DAY);
}

function monday(week: string): TZDate {
  const found = mondayOf(week);
  if (!found) throw new RangeError(`Not an ISO week: ${week}`);
  return found;
}

/** The Monday of a week as a day (YYYY-MM-DD): the week's first local day. */
export const weekStartDay = (week: string): string => format(monday(week), DAY);

/** The week `count` weeks after (negative: before) `week`. */
export const addIsoWeeks = (week: string, count: number): string => format(addWeeks(monday(week), count), LABEL);

/** How many weeks from `from` to `to` inclusive (0 or less when `to` is before `from`). */
export const weekSpan = (from: string, to: string): number => differenceInCalendarISOWeeks(monday(to), monday(from)) + 1;

/** Ranges already listed (a year's 52 labels cost about 15 ms through the tz companion), at most 1,000. */
const listedRanges = new Map<string, readonly string[]>();

/** Every week from `from` to `to` inclusive, in order (empty when `to` is before `from`). */
export function weeksBetween(from: string, to: string): string[] {
  const key = `${from}/${to}`;
  let weeks = listedRanges.get(key);
  if (!weeks) {
    const start = monday(from);
    const span = differenceInCalendarISOWeeks(monday(to), start) + 1;
    weeks = Array.from({ length: Math.max(0, span) }, (_, i) => format(addWeeks(start, i), LABEL));
    if (listedRanges.size >= 1000) listedRanges.clear();
    listedRanges.set(key, weeks);
  }
  return [...weeks];
}

/** The range the review shows when none is asked for: the last `count` weeks ending with this one. */
export function defaultWeekRange(timeZone: string, now: Date | number = Date.now(), count = DEFAULT_REVIEW_WEEKS) {
  const to = weekOf(now, timeZone);
  return { from: addIsoWeeks(to, -(count - 1)), to };
}

/**
 * An IANA time zone name this runtime knows ("Europe/Amsterdam", "UTC"), in its usual
 * spelling, or undefined. Offsets ("+05:00") and POSIX rules are not names and are refused.
 */
export function canonicalTimeZone(name: string): string | undefined {
  if (name.length > 64 || !/^[A-Za-z][A-Za-z0-9_+-]*(\/[A-Za-z0-9_+-]+){0,2}$/.test(name)) return undefined;
  try {
    const resolved = new Intl.DateTimeFormat('en-US', { timeZone: name }).resolvedOptions().timeZone;
    // Intl fixes the case ("europe/amsterdam") but also swaps in older link names
    // ("America/Buenos_Aires" for "America/Argentina/Buenos_Aires"): keep the name as given then.
    return resolved.toLowerCase() === name.toLowerCase() ? resolved : name;
  } catch {
    return undefined;
  }
}

/** A team's time zone from a request: an IANA name, stored in its canonical spelling. */
export const timeZoneSchema = z
  .string({ error: 'timeZone must be a time zone name like Europe/Amsterdam' })
  .trim()
  .transform((name, ctx) => {
    const canonical = canonicalTimeZone(name);
    if (!canonical) {
      ctx.addIssue({ code: 'custom', message: 'timeZone must be a time zone name like Europe/Amsterdam (IANA)' });
      return z.NEVER;
    }
    return canonical;
  });
