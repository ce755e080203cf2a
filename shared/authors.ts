/**
 * How a note names its author: "Coach Anouk" from the display name "Anouk Brink". Short enough
 * for a feed line at the boards and for "from Coach Anouk" on the skater's page.
 */

/** The short name of a coach, or '' when the name is unknown (older notes). */
export function coachShortName(displayName: string | null | undefined): string {
  const first = (displayName ?? '').trim().split(/\s+/)[0] ?? '';
  return first ? `Coach ${first}` : '';
}

/**
 * Who may change or delete a note: its author (a coach) and the head coach. The board hides the
 * controls, the device store refuses, and the server's push refuses (shared/sync-tables.ts,
 * `changeBy`). Without a role, only the author.
 */
export function mayChangeNote(note: { createdBy: string }, userId: string, role?: string): boolean {
  if (role === 'head_coach') return true;
  return note.createdBy === userId && role !== 'skater' && role !== 'guardian';
}
