/** Wordings and pure helpers for the skater's page: day names, times, phase groups, the spoken script. */
import { phaseLabels, phases, type Phase } from '../../shared/cues';
import type { SkaterDay, SkaterNote } from '../../store/today';
import { clockTime, marks, pad2, plural } from '../ui';


const dateOf = (day: string) => {
  const [y, m, d] = day.split('-').map(Number);
  return new Date(y, (m ?? 1) - 1, d ?? 1);
};

/** The day before or after a YYYY-MM-DD day (local calendar). */
export function shiftDay(day: string, by: number): string {
  const date = dateOf(day);
  date.setDate(date.getDate() + by);
  return `${date.getFullYear()}-${pad2(date.getMonth() + 1)}-${pad2(date.getDate())}`;
}

/** "Today", "Yesterday" or "Tue 1 Dec". */
export function shortDay(day: string, today: string): string {
  if (day === today) return 'Today';
  if (day === shiftDay(today, -1)) return 'Yesterday';
  const date = dateOf(day);
  return `${date.toLocaleDateString('en-GB', { weekday: 'short' })} ${date.getDate()} ${date.toLocaleDateString('en-GB', { month: 'short' })}`;
}

/** "Wednesday 2 December" (with the year when it is not this year's). */
export function longDay(day: string, today: string): string {
  const date = dateOf(day);
  const sameYear = day.slice(0, 4) === today.slice(0, 4);
  const text = `${date.toLocaleDateString('en-GB', { weekday: 'long' })} ${date.getDate()} ${date.toLocaleDateString('en-GB', { month: 'long' })}`;
  return sameYear ? text : `${text} ${date.getFullYear()}`;
}

/** Local HH:MM of an ISO timestamp. */
export { clockTime, plural };

/** The note text the skater may read: only a shared, non-empty note. */
export const sharedNote = (n: SkaterNote) => (n.noteShared ? n.note.trim() : '');

export const cueText = (n: SkaterNote) => n.cueLabel ?? 'A cue not on this device yet';

export const markKind = (n: SkaterNote) => (n.mark === 'good' ? 'good' : 'needsWork') as 'good' | 'needsWork';

export interface PhaseGroup {
  /** A phase, or 'other' for notes whose cue has not reached the device. */
  key: Phase | 'other';
  label: string;
  notes: SkaterNote[];
}

/** Notes grouped by phase in the library's phase order; within a phase, in the order given (time). */
export function groupByPhase(notes: readonly SkaterNote[]): PhaseGroup[] {
  const groups: PhaseGroup[] = phases.map((phase) => ({ key: phase, label: phaseLabels[phase], notes: [] }));
  const other: PhaseGroup = { key: 'other', label: 'Other cues', notes: [] };
  for (const note of notes) {
    const group = note.phase ? groups.find((g) => g.key === note.phase) : undefined;
    (group ?? other).notes.push(note);
  }
  return [...groups, other].filter((g) => g.notes.length > 0);
}

/** What "Read aloud" says, one piece per cue, in the page's order (phase by phase). */
export function spokenScript(groups: readonly PhaseGroup[], dayLabel: string): string[] {
  const count = groups.reduce((n, g) => n + g.notes.length, 0);
  const lines = [`${dayLabel}: ${plural(count, 'cue', 'cues')} from your coaches.`];
  for (const group of groups) {
    for (const [index, note] of group.notes.entries()) {
      const intro = index === 0 ? `${group.label}. ` : '';
      const note_ = sharedNote(note);
      lines.push(`${intro}${cueText(note)}. ${marks[markKind(note)].word}.${note_ ? ` Coach's note: ${note_}` : ''}`);
    }
  }
  return lines;
}

/**
 * The days the page offers: today first, then the recent days with notes, newest first (no
 * repeats). `selected` is kept in the list even when it has no notes.
 */
export function offeredDays(days: readonly SkaterDay[], today: string, selected: string): SkaterDay[] {
  const byDay = new Map<string, SkaterDay>();
  byDay.set(today, { day: today, count: 0, unacknowledged: 0 });
  byDay.set(selected, { day: selected, count: 0, unacknowledged: 0 });
  for (const d of days) byDay.set(d.day, d);
  return [...byDay.values()].filter((d) => d.day <= today || d.count > 0).sort((a, b) => (a.day < b.day ? 1 : -1));
}

/** The neighbouring offered days of `selected`: older (earlier) and newer (later). */
export function neighbours(offered: readonly SkaterDay[], selected: string): { earlier: string | null; later: string | null } {
  const index = offered.findIndex((d) => d.day === selected);
  return {
    earlier: index >= 0 ? (offered[index + 1]?.day ?? null) : null,
    later: index > 0 ? offered[index - 1].day : null,
  };
}
