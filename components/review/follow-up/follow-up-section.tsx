/** The evening review's Cue follow-up section (issue #10). Being built: this placeholder says so. */
import { Text } from '../../ui';
import type { ReviewSectionProps } from '../section-props';

export function FollowUpSection(_props: ReviewSectionProps) {
  return <Text tone="muted">Cue follow-up is being built.</Text>;
}
