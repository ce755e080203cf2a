/** The safety caution the product shows wherever training load or injuries could come up. */
import { Banner, Text, colors } from '../ui';

export function SafetyNote({ testID = 'safety-note' }: { testID?: string }) {
  return (
    <Banner kind="info" title="Look after yourself" testID={testID}>
      <Text style={{ color: colors.info }}>
        Boardside is not medical advice. Decisions about training load and injuries belong to qualified professionals
        and your club’s rules. After any blow to the head, leave the ice and get checked. Wear your protective gear and
        keep your blades covered off the ice.
      </Text>
    </Banner>
  );
}
