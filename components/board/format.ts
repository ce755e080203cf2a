/** Small wordings the board repeats: the day, a note's time, counts and lists of names. */
import type { Mark } from '../../shared/schemas';
import { clockTime, plural, type MarkKind } from '../ui';

/** "Sat 14 Mar" from a session day (YYYY-MM-DD, the rink's local day). */
export function formatDay(day: string): string {
  const [y, m, d] = day.split('-').map(Number);
  const date = new Date(y, (m ?? 1) - 1, d ?? 1);
  const weekday = date.toLocaleDateString('en-GB', { weekday: 'short' });
  const month = date.toLocaleDateString('en-GB', { month: 'short' });
  return `${weekday} ${date.getDate()} ${month}`;
}

/** Local HH:MM of an ISO timestamp. */
export const formatTime = clockTime;
export { plural };

/** "Anna", "Anna and Bram", "Anna, Bram and 3 more". */
export function joinNames(names: string[]): string {
  if (names.length <= 1) return names[0] ?? '';
  if (names.length === 2) return `${names[0]} and ${names[1]}`;
  if (names.length === 3) return `${names[0]}, ${names[1]} and ${names[2]}`;
  return `${names[0]}, ${names[1]} and ${names.length - 2} more`;
}

export const markKind = (mark: Mark): MarkKind => (mark === 'good' ? 'good' : 'needsWork');
