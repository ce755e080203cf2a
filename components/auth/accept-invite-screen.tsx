/**
 * Accept an invitation (?token=...): first shows who invited whom to which team and as what, so
 * nobody joins a team by mistake; then asks for a name and password and signs the person in.
 * People who already have an account confirm with their current password instead.
 */
import { useQuery } from '@tanstack/react-query';
import { useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';

import { invitationAcceptSchema, linkTokenSchema, roleLabels, type InvitationPreview } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { invitationPreviewQuery, useAcceptInvite } from '../../store/auth';
import { Banner, Button, Loading, Text, TextField, TextLink, colors, radius, spacing, useZodForm } from '../ui';
import { AuthFrame } from './auth-frame';
import { PasswordField } from './password-field';

function describeRole(preview: InvitationPreview) {
  if (preview.role === 'guardian' && preview.skaterName) return `Guardian of ${preview.skaterName}`;
  if (preview.role === 'skater' && preview.skaterName) return `Skater (${preview.skaterName})`;
  return roleLabels[preview.role];
}

function InvitationSummary({ preview }: { preview: InvitationPreview }) {
  const rows: [string, string][] = [
    ['Team', preview.teamName],
    ['You join as', describeRole(preview)],
    ['Invited by', preview.invitedBy],
    ['For', preview.email],
  ];
  return (
    <View style={styles.summary} testID="accept-summary">
      {rows.map(([label, value]) => (
        <View key={label} style={styles.summaryRow}>
          <Text tone="muted" variant="caption">
            {label}
          </Text>
          <Text weight="bold">
            {value}
          </Text>
        </View>
      ))}
    </View>
  );
}

function AcceptForm({ token, preview }: { token: string; preview: InvitationPreview }) {
  const router = useRouter();
  const accept = useAcceptInvite();
  // A skater's profile name is a good first guess for their own name; a guardian's is not.
  const initialName = preview.role === 'skater' ? (preview.skaterName ?? '') : '';
  const form = useZodForm(invitationAcceptSchema, { token, displayName: initialName, password: '' });

  const onSubmit = () =>
    form.submit(async (data) => {
      try {
        await accept.mutateAsync(data);
        router.replace('/');
      } catch (error) {
        form.applyServerError(isApiRequestError(error) ? error : { message: 'Could not join the team. Try again.' });
      }
    });

  return (
    <>
      {form.formError ? (
        <Banner kind="error" testID="accept-error">
          {form.formError}
        </Banner>
      ) : null}
      <TextField
        label="Your name"
        testID="accept-name"
        autoComplete="name"
        hint={preview.role === 'guardian' ? 'Your own name, as the skater’s guardian.' : undefined}
        {...form.field('displayName')}
      />
      <PasswordField
        label={preview.existingAccount ? 'Your current Boardside password' : 'Choose a password'}
        hint={
          preview.existingAccount
            ? `${preview.email} already has an account: confirm it is you.`
            : 'At least 8 characters.'
        }
        testID="accept-password"
        autoComplete={preview.existingAccount ? 'current-password' : 'new-password'}
        onSubmitEditing={onSubmit}
        {...form.field('password')}
      />
      <Button
        label={accept.isPending ? 'Joining…' : `Join ${preview.teamName}`}
        testID="accept-submit"
        onPress={onSubmit}
        loading={accept.isPending}
        block
      />
    </>
  );
}

export function AcceptInviteScreen({ token }: { token: string }) {
  const tokenCheck = linkTokenSchema.safeParse(token);
  const preview = useQuery({ ...invitationPreviewQuery(token), enabled: tokenCheck.success });

  let body;
  if (!tokenCheck.success) {
    body = (
      <Banner kind="error" testID="accept-bad-link">
        {tokenCheck.error.issues[0]?.message ?? 'This link is not valid.'}
      </Banner>
    );
  } else if (preview.isPending) {
    body = <Loading label="Checking your invitation…" testID="accept-loading" />;
  } else if (preview.isError) {
    const error = preview.error;
    const gone = isApiRequestError(error) && (error.status === 404 || error.status === 410);
    body = (
      <Banner kind="error" title={gone ? 'This invitation no longer works' : undefined} testID="accept-load-error">
        {gone
          ? 'It may have expired or been used already. Ask the coach who invited you to send a new one.'
          : isApiRequestError(error)
            ? error.message
            : 'Could not load the invitation.'}
      </Banner>
    );
  } else {
    body = (
      <>
        <InvitationSummary preview={preview.data} />
        <AcceptForm token={token} preview={preview.data} />
      </>
    );
  }

  return (
    <AuthFrame title="Join your team" testID="accept-invite-screen">
      {body}
      <TextLink href="/sign-in" label="Back to sign in" testID="accept-to-sign-in" />
    </AuthFrame>
  );
}

const styles = StyleSheet.create({
  summary: {
    backgroundColor: colors.surfaceSunken,
    borderRadius: radius.md,
    padding: spacing.md,
    gap: spacing.sm,
  },
  // Label above value: long e-mails and team names wrap cleanly on a 390 px phone.
  summaryRow: { gap: 0 },
});
