/** The evening review's Export and print section (issue #10). Being built: this placeholder says so. */
import { Text } from '../../ui';
import type { ReviewSectionProps } from '../section-props';

export function ExportSection(_props: ReviewSectionProps) {
  return <Text tone="muted">Export and print is being built.</Text>;
}
