/**
 * Reset password: opened from the e-mailed link (?token=...). Choosing the new password also signs
 * the person in, so they land straight on their home.
 */
import { useRouter } from 'expo-router';

import { linkTokenSchema, passwordResetConfirmSchema } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { useConfirmPasswordReset } from '../../store/auth';
import { Banner, Button, TextLink, useZodForm } from '../ui';
import { AuthFrame } from './auth-frame';
import { PasswordField } from './password-field';

export function ResetPasswordScreen({ token }: { token: string }) {
  const router = useRouter();
  const confirm = useConfirmPasswordReset();
  const form = useZodForm(passwordResetConfirmSchema, { token, password: '' });
  const tokenCheck = linkTokenSchema.safeParse(token);

  if (!tokenCheck.success) {
    return (
      <AuthFrame title="Reset your password" testID="reset-password-screen">
        <Banner kind="error" testID="reset-bad-link">
          {tokenCheck.error.issues[0]?.message ?? 'This link is not valid.'}
        </Banner>
        <TextLink href="/forgot-password" label="Ask for a new link" testID="reset-new-link" />
      </AuthFrame>
    );
  }

  const onSubmit = () =>
    form.submit(async (data) => {
      try {
        await confirm.mutateAsync(data);
        router.replace('/');
      } catch (error) {
        form.applyServerError(isApiRequestError(error) ? error : { message: 'Could not change the password. Try again.' });
      }
    });

  return (
    <AuthFrame title="Choose a new password" testID="reset-password-screen">
      {form.formError ? (
        <Banner kind="error" testID="reset-error">
          {form.formError}
        </Banner>
      ) : null}
      <PasswordField
        label="New password"
        testID="reset-password"
        hint="At least 8 characters."
        autoComplete="new-password"
        onSubmitEditing={onSubmit}
        {...form.field('password')}
      />
      <Button
        label={confirm.isPending ? 'Saving…' : 'Save and sign in'}
        testID="reset-submit"
        onPress={onSubmit}
        loading={confirm.isPending}
        block
      />
      <TextLink href="/forgot-password" label="Link expired? Ask for a new one" testID="reset-new-link" />
    </AuthFrame>
  );
}
