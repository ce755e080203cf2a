/**
 * Who has an account on the team: coaches (the head coach marked), guardians with the skater they
 * look after, and skaters who sign in themselves. The head coach can remove anyone but themselves,
 * after a confirm step that says what happens: the person is signed out on every device at once,
 * and what they wrote stays. A double tap on the confirm removes once.
 */
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import type { Member, Skater } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { membersQuery, useRemoveMember } from '../../store/team';
import { Banner, Button, Card, Heading, Loading, Text, colors, radius, spacing } from '../ui';
import { useOnce } from './use-once';

export type StaffListProps = {
  teamId: string;
  skaters: Skater[];
  /** The signed-in user: never offered "Remove" on their own row. */
  currentUserId: string | null;
  /** Head coach: may remove members. */
  canManage: boolean;
};

type Section = { key: string; title: string; members: Member[]; empty: string };

export function StaffList({ teamId, skaters, currentUserId, canManage }: StaffListProps) {
  const members = useQuery({ ...membersQuery(teamId), enabled: !!teamId });
  const remove = useRemoveMember(teamId);
  const once = useOnce();
  const [confirming, setConfirming] = useState<string | null>(null);
  const [outcome, setOutcome] = useState<{ kind: 'success' | 'error'; text: string } | null>(null);

  const nameOf = (id: string | null) => skaters.find((s) => s.id === id)?.displayName ?? 'a skater no longer listed';
  const byName = (a: Member, b: Member) => a.displayName.localeCompare(b.displayName);
  const all = members.data ?? [];
  const sections: Section[] = [
    {
      key: 'coaches',
      title: 'Coaches',
      // The head coach first, then the assistants.
      members: all
        .filter((m) => m.role === 'head_coach' || m.role === 'coach')
        .sort((a, b) => (a.role === b.role ? byName(a, b) : a.role === 'head_coach' ? -1 : 1)),
      empty: 'No coaches.',
    },
    { key: 'guardians', title: 'Guardians', members: all.filter((m) => m.role === 'guardian').sort(byName), empty: 'No guardians yet.' },
    {
      key: 'skaters',
      title: 'Skaters who sign in',
      members: all.filter((m) => m.role === 'skater').sort(byName),
      empty: 'No skater has an account yet.',
    },
  ];

  const describe = (m: Member) => {
    switch (m.role) {
      case 'head_coach':
        return 'Head coach';
      case 'coach':
        return 'Coach';
      case 'guardian':
        return `Guardian of ${nameOf(m.skaterId)}`;
      case 'skater':
        return `Skater: ${nameOf(m.skaterId)}`;
    }
  };

  const removeMember = (member: Member) =>
    void once.run(async () => {
      setOutcome(null);
      try {
        await remove.mutateAsync(member.userId);
        setConfirming(null);
        setOutcome({ kind: 'success', text: `${member.displayName} is no longer on the team and is signed out on every device.` });
      } catch (error) {
        setOutcome({
          kind: 'error',
          text: isApiRequestError(error) ? error.message : `Could not remove ${member.displayName}. Try again.`,
        });
      }
    });

  return (
    <Card testID="staff-list">
      <Heading level={2}>People on the team</Heading>
      {outcome ? (
        <Banner kind={outcome.kind} testID={outcome.kind === 'success' ? 'staff-done' : 'staff-error'}>
          {outcome.text}
        </Banner>
      ) : null}
      {members.isPending ? <Loading label="Loading the people on the team…" testID="staff-loading" /> : null}
      {members.isError ? (
        <View style={styles.stack}>
          <Banner kind="error" testID="staff-load-error">
            {members.error.message}
          </Banner>
          <Button label="Try again" variant="secondary" testID="staff-retry" onPress={() => void members.refetch()} />
        </View>
      ) : null}
      {members.data
        ? sections.map((section) => (
            <View key={section.key} style={styles.section} testID={`staff-${section.key}`}>
              <Heading level={3}>{section.title}</Heading>
              {section.members.length === 0 ? (
                <Text tone="muted" variant="caption">
                  {section.empty}
                </Text>
              ) : (
                section.members.map((member) => {
                  const self = member.userId === currentUserId;
                  // Not yourself, not the head coach: the server refuses both.
                  const removable = canManage && !self && member.role !== 'head_coach';
                  const asking = confirming === member.userId;
                  return (
                    <View key={member.userId} style={styles.row} testID={`staff-member-${member.userId}`}>
                      <Text weight="bold">{self ? `${member.displayName} (you)` : member.displayName}</Text>
                      <Text variant="caption" weight={member.role === 'head_coach' ? 'bold' : 'regular'} testID={`staff-role-${member.userId}`}>
                        {describe(member)}
                      </Text>
                      <Text tone="muted" variant="caption" style={styles.email}>
                        {member.email}
                      </Text>
                      {removable && !asking ? (
                        <Button
                          label="Remove from team"
                          variant="quiet"
                          testID={`staff-remove-${member.userId}`}
                          accessibilityLabel={`Remove from team: ${member.displayName}`}
                          style={styles.start}
                          onPress={() => {
                            setOutcome(null);
                            setConfirming(member.userId);
                          }}
                        />
                      ) : null}
                      {removable && asking ? (
                        <View
                          style={styles.confirm}
                          testID={`staff-confirm-${member.userId}`}
                          role="group"
                          aria-label={`Remove ${member.displayName}?`}
                        >
                          <Text weight="bold">{`Remove ${member.displayName} from the team?`}</Text>
                          <Text>
                            {`They are signed out on every device at once and can no longer open the team. The notes they wrote stay${
                              member.role === 'guardian' || member.role === 'skater' ? ', and so does the skater profile' : ''
                            }.`}
                          </Text>
                          <View style={styles.actions}>
                            <Button
                              label={`Remove ${member.displayName}`}
                              testID={`staff-confirm-yes-${member.userId}`}
                              loading={once.busy}
                              onPress={() => removeMember(member)}
                            />
                            <Button
                              label="Keep"
                              variant="quiet"
                              testID={`staff-confirm-no-${member.userId}`}
                              accessibilityLabel={`Keep ${member.displayName}`}
                              onPress={() => setConfirming(null)}
                            />
                          </View>
                        </View>
                      ) : null}
                    </View>
                  );
                })
              )}
            </View>
          ))
        : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  stack: { gap: spacing.sm },
  section: { gap: spacing.xxs },
  row: { paddingVertical: spacing.xs, borderTopWidth: 1, borderTopColor: colors.divider, gap: 2 },
  email: { wordBreak: 'break-all' } as object,
  start: { alignSelf: 'flex-start' },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  confirm: {
    gap: spacing.xs,
    padding: spacing.md,
    marginTop: spacing.xxs,
    borderRadius: radius.md,
    borderWidth: 2,
    borderColor: colors.error,
    backgroundColor: colors.errorSurface,
  },
});
