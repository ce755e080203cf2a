/** The evening review's Lap-time trends section (issue #10). Being built: this placeholder says so. */
import { Text } from '../../ui';
import type { ReviewSectionProps } from '../section-props';

export function LapTrendsSection(_props: ReviewSectionProps) {
  return <Text tone="muted">Lap-time trends is being built.</Text>;
}
