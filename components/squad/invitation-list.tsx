/**
 * Invitations (head coach): who was invited, as what, and where each stands: waiting (with the day
 * its link stops working), accepted, expired or withdrawn. A waiting one can be withdrawn (its
 * link stops working at once); a waiting, expired or withdrawn one can be sent again with a fresh
 * link. Waiting ones come first; accepted ones last, as a record.
 */
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import { roleLabels, type Invitation, type Skater } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { useInvitationAction } from '../../store/team';
import { Banner, Button, Card, Heading, Text, colors, spacing } from '../ui';
import { useOnce } from './use-once';

const dateFormat = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short' });
const day = (iso: string) => dateFormat.format(new Date(iso));

export type InvitationStatus = 'pending' | 'accepted' | 'expired' | 'revoked';

export function invitationStatus(invitation: Invitation, now = Date.now()): InvitationStatus {
  if (invitation.acceptedAt) return 'accepted';
  if (invitation.revokedAt) return 'revoked';
  if (new Date(invitation.expiresAt).getTime() <= now) return 'expired';
  return 'pending';
}

function statusText(invitation: Invitation, status: InvitationStatus): string {
  switch (status) {
    case 'pending':
      return `Waiting for an answer · link open until ${day(invitation.expiresAt)}`;
    case 'accepted':
      return `Accepted ${day(invitation.acceptedAt!)}`;
    case 'expired':
      return `Expired ${day(invitation.expiresAt)} · the link no longer works`;
    case 'revoked':
      return `Withdrawn ${day(invitation.revokedAt!)} · the link no longer works`;
  }
}

const order: Record<InvitationStatus, number> = { pending: 0, expired: 1, revoked: 1, accepted: 2 };

export function InvitationList({ teamId, invitations, skaters }: { teamId: string; invitations: Invitation[]; skaters: Skater[] }) {
  const action = useInvitationAction(teamId);
  const once = useOnce();
  const [outcome, setOutcome] = useState<{ kind: 'success' | 'error'; text: string } | null>(null);
  // Which button is at work (it shows busy); the guard ignores every other tap meanwhile.
  const [acting, setActing] = useState<string | null>(null);
  const now = Date.now();
  const nameOf = (id: string | null) => skaters.find((s) => s.id === id)?.displayName;

  const rows = invitations
    .map((invitation) => ({ invitation, status: invitationStatus(invitation, now) }))
    .sort((a, b) => order[a.status] - order[b.status] || b.invitation.createdAt.localeCompare(a.invitation.createdAt));
  const waiting = rows.filter((r) => r.status === 'pending').length;

  const act = (invitation: Invitation, kind: 'withdraw' | 'resend') =>
    void once.run(async () => {
      setOutcome(null);
      setActing(`${kind}-${invitation.id}`);
      try {
        const updated = await action.mutateAsync({ invitationId: invitation.id, action: kind });
        setOutcome({
          kind: 'success',
          text:
            kind === 'withdraw'
              ? `Invitation to ${invitation.email} withdrawn: its link no longer works.`
              : `Sent again to ${invitation.email} with a fresh link, open until ${day(updated.expiresAt)}. The earlier link no longer works.`,
        });
      } catch (error) {
        const fallback =
          kind === 'withdraw'
            ? `Could not withdraw the invitation to ${invitation.email}. Try again.`
            : `Could not send the invitation to ${invitation.email} again. Try again.`;
        setOutcome({ kind: 'error', text: isApiRequestError(error) ? error.message : fallback });
      } finally {
        setActing(null);
      }
    });

  return (
    <Card testID="invitations-list">
      <Heading level={2}>Invitations</Heading>
      <Text tone="muted" testID="invitations-summary">
        {rows.length === 0
          ? 'No invitations sent yet.'
          : waiting === 0
            ? 'None waiting for an answer.'
            : waiting === 1
              ? '1 waiting for an answer.'
              : `${waiting} waiting for an answer.`}
      </Text>
      {outcome ? (
        <Banner kind={outcome.kind} testID={outcome.kind === 'success' ? 'invitations-done' : 'invitations-error'}>
          {outcome.text}
        </Banner>
      ) : null}
      {rows.map(({ invitation, status }) => {
        const skater = nameOf(invitation.skaterId);
        const what =
          invitation.role === 'guardian' && skater
            ? `Guardian of ${skater}`
            : invitation.role === 'skater' && skater
              ? `Skater (${skater})`
              : roleLabels[invitation.role];
        const canWithdraw = status === 'pending';
        const canResend = status !== 'accepted';
        return (
          <View key={invitation.id} style={styles.row} testID={`invitation-${invitation.id}`}>
            <Text weight="bold" style={styles.email}>
              {invitation.email}
            </Text>
            <Text variant="caption">{what}</Text>
            <Text tone={status === 'pending' ? 'default' : 'muted'} variant="caption" weight={status === 'pending' ? 'bold' : 'regular'} testID={`invitation-status-${invitation.id}`}>
              {statusText(invitation, status)}
            </Text>
            {canWithdraw || canResend ? (
              <View style={styles.actions}>
                {canResend ? (
                  <Button
                    label="Send again"
                    variant="secondary"
                    testID={`invitation-resend-${invitation.id}`}
                    accessibilityLabel={`Send again to ${invitation.email}`}
                    loading={acting === `resend-${invitation.id}`}
                    onPress={() => act(invitation, 'resend')}
                  />
                ) : null}
                {canWithdraw ? (
                  <Button
                    label="Withdraw"
                    variant="quiet"
                    testID={`invitation-withdraw-${invitation.id}`}
                    accessibilityLabel={`Withdraw the invitation to ${invitation.email}`}
                    loading={acting === `withdraw-${invitation.id}`}
                    onPress={() => act(invitation, 'withdraw')}
                  />
                ) : null}
              </View>
            ) : null}
          </View>
        );
      })}
    </Card>
  );
}

const styles = StyleSheet.create({
  row: { paddingVertical: spacing.xs, borderTopWidth: 1, borderTopColor: colors.divider, gap: 2 },
  // Long addresses break anywhere rather than push the buttons off a phone.
  email: { wordBreak: 'break-all' } as object,
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs, paddingTop: spacing.xxs },
});
