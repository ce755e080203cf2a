/**
 * Forgot password: asks for the e-mail and always answers the same way, whether or not an account
 * exists, so the page cannot be used to find out who uses Boardside.
 */
import { useState } from 'react';

import { passwordResetRequestSchema } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { useRequestPasswordReset } from '../../store/auth';
import { Banner, Button, TextField, TextLink, useZodForm } from '../ui';
import { AuthFrame } from './auth-frame';

export function ForgotPasswordScreen() {
  const request = useRequestPasswordReset();
  const form = useZodForm(passwordResetRequestSchema, { email: '' });
  const [sentTo, setSentTo] = useState<string | null>(null);

  const onSubmit = () =>
    form.submit(async (data) => {
      try {
        await request.mutateAsync(data);
        setSentTo(data.email);
      } catch (error) {
        form.applyServerError(isApiRequestError(error) ? error : { message: 'Could not send the link. Try again.' });
      }
    });

  return (
    <AuthFrame
      title="Reset your password"
      intro="Enter the e-mail you sign in with. We will send a link to choose a new password."
      testID="forgot-password-screen"
    >
      {sentTo ? (
        <Banner kind="success" title="Check your e-mail" testID="forgot-sent">
          {`If ${sentTo} has a Boardside account, a reset link is on its way. It works for one hour. Look in spam if it does not arrive.`}
        </Banner>
      ) : null}
      {form.formError ? (
        <Banner kind="error" testID="forgot-error">
          {form.formError}
        </Banner>
      ) : null}
      <TextField
        label="E-mail"
        testID="forgot-email"
        keyboardType="email-address"
        inputMode="email"
        autoCapitalize="none"
        autoCorrect={false}
        autoComplete="email"
        onSubmitEditing={onSubmit}
        {...form.field('email')}
      />
      <Button
        label={request.isPending ? 'Sending…' : sentTo ? 'Send again' : 'Send reset link'}
        testID="forgot-submit"
        onPress={onSubmit}
        loading={request.isPending}
        block
      />
      <TextLink href="/sign-in" label="Back to sign in" testID="forgot-to-sign-in" />
    </AuthFrame>
  );
}
