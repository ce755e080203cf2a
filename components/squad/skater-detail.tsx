/**
 * The selected skater: group, account status, and for the head coach everything that changes the
 * profile: rename (inline, with the squad's names checked before sending), move to a group or a
 * new one, retire (after a confirm step) or bring back, and one-tap invitations for the skater or
 * a guardian. A coach sees the same facts without the controls.
 *
 * Every change goes to the server and, through store/team.ts, onto this device's board at once.
 */
import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';

import { displayNameSchema, type Group, type Skater } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { useAddGroup, useUpdateSkater } from '../../store/team';
import { Banner, Button, Card, ChoiceChips, Heading, Text, TextField, colors, radius, spacing, useZodForm } from '../ui';
import { groupNameProblem, skaterNameProblem } from './duplicates';
import type { InviteRole } from './invite-form';
import { useOnce } from './use-once';

export type SkaterDetailProps = {
  teamId: string;
  skater: Skater;
  /** The whole squad (retired included): a new name is checked against it before it is sent. */
  skaters: Skater[];
  groups: Group[];
  /** Head coach: rename, move, retire, invite. Anyone else reads. */
  canManage: boolean;
  onInvite: (role: InviteRole, skaterId: string) => void;
  onClose: () => void;
};

type Outcome = { kind: 'success' | 'error'; text: string } | null;

const NO_GROUP = 'none';

const failure = (error: unknown, fallback: string) => (isApiRequestError(error) ? error.message : fallback);

export function SkaterDetail({ teamId, skater, skaters, groups, canManage, onInvite, onClose }: SkaterDetailProps) {
  const update = useUpdateSkater(teamId);
  const once = useOnce();
  const [outcome, setOutcome] = useState<Outcome>(null);
  const [renaming, setRenaming] = useState(false);
  const [confirmRetire, setConfirmRetire] = useState(false);
  const group = groups.find((g) => g.id === skater.groupId);
  const name = skater.displayName;

  /** One change at a time (a double tap sends once); `after` runs only when the server took it. */
  const change = (
    body: Parameters<typeof update.mutateAsync>[0]['change'],
    done: string,
    fallback: string,
    after?: () => void,
  ) =>
    void once.run(async () => {
      setOutcome(null);
      try {
        await update.mutateAsync({ skaterId: skater.id, change: body });
        setOutcome({ kind: 'success', text: done });
        after?.();
      } catch (error) {
        setOutcome({ kind: 'error', text: failure(error, fallback) });
      }
    });

  const moveTo = (value: string) => {
    const groupId = value === NO_GROUP ? null : value;
    if (groupId === skater.groupId) return;
    const target = groups.find((g) => g.id === groupId);
    change(
      { groupId },
      target ? `${name} is now in ${target.name}.` : `${name} is no longer in a group.`,
      `Could not move ${name}. Try again.`,
    );
  };

  const retire = () =>
    change(
      { retired: true },
      `${name} is retired: off the board, with every note kept.`,
      `Could not retire ${name}. Try again.`,
      () => setConfirmRetire(false),
    );

  const bringBack = () =>
    change({ retired: false }, `${name} is back on the squad and the board.`, `Could not bring ${name} back. Try again.`);

  const groupChoices = [
    { value: NO_GROUP, label: 'No group', testID: 'squad-detail-group-none' },
    ...groups.map((g) => ({ value: g.id, label: g.name, testID: `squad-detail-group-${g.id}` })),
  ];

  return (
    <Card testID="squad-skater-detail">
      <View style={styles.titleRow}>
        <Heading level={2} style={styles.grow} testID="squad-detail-name">
          {name}
        </Heading>
        {skater.retired ? (
          <Text weight="bold" variant="caption" style={styles.retiredTag} testID="squad-detail-retired">
            Retired
          </Text>
        ) : null}
        <Button label="Close" variant="quiet" testID="squad-detail-close" onPress={onClose} />
      </View>
      <Text testID="squad-detail-group">{group ? `Group: ${group.name}` : 'Not in a group'}</Text>
      <Text tone="muted">
        {skater.hasAccount ? 'Has an account and can read their cues.' : 'No account yet: invite them to read their cues.'}
      </Text>
      {skater.retired ? (
        <Text tone="muted" testID="squad-detail-retired-note">
          Off the board and out of the pickers. Their notes and times stay in the history.
        </Text>
      ) : null}

      {outcome ? (
        <Banner kind={outcome.kind} testID={outcome.kind === 'success' ? 'squad-detail-done' : 'squad-detail-error'}>
          {outcome.text}
        </Banner>
      ) : null}

      {canManage ? (
        <>
          {renaming ? (
            <RenameForm
              teamId={teamId}
              skater={skater}
              skaters={skaters}
              onDone={(text) => {
                setRenaming(false);
                setOutcome(text ? { kind: 'success', text } : null);
              }}
            />
          ) : (
            <Button
              label="Rename"
              variant="secondary"
              testID="squad-detail-rename"
              accessibilityLabel={`Rename ${name}`}
              style={styles.start}
              onPress={() => {
                setOutcome(null);
                setRenaming(true);
              }}
            />
          )}

          {skater.retired ? null : (
            <View style={styles.section}>
              <ChoiceChips
                label="Group"
                choices={groupChoices}
                value={skater.groupId ?? NO_GROUP}
                onChange={moveTo}
                testID="squad-detail-group-choice"
              />
              <NewGroupForm teamId={teamId} groups={groups} />
            </View>
          )}

          {skater.retired ? null : (
            <View style={styles.actions}>
              {!skater.hasAccount ? (
                <Button
                  label="Invite this skater"
                  variant="secondary"
                  testID="squad-detail-invite-skater"
                  onPress={() => onInvite('skater', skater.id)}
                />
              ) : null}
              <Button
                label="Invite a guardian"
                variant="secondary"
                testID="squad-detail-invite-guardian"
                onPress={() => onInvite('guardian', skater.id)}
              />
            </View>
          )}

          {skater.retired ? (
            <Button
              label="Bring back"
              variant="secondary"
              testID="squad-detail-bring-back"
              accessibilityLabel={`Bring back ${name}`}
              loading={once.busy}
              style={styles.start}
              onPress={bringBack}
            />
          ) : confirmRetire ? (
            <View style={styles.confirm} testID="squad-detail-retire-confirm" role="group" aria-label={`Retire ${name}?`}>
              <Text weight="bold">{`Retire ${name}?`}</Text>
              <Text>
                {`Their notes, times and reviews stay in the history. ${name} leaves the board and the pickers; you can bring them back at any time.`}
              </Text>
              <View style={styles.actions}>
                <Button
                  label={once.busy ? 'Retiring…' : `Retire ${name}`}
                  testID="squad-detail-retire-yes"
                  loading={once.busy}
                  onPress={retire}
                />
                <Button label="Keep on the squad" variant="quiet" testID="squad-detail-retire-no" onPress={() => setConfirmRetire(false)} />
              </View>
            </View>
          ) : (
            <Button
              label="Retire"
              variant="quiet"
              testID="squad-detail-retire"
              accessibilityLabel={`Retire ${name}`}
              style={styles.start}
              onPress={() => {
                setOutcome(null);
                setConfirmRetire(true);
              }}
            />
          )}
        </>
      ) : null}

    </Card>
  );
}

/** Rename in place: the squad's other names are checked as the coach types; the server's 409 lands on the field too. */
function RenameForm({
  teamId,
  skater,
  skaters,
  onDone,
}: {
  teamId: string;
  skater: Skater;
  skaters: Skater[];
  onDone: (confirmation: string | null) => void;
}) {
  const update = useUpdateSkater(teamId);
  const schema = useMemo(
    () =>
      z.object({
        displayName: displayNameSchema.superRefine((value, ctx) => {
          const message = skaterNameProblem(skaters, value, skater.id);
          if (message) ctx.addIssue({ code: 'custom', message });
        }),
      }),
    [skaters, skater.id],
  );
  const form = useZodForm(schema, { displayName: skater.displayName });

  const save = () =>
    form.submit(async ({ displayName }) => {
      if (displayName === skater.displayName) return onDone(null);
      try {
        await update.mutateAsync({ skaterId: skater.id, change: { displayName } });
        onDone(`Renamed to ${displayName}.`);
      } catch (error) {
        form.applyServerError(isApiRequestError(error) ? error : { message: `Could not rename ${skater.displayName}. Try again.` });
      }
    });

  return (
    <View style={styles.box} testID="squad-rename-form">
      {form.formError ? (
        <Banner kind="error" testID="squad-rename-error">
          {form.formError}
        </Banner>
      ) : null}
      <TextField
        label={`New name for ${skater.displayName}`}
        testID="squad-rename-input"
        autoCapitalize="words"
        autoFocus
        onSubmitEditing={() => void save()}
        {...form.field('displayName')}
      />
      <View style={styles.actions}>
        <Button
          label={update.isPending ? 'Saving…' : 'Save name'}
          testID="squad-rename-save"
          loading={update.isPending}
          onPress={() => void save()}
        />
        <Button label="Cancel" variant="quiet" testID="squad-rename-cancel" onPress={() => onDone(null)} />
      </View>
    </View>
  );
}

/**
 * A new group, named once; it appears among the group chips above for the coach to pick. Closed
 * behind one button until needed, so the skater's pane stays short on a phone.
 */
function NewGroupForm({ teamId, groups }: { teamId: string; groups: Group[] }) {
  const [open, setOpen] = useState(false);
  const [added, setAdded] = useState<string | null>(null);
  if (!open) {
    return (
      <View style={styles.section}>
        {added ? (
          <Banner kind="success" testID="squad-new-group-done">
            {`Group “${added}” added. Pick it above to move the skater.`}
          </Banner>
        ) : null}
        <Button
          label="New group"
          variant="quiet"
          testID="squad-new-group-open"
          style={styles.start}
          onPress={() => {
            setAdded(null);
            setOpen(true);
          }}
        />
      </View>
    );
  }
  return (
    <NewGroupFields
      teamId={teamId}
      groups={groups}
      onDone={(name) => {
        setAdded(name);
        setOpen(false);
      }}
    />
  );
}

function NewGroupFields({ teamId, groups, onDone }: { teamId: string; groups: Group[]; onDone: (added: string | null) => void }) {
  const addGroup = useAddGroup(teamId);
  const schema = useMemo(
    () =>
      z.object({
        name: displayNameSchema.superRefine((value, ctx) => {
          const message = groupNameProblem(groups, value);
          if (message) ctx.addIssue({ code: 'custom', message });
        }),
      }),
    [groups],
  );
  const form = useZodForm(schema, { name: '' });

  const save = () =>
    form.submit(async ({ name }) => {
      try {
        const group = await addGroup.mutateAsync({ name });
        onDone(group.name);
      } catch (error) {
        form.applyServerError(isApiRequestError(error) ? error : { message: 'Could not add the group. Try again.' });
      }
    });

  return (
    <View style={styles.box} testID="squad-new-group">
      {form.formError ? (
        <Banner kind="error" testID="squad-new-group-error">
          {form.formError}
        </Banner>
      ) : null}
      <TextField
        label="New group"
        hint="For example Juniors or Sprint"
        testID="squad-new-group-name"
        autoCapitalize="words"
        autoFocus
        onSubmitEditing={() => void save()}
        {...form.field('name')}
      />
      <View style={styles.actions}>
        <Button
          label={addGroup.isPending ? 'Adding…' : 'Add group'}
          variant="secondary"
          testID="squad-new-group-submit"
          loading={addGroup.isPending}
          onPress={() => void save()}
        />
        <Button label="Cancel" variant="quiet" testID="squad-new-group-cancel" onPress={() => onDone(null)} />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  titleRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  grow: { flex: 1 },
  retiredTag: {
    paddingHorizontal: spacing.xs,
    paddingVertical: 2,
    borderRadius: radius.sm,
    borderWidth: 1,
    borderColor: colors.border,
    color: colors.inkMuted,
  },
  section: { gap: spacing.sm },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  start: { alignSelf: 'flex-start' },
  box: { gap: spacing.xs, padding: spacing.sm, borderRadius: radius.md, backgroundColor: colors.surfaceSunken },
  confirm: {
    gap: spacing.xs,
    padding: spacing.md,
    borderRadius: radius.md,
    borderWidth: 2,
    borderColor: colors.error,
    backgroundColor: colors.errorSurface,
  },
});
