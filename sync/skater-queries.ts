/**
 * The skater's view (a skater or their guardian, on their own device): one skater's notes of a
 * rink day with each cue's text and phase, the recent days that have notes, and the runs timed
 * on a day with their crossings. Reads only; the one thing a skater writes, the acknowledgement,
 * is an observation edit (sync/tables/observations.ts).
 */
import type { Phase } from '../shared/cues';
import type { Mark } from '../shared/schemas';
import type { RunWithCrossings } from '../shared/schemas/clock';
import type { SqlValue } from './driver';
import { decodeRow, selectColumns } from './fields';
import type { StoreContext } from './store-context';
import { withCrossings } from './tables/runs';

/** A note as the skater (or guardian) reads it: the observation with its cue's text and phase. */
export interface SkaterNote {
  id: string;
  sessionId: string;
  cueId: string;
  /** The cue's text; null if the cue has not reached this device. */
  cueLabel: string | null;
  phase: Phase | null;
  /** The cue's place within its phase (for a stable order). */
  cueOrder: number;
  mark: Mark;
  note: string;
  noteShared: boolean;
  createdAt: string;
  createdBy: string;
  /** The author's name when the note was made ('' on notes from before names were kept). */
  authorName?: string;
  acknowledgedAt: string | null;
}

/** A rink day with notes for one skater. */
export interface SkaterDay {
  day: string;
  count: number;
  /** Notes not acknowledged yet. */
  unacknowledged: number;
}

type NoteFields = Omit<SkaterNote, 'cueLabel' | 'phase' | 'cueOrder'>;

/**
 * One skater's notes of one rink day (the session's `day`), oldest first, with each cue's text
 * and phase. Tombstones are left out. A note whose session has not reached this device yet
 * counts under the UTC day of its creation time. The note text is returned as stored: screens
 * show it only when `noteShared` (the server blanks private text for skaters anyway).
 */
export async function listForSkater(ctx: StoreContext, teamId: string, skaterId: string, day: string): Promise<SkaterNote[]> {
  const rows = await ctx.db.all<Record<string, SqlValue> & { cue_label: string | null; cue_phase: Phase | null; cue_order: number | null }>(
    `SELECT o.id, o.session_id, o.cue_id, o.mark, o.note, o.note_shared, o.created_at, o.created_by, o.author_name, o.acknowledged_at,
            c.label AS cue_label, c.phase AS cue_phase, c.sort_order AS cue_order
     FROM observations o
     LEFT JOIN sessions s ON s.id = o.session_id
     LEFT JOIN cues c ON c.id = o.cue_id
     WHERE o.team_id = ? AND o.skater_id = ? AND o.deleted = 0 AND coalesce(s.day, substr(o.created_at, 1, 10)) = ?
     ORDER BY o.created_at, o.id`,
    [teamId, skaterId, day],
  );
  return rows.map((r) => ({
    ...decodeRow<NoteFields>('observations', r),
    cueLabel: r.cue_label,
    phase: r.cue_phase,
    cueOrder: r.cue_order ?? 0,
  }));
}

/** The most recent rink days with notes for the skater, newest first, with counts. */
export async function daysForSkater(ctx: StoreContext, teamId: string, skaterId: string, limit: number): Promise<SkaterDay[]> {
  const rows = await ctx.db.all<{ day: string; total: number; open: number }>(
    `SELECT coalesce(s.day, substr(o.created_at, 1, 10)) AS day, count(*) AS total,
            sum(CASE WHEN o.acknowledged_at IS NULL THEN 1 ELSE 0 END) AS open
     FROM observations o
     LEFT JOIN sessions s ON s.id = o.session_id
     WHERE o.team_id = ? AND o.skater_id = ? AND o.deleted = 0
     GROUP BY 1 ORDER BY 1 DESC LIMIT ?`,
    [teamId, skaterId, Math.max(1, Math.trunc(limit))],
  );
  return rows.map((r) => ({ day: r.day, count: r.total, unacknowledged: r.open }));
}

/**
 * One skater's runs of one rink day, in the order they were timed, each with its crossings
 * (sorted by time). On a skater's or guardian's device the pull brings only that skater's runs
 * and crossings; the filter by skater keeps a coach's device (which holds the team's) right too.
 */
export async function runsForSkater(ctx: StoreContext, teamId: string, skaterId: string, day: string): Promise<RunWithCrossings[]> {
  const rows = await ctx.db.all<Record<string, SqlValue>>(
    `SELECT id, team_id, ${selectColumns('runs')} FROM runs
      WHERE team_id = ? AND skater_id = ? AND day = ? AND deleted = 0 ORDER BY started_at, id`,
    [teamId, skaterId, day],
  );
  return withCrossings(ctx, rows);
}
