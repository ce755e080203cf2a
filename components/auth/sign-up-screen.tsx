/** Sign-up: a coach creates an account and their team in one step, becoming its head coach. */
import { StyleSheet, View } from 'react-native';

import { signUpSchema } from '../../shared/schemas';
import { isApiRequestError } from '../../store/api';
import { useSignUp } from '../../store/auth';
import { Banner, Button, TextField, TextLink, spacing, useZodForm } from '../ui';
import { AuthFrame } from './auth-frame';
import { PasswordField } from './password-field';

export function SignUpScreen() {
  const signUp = useSignUp();
  const form = useZodForm(signUpSchema, { displayName: '', teamName: '', email: '', password: '' });

  const onSubmit = () =>
    form.submit(async (data) => {
      try {
        await signUp.mutateAsync({ ...data, timeZone: Intl.DateTimeFormat().resolvedOptions().timeZone });
      } catch (error) {
        form.applyServerError(isApiRequestError(error) ? error : { message: 'Could not create the team. Try again.' });
      }
    });

  return (
    <AuthFrame
      title="Start a team"
      intro="You become the team's head coach and can invite assistant coaches, skaters and guardians."
      testID="sign-up-screen"
    >
      {form.formError ? (
        <Banner kind="error" testID="sign-up-error">
          {form.formError}
        </Banner>
      ) : null}
      <TextField label="Your name" testID="sign-up-name" autoComplete="name" {...form.field('displayName')} />
      <TextField
        label="Team name"
        testID="sign-up-team"
        hint="For example your club or training group."
        autoComplete="organization"
        {...form.field('teamName')}
      />
      <TextField
        label="E-mail"
        testID="sign-up-email"
        keyboardType="email-address"
        inputMode="email"
        autoCapitalize="none"
        autoCorrect={false}
        autoComplete="email"
        {...form.field('email')}
      />
      <PasswordField
        label="Password"
        testID="sign-up-password"
        hint="At least 8 characters."
        autoComplete="new-password"
        onSubmitEditing={onSubmit}
        {...form.field('password')}
      />
      <Button
        label={signUp.isPending ? 'Creating your team…' : 'Create team'}
        testID="sign-up-submit"
        onPress={onSubmit}
        loading={signUp.isPending}
        block
      />
      <View style={styles.links}>
        <TextLink href="/sign-in" label="Already have an account? Sign in" testID="sign-up-to-sign-in" />
      </View>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({ links: { gap: spacing.xxs } });
