/**
 * Value rules every boundary shares: text that PostgreSQL and SQLite both store as sent, and
 * instants and days inside a window a real rink session can have. A value that passes these is
 * never refused by the database later (a NUL byte, a lone surrogate or the year 0 would be).
 */
import { z } from 'zod';

/** The earliest and latest instants a record may carry (days and times alike). */
export const EARLIEST_INSTANT = '2000-01-01T00:00:00.000Z';
export const LATEST_INSTANT = '2100-01-01T00:00:00.000Z';
const EARLIEST_MS = Date.parse(EARLIEST_INSTANT);
const LATEST_MS = Date.parse(LATEST_INSTANT);

/**
 * NUL (refused by PostgreSQL text), other C0 controls but tab, line feed and carriage return, and
 * unpaired UTF-16 surrogates (which would be stored as U+FFFD, a silent change).
 */
// eslint-disable-next-line no-control-regex
const UNSAFE_TEXT = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

export const isSafeText = (value: string) => !UNSAFE_TEXT.test(value);

/** Text with a maximum length (in characters) and nothing a database would refuse or change. */
export const safeText = (name: string, max: number) =>
  z
    .string({ error: `${name} must be text` })
    .max(max, `${name} must be at most ${max} characters`)
    .refine(isSafeText, { error: `${name} contains control characters or broken Unicode` });

/** An ISO 8601 date-time with an offset, between 2000 and 2100. */
export const instantSchema = (name: string) =>
  z.iso
    .datetime({ offset: true, error: `${name} must be an ISO date-time` })
    .refine((value) => {
      const ms = Date.parse(value);
      return ms >= EARLIEST_MS && ms < LATEST_MS;
    }, { error: `${name} must be between 2000 and 2100` });

/** A real calendar date (YYYY-MM-DD) between 2000 and 2100. */
export const calendarDaySchema = z
  .string({ error: 'Day must be YYYY-MM-DD' })
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Day must be YYYY-MM-DD')
  .refine((value) => {
    const ms = Date.parse(`${value}T00:00:00.000Z`);
    // Date.parse rolls 2026-02-30 over to March: a real date reads back the same.
    return Number.isFinite(ms) && new Date(ms).toISOString().slice(0, 10) === value && ms >= EARLIEST_MS && ms < LATEST_MS;
  }, { error: 'Day must be a real date between 2000 and 2100' });
