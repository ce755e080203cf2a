/** Sign-in: e-mail + password. Coaches who are new start a team from here; others use their invitation. */
import { StyleSheet, View } from 'react-native';

import { signInSchema } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { useSignIn } from '../../store/auth';
import { Banner, Button, Text, TextField, TextLink, spacing, useZodForm } from '../ui';
import { AuthFrame } from './auth-frame';
import { PasswordField } from './password-field';

export function SignInScreen() {
  const signIn = useSignIn();
  const form = useZodForm(signInSchema, { email: '', password: '' });

  const onSubmit = () =>
    form.submit(async (data) => {
      try {
        await signIn.mutateAsync(data);
        // The (auth) layout sees the new session and sends the user to their home.
      } catch (error) {
        form.applyServerError(isApiRequestError(error) ? error : { message: 'Sign-in failed. Try again.' });
      }
    });

  return (
    <AuthFrame title="Sign in" testID="sign-in-screen">
      {form.formError ? (
        <Banner kind="error" testID="sign-in-error">
          {form.formError}
        </Banner>
      ) : null}
      <TextField
        label="E-mail"
        testID="sign-in-email"
        keyboardType="email-address"
        autoCapitalize="none"
        autoCorrect={false}
        autoComplete="email"
        inputMode="email"
        {...form.field('email')}
      />
      <PasswordField
        label="Password"
        testID="sign-in-password"
        autoComplete="current-password"
        onSubmitEditing={onSubmit}
        {...form.field('password')}
      />
      <Button
        label={signIn.isPending ? 'Signing in…' : 'Sign in'}
        testID="sign-in-submit"
        onPress={onSubmit}
        loading={signIn.isPending}
        block
      />
      <View style={styles.links}>
        <TextLink href="/forgot-password" label="Forgot your password?" testID="sign-in-forgot" />
        <TextLink href="/sign-up" label="New coach? Start a team" testID="sign-in-to-sign-up" />
      </View>
      <Text tone="muted" variant="caption">
        Skaters, guardians and assistant coaches: open the invitation link from your e-mail to join your team.
      </Text>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({
  links: { gap: spacing.xxs },
});
