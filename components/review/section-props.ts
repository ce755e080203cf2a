/** What the review screen hands each of its sections (counts, lap times, follow-up, tidy-up, export). */
import type { ReviewGroup } from '../../shared/schemas/review';
import type { Group, Skater } from '../../shared/schemas/team';

export type ReviewSectionProps = {
  teamId: string;
  /** The team's skaters (retired ones included, flagged) and groups, from the squad query. */
  skaters: readonly Skater[];
  groups: readonly Group[];
  /** The skater picked in the review's skater list, if any; the group chip picked there. */
  skaterId: string | null;
  group: ReviewGroup;
  /** Picks a skater in the shared list (so moving between sections keeps who is being looked at). */
  onPickSkater: (id: string) => void;
  /** The team's time zone (IANA name) once the server said it, else the browser's. */
  timeZone: string;
  /** A wide screen (≥ 1024 px): panes side by side; a phone stacks them. */
  wide: boolean;
};
