/** The evening review's Tidy-up section (issue #10). Being built: this placeholder says so. */
import { Text } from '../../ui';
import type { ReviewSectionProps } from '../section-props';

export function TidySection(_props: ReviewSectionProps) {
  return <Text tone="muted">Tidy-up is being built.</Text>;
}
