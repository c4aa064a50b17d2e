import { Link } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useSignInMutation, useSignUpMutation } from '@/api/queries/session';
import { Button } from '@/components/button';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { NEW_PASSWORD_HINT, signInInputSchema, signUpInputSchema } from '@/shared/schemas/auth';
import { spacing } from '@/theme';
import { FormError } from './form-error';

type Mode = 'sign-up' | 'sign-in';
const MODES = [
  { value: 'sign-up', label: 'I am new here' },
  { value: 'sign-in', label: 'I have an account' },
] as const;

export interface AccountForLinkProps {
  /** The address the link was sent to, filled in to start with. */
  email: string;
  /** Prefix of the fields' test ids: `<prefix>-name`, `-account-email`, `-password`, `-submit`, `-mode`. */
  testIDPrefix: string;
  submitLabel: { signUp: string; signIn: string };
  /** Under the sign-in form: what to do after resetting the password. */
  forgotPasswordText: string;
  /** This page's path: the mailed sign-up link brings the new account back here. */
  returnTo: string;
  /**
   * Called once the person is signed in. The screen then shows its signed-in state (this
   * form goes away), so whatever the link offers is accepted, and refused, there.
   */
  onSignedIn?: () => void;
}

/**
 * Sign up or sign in on a screen a mailed link opened (an invitation, a hand-off): the
 * account part of accepting it, with the fields checked before sending and the server's
 * reasons shown beside them.
 */
export function AccountForLink({ email: sentTo, testIDPrefix, submitLabel, forgotPasswordText, returnTo, onSignedIn }: AccountForLinkProps) {
  const signUp = useSignUpMutation();
  const signIn = useSignInMutation();
  const [mode, setMode] = useState<Mode>('sign-up');
  const [email, setEmail] = useState(sentTo);
  const [displayName, setDisplayName] = useState('');
  const [password, setPassword] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string>();
  const [busy, setBusy] = useState(false);
  const [mailedTo, setMailedTo] = useState<string>();

  const submit = async () => {
    setFormError(undefined);
    const parsed = mode === 'sign-up' ? signUpInputSchema.safeParse({ email, password, displayName, next: returnTo }) : signInInputSchema.safeParse({ email, password });
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setErrors({});
    setBusy(true);
    try {
      if (mode === 'sign-up') {
        // The account is made by the mailed link, which brings the person back to this page.
        setMailedTo((await signUp.mutateAsync(parsed.data as never)).email);
        return;
      }
      await signIn.mutateAsync(parsed.data);
      onSignedIn?.();
    } catch (error) {
      if (error instanceof ApiError && error.details.length > 0) setErrors(Object.fromEntries(error.details.map((d) => [d.field, d.reason])));
      else setFormError(error instanceof ApiError ? error.message : 'Something went wrong; try again.');
    } finally {
      setBusy(false);
    }
  };

  if (mailedTo) {
    return (
      <View style={styles.body} testID={`${testIDPrefix}-check-mail`}>
        <Text>
          Check your mail: a link to finish creating your account is on its way to <Text variant="bodyStrong">{mailedTo}</Text>. It brings you back
          here, signed in, to finish.
        </Text>
        <Text color="textMuted">If this address already has an account, the mail says so instead; sign in here with it.</Text>
      </View>
    );
  }

  return (
    <View style={styles.body}>
      <FormError message={formError} />
      <Segmented label="Do you have a Sympodia account?" value={mode} options={MODES} onChange={setMode} testID={`${testIDPrefix}-mode`} />
      {mode === 'sign-up' ? (
        <TextField label="Your name" testID={`${testIDPrefix}-name`} autoComplete="name" value={displayName} onChangeText={setDisplayName} error={errors.displayName} />
      ) : null}
      <TextField
        label="E-mail"
        testID={`${testIDPrefix}-account-email`}
        autoComplete="email"
        inputMode="email"
        autoCapitalize="none"
        value={email}
        onChangeText={setEmail}
        error={errors.email}
      />
      <TextField
        label={mode === 'sign-up' ? 'Choose a password' : 'Password'}
        testID={`${testIDPrefix}-password`}
        autoComplete={mode === 'sign-up' ? 'new-password' : 'current-password'}
        secureTextEntry
        value={password}
        onChangeText={setPassword}
        error={errors.password}
        hint={mode === 'sign-up' ? NEW_PASSWORD_HINT : undefined}
        onSubmitEditing={submit}
      />
      <Button label={mode === 'sign-up' ? submitLabel.signUp : submitLabel.signIn} testID={`${testIDPrefix}-submit`} loading={busy} onPress={submit} />
      {mode === 'sign-in' ? (
        // The mail stays valid meanwhile: its link brings the person back here.
        <Link href="/forgot-password" testID={`${testIDPrefix}-forgot-password`}>
          <Text color="accent">{forgotPasswordText}</Text>
        </Link>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  body: { gap: spacing.lg },
});
