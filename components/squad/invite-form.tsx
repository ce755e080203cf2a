/**
 * Invite someone by e-mail (head coach): an assistant coach, or a skater or guardian tied to one
 * skater profile. A preset (from the skater detail pane) fills role and profile in one tap.
 */
import { useEffect, useState } from 'react';
import { z } from 'zod';

import { invitationCreateSchema, type Skater } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { useInvite } from '../../store/team';
import { Banner, Button, Card, ChoiceChips, Heading, Text, TextField, useZodForm } from '../ui';

export type InviteRole = 'coach' | 'skater' | 'guardian';
export type InvitePreset = { role: InviteRole; skaterId: string | null; nonce: number };

// The form holds strings; the API wants skaterId only for skater/guardian invitations.
const inviteFormSchema = z.preprocess((raw) => {
  const v = raw as { email: string; role: string; skaterId: string };
  return { email: v.email, role: v.role, ...(v.role !== 'coach' && v.skaterId ? { skaterId: v.skaterId } : {}) };
}, invitationCreateSchema);

const roleChoices = [
  { value: 'coach' as const, label: 'Coach', testID: 'invite-role-coach' },
  { value: 'skater' as const, label: 'Skater', testID: 'invite-role-skater' },
  { value: 'guardian' as const, label: 'Guardian', testID: 'invite-role-guardian' },
];

export function InviteForm({ teamId, skaters, preset }: { teamId: string; skaters: Skater[]; preset: InvitePreset | null }) {
  const invite = useInvite(teamId);
  const form = useZodForm(inviteFormSchema, { email: '', role: '', skaterId: '' });
  const [sentTo, setSentTo] = useState<string | null>(null);

  useEffect(() => {
    if (!preset) return;
    form.setValue('role', preset.role);
    form.setValue('skaterId', preset.skaterId ?? '');
    // Re-apply only when a new preset is chosen (nonce), not when the form re-renders.
  }, [preset?.nonce]);

  const role = (form.values.role || null) as InviteRole | null;
  const needsSkater = role === 'skater' || role === 'guardian';

  // form.submit ignores a second tap while the first is being saved: one invitation per double tap.
  const onSubmit = () =>
    form.submit(async (data) => {
      setSentTo(null);
      try {
        await invite.mutateAsync(data);
        form.reset();
        setSentTo(data.email);
      } catch (error) {
        form.applyServerError(isApiRequestError(error) ? error : { message: 'Could not send the invitation. Try again.' });
      }
    });

  const skaterChoices = [...skaters]
    .sort((a, b) => a.displayName.localeCompare(b.displayName))
    .map((s) => ({ value: s.id, label: s.displayName, testID: `invite-skater-${s.id}` }));

  return (
    <Card testID="invite-form">
      <Heading level={2}>Invite by e-mail</Heading>
      {sentTo ? (
        <Banner kind="success" testID="invite-sent">
          {`Invitation sent to ${sentTo}. They will find a link in their e-mail.`}
        </Banner>
      ) : null}
      {form.formError ? (
        <Banner kind="error" testID="invite-error">
          {form.formError}
        </Banner>
      ) : null}
      <TextField
        label="E-mail"
        testID="invite-email"
        keyboardType="email-address"
        inputMode="email"
        autoCapitalize="none"
        autoCorrect={false}
        {...form.field('email')}
      />
      <ChoiceChips
        label="Invite as"
        choices={roleChoices}
        value={role}
        onChange={(value) => form.setValue('role', value)}
        error={form.errors.role}
        testID="invite-role"
      />
      {needsSkater ? (
        skaterChoices.length > 0 ? (
          <ChoiceChips
            label={role === 'guardian' ? 'Guardian of' : 'Skater profile'}
            choices={skaterChoices}
            value={form.values.skaterId || null}
            onChange={(value) => form.setValue('skaterId', value)}
            error={form.errors.skaterId}
            testID="invite-skater"
          />
        ) : (
          <Text tone="muted" testID="invite-no-skaters">
            Add the skater to the squad first, then invite them or their guardian.
          </Text>
        )
      ) : null}
      <Button
        label={invite.isPending ? 'Sending…' : 'Send invitation'}
        testID="invite-submit"
        onPress={onSubmit}
        loading={invite.isPending}
      />
    </Card>
  );
}
