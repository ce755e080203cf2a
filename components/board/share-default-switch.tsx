/**
 * The team's default for notes written at the boards: shared with the skater, or for coaches
 * only. The head coach changes it (online: it is the team's choice); every coach sees which
 * default their new notes take, offline too (the last known value).
 */
import { View } from 'react-native';

import { useActiveMembership } from '../../store/session';
import { useTeamSettings, useUpdateTeamSettings } from '../../store/team-settings';
import { Banner, Text, ToggleRow } from '../ui';

export function ShareDefaultSwitch() {
  const membership = useActiveMembership();
  const teamId = membership?.teamId ?? '';
  const { shareBoardNotes } = useTeamSettings(teamId || undefined);
  const update = useUpdateTeamSettings(teamId);
  if (!membership) return null;
  if (membership.role !== 'head_coach') {
    return (
      <Text variant="caption" tone="muted" testID="share-default-read">
        {shareBoardNotes ? 'New notes are shared with the skater (team default).' : 'New notes are for coaches only (team default).'}
      </Text>
    );
  }
  return (
    <View>
      <ToggleRow
        label="Share new notes with the skater"
        hint="The team's default for notes written at the boards. A coach can still switch it per note."
        value={update.isPending && update.variables?.shareBoardNotes !== undefined ? update.variables.shareBoardNotes : shareBoardNotes}
        disabled={update.isPending}
        onChange={(value) => update.mutate({ shareBoardNotes: value })}
        testID="share-default"
      />
      {update.error ? (
        <Banner kind="error" testID="share-default-error">
          {`Not changed: ${update.error.message}. The team's default can be changed when the server is reachable.`}
        </Banner>
      ) : null}
    </View>
  );
}
