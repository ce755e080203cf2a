/** The selected skater: group, account status and one-tap invitations for them or a guardian. */
import { StyleSheet, View } from 'react-native';

import type { Group, Skater } from '../../shared/schemas';
import { Button, Card, Heading, Text, spacing } from '../ui';
import type { InviteRole } from './invite-form';

export type SkaterDetailProps = {
  skater: Skater;
  groups: Group[];
  canInvite: boolean;
  onInvite: (role: InviteRole, skaterId: string) => void;
  onClose: () => void;
};

export function SkaterDetail({ skater, groups, canInvite, onInvite, onClose }: SkaterDetailProps) {
  const group = groups.find((g) => g.id === skater.groupId);
  return (
    <Card testID="squad-skater-detail">
      <Heading level={2}>{skater.displayName}</Heading>
      <Text>{group ? `Group: ${group.name}` : 'Not in a group'}</Text>
      <Text tone="muted">
        {skater.hasAccount ? 'Has an account and can read their cues.' : 'No account yet: invite them to read their cues.'}
      </Text>
      <View style={styles.actions}>
        {canInvite && !skater.hasAccount ? (
          <Button
            label="Invite this skater"
            variant="secondary"
            testID="squad-detail-invite-skater"
            onPress={() => onInvite('skater', skater.id)}
          />
        ) : null}
        {canInvite ? (
          <Button
            label="Invite a guardian"
            variant="secondary"
            testID="squad-detail-invite-guardian"
            onPress={() => onInvite('guardian', skater.id)}
          />
        ) : null}
        <Button label="Close" variant="quiet" testID="squad-detail-close" onPress={onClose} />
      </View>
    </Card>
  );
}

const styles = StyleSheet.create({ actions: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs } });
