/** Wordings every area repeats: a clock time, a count with its noun, when the device last synced. */

export const pad2 = (n: number) => String(n).padStart(2, '0');

/** Local HH:MM of an ISO timestamp (24-hour, as rink schedules are written). */
export function clockTime(iso: string): string {
  const date = new Date(iso);
  return `${pad2(date.getHours())}:${pad2(date.getMinutes())}`;
}

export const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

/** "Synced 18:42", or with the date when it was not today; `label` words the lead-in. */
export function lastSyncText(iso: string | null, label = 'Synced', now = new Date()): string {
  if (!iso) return 'Not synced on this device yet';
  const at = new Date(iso);
  if (at.toDateString() === now.toDateString()) return `${label} ${clockTime(iso)}`;
  return `${label} ${at.getDate()} ${at.toLocaleDateString('en-GB', { month: 'short' })} ${clockTime(iso)}`;
}
