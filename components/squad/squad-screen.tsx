/**
 * Squad: the team's groups and skaters, and the people with an account. The head coach also
 * changes skaters (rename, move, retire), adds skaters and groups, invites people, follows up on
 * invitations and removes members. Phone: one column, the selected skater on top. Wide: the list
 * and the people on the left, the selected skater and the forms in a pane beside them.
 */
import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';

import type { Skater } from '../../shared/schemas';
import { useActiveMembership, useSession } from '../../store/session';
import { invitationsQuery, squadQuery } from '../../store/team';
import { Banner, Button, Card, Heading, Loading, Screen, Text, layout, spacing, useBreakpoint } from '../ui';
import { AddSkaterForm } from './add-skater-form';
import { InvitationList } from './invitation-list';
import { InviteForm, type InvitePreset, type InviteRole } from './invite-form';
import { SkaterDetail } from './skater-detail';
import { SquadList, activeSkaters } from './squad-list';
import { StaffList } from './staff-list';

export function SquadScreen() {
  const membership = useActiveMembership();
  const wide = useBreakpoint() === 'wide';
  const teamId = membership?.teamId ?? '';
  const isHead = membership?.role === 'head_coach';
  const userId = useSession((s) => s.user?.id ?? null);

  const squad = useQuery({ ...squadQuery(teamId), enabled: !!teamId });
  // Only the head coach manages invitations; asking as an assistant would just earn a 403.
  const invitations = useQuery({ ...invitationsQuery(teamId), enabled: !!teamId && isHead });

  const [selectedId, setSelectedId] = useState<string | null>(null);
  const [preset, setPreset] = useState<InvitePreset | null>(null);

  const skaters = squad.data?.skaters ?? [];
  const groups = squad.data?.groups ?? [];
  const selected = skaters.find((s) => s.id === selectedId) ?? null;

  const startInvite = (role: InviteRole, skaterId: string) =>
    setPreset({ role, skaterId, nonce: Date.now() });

  let listBody;
  if (squad.isPending) listBody = <Loading label="Loading the squad…" testID="squad-loading" />;
  else if (squad.isError)
    listBody = (
      <View style={styles.stack}>
        <Banner kind="error" testID="squad-load-error">
          {squad.error.message}
        </Banner>
        <Button label="Try again" variant="secondary" testID="squad-retry" onPress={() => void squad.refetch()} />
      </View>
    );
  else if (skaters.length === 0 && groups.length === 0)
    listBody = (
      <Text tone="muted" testID="squad-empty">
        No skaters yet.{isHead ? ' Add the first one with the form.' : ''}
      </Text>
    );
  else
    listBody = (
      <SquadList
        teamId={teamId}
        squad={squad.data}
        selectedId={selectedId}
        canManage={isHead}
        onSelect={(s: Skater) => setSelectedId((current) => (current === s.id ? null : s.id))}
      />
    );

  const listPane = (
    <Card testID="squad-list-pane">
      <Heading level={2}>
        {`Skaters${squad.data ? ` (${activeSkaters(skaters).length})` : ''}`}
      </Heading>
      {listBody}
    </Card>
  );

  const detail = selected ? (
    <SkaterDetail
      // A new skater starts with closed forms and no message from the previous one.
      key={selected.id}
      teamId={teamId}
      skater={selected}
      skaters={skaters}
      groups={groups}
      canManage={isHead}
      onInvite={startInvite}
      onClose={() => setSelectedId(null)}
    />
  ) : null;

  const manage =
    isHead && teamId ? (
      <>
        <AddSkaterForm teamId={teamId} groups={groups} skaters={skaters} />
        <InviteForm teamId={teamId} skaters={activeSkaters(skaters)} preset={preset} />
      </>
    ) : (
      <Banner kind="info" testID="squad-coach-note">
        Only the head coach can add, change or retire skaters and invite or remove people.
      </Banner>
    );

  // Who has an account, and who was asked to: together, beside the skaters on a wide screen.
  const people = teamId ? (
    <>
      {isHead && invitations.data ? <InvitationList teamId={teamId} invitations={invitations.data} skaters={skaters} /> : null}
      {isHead && invitations.isError ? (
        <Banner kind="error" testID="invitations-load-error">
          {invitations.error.message}
        </Banner>
      ) : null}
      <StaffList teamId={teamId} skaters={skaters} currentUserId={userId} canManage={isHead} />
    </>
  ) : null;

  return (
    <Screen testID="squad-home" edges={[]} width={wide ? 'full' : 'content'}>
      <Heading>Squad</Heading>
      {wide ? (
        <View style={styles.panes}>
          <View style={[styles.stack, styles.listPaneWide]}>
            {listPane}
            {people}
          </View>
          <View style={[styles.stack, styles.sidePaneWide]}>
            {detail}
            {manage}
          </View>
        </View>
      ) : (
        <>
          {/* On a phone the selected skater sits above the list, where the thumb already is. */}
          {detail}
          {listPane}
          {manage}
          {people}
        </>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  stack: { gap: spacing.lg },
  panes: { flexDirection: 'row', gap: spacing.lg, alignItems: 'flex-start', maxWidth: layout.contentMaxWidth },
  listPaneWide: { flex: 1, minWidth: 320 },
  sidePaneWide: { width: 460 },
});
