/** Pending invitations (head coach): who was invited, as what, and until when the link works. */
import { StyleSheet, View } from 'react-native';

import { roleLabels, type Invitation, type Skater } from '../../shared/schemas';
import { Card, Heading, Text, colors, spacing } from '../ui';

const dateFormat = new Intl.DateTimeFormat(undefined, { day: 'numeric', month: 'short' });

export function InvitationList({ invitations, skaters }: { invitations: Invitation[]; skaters: Skater[] }) {
  const pending = invitations.filter((i) => !i.acceptedAt);
  const nameOf = (id: string | null) => skaters.find((s) => s.id === id)?.displayName;
  return (
    <Card testID="invitations-list">
      <Heading level={2}>Pending invitations</Heading>
      {pending.length === 0 ? (
        <Text tone="muted" testID="invitations-empty">
          No open invitations.
        </Text>
      ) : (
        pending.map((invitation) => {
          const skater = nameOf(invitation.skaterId);
          const what =
            invitation.role === 'guardian' && skater
              ? `Guardian of ${skater}`
              : invitation.role === 'skater' && skater
                ? `Skater (${skater})`
                : roleLabels[invitation.role];
          return (
            <View key={invitation.id} style={styles.row} testID={`invitation-${invitation.id}`}>
              <Text weight="bold">{invitation.email}</Text>
              <Text tone="muted" variant="caption">
                {what} · open until {dateFormat.format(new Date(invitation.expiresAt))}
              </Text>
            </View>
          );
        })
      )}
    </Card>
  );
}

const styles = StyleSheet.create({
  row: { paddingVertical: spacing.xs, borderTopWidth: 1, borderTopColor: colors.divider, gap: 2 },
});
