import { zodResolver } from '@hookform/resolvers/zod';
import { Link } from 'expo-router';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import { useSignUpMutation } from '@/api/queries/session';
import { Button } from '@/components/button';
import { Text } from '@/components/text';
import { FormTextField } from '@/components/form-text-field';
import { NEW_PASSWORD_HINT, signUpInputSchema } from '@/shared/schemas/auth';
import { spacing } from '@/theme';
import { AuthFrame } from './auth-frame';
import { FormError } from './form-error';
import { applyServerErrors } from './use-server-errors';

type Values = z.input<typeof signUpInputSchema>;

export function SignUpScreen() {
  const signUp = useSignUpMutation();
  const [formError, setFormError] = useState<string>();
  const [sentTo, setSentTo] = useState<string>();
  const { control, handleSubmit, setError, formState } = useForm<Values, unknown, z.output<typeof signUpInputSchema>>({
    resolver: zodResolver(signUpInputSchema),
    defaultValues: { displayName: '', email: '', password: '' },
  });

  const submit = handleSubmit(async (values) => {
    setFormError(undefined);
    try {
      setSentTo((await signUp.mutateAsync(values)).email);
    } catch (error) {
      setFormError(applyServerErrors(error, ['displayName', 'email', 'password'], setError));
    }
  });

  if (sentTo) {
    return (
      <AuthFrame title="Check your mail">
        <View testID="sign-up-check-mail" style={styles.sent}>
          <Text>
            A link to finish creating your account is on its way to <Text variant="bodyStrong">{sentTo}</Text>. Open it within 24 hours, on this
            device or another; the account is made when you do.
          </Text>
          <Text color="textMuted">If this address already has an account, the mail says so instead, with a way to sign in.</Text>
        </View>
        <Link href="/sign-in" testID="to-sign-in">
          <Text color="accent" variant="bodyStrong">
            Back to sign in
          </Text>
        </Link>
      </AuthFrame>
    );
  }

  return (
    <AuthFrame title="Create an account">
      <Text color="textMuted">Your first collection is made for you; you can invite others to it later.</Text>
      <FormError message={formError} />
      <FormTextField
        control={control}
        name="displayName"
        emptyAs="text"
        label="Your name"
        testID="sign-up-name"
        autoComplete="name"
      />
      <FormTextField
        control={control}
        name="email"
        emptyAs="text"
        label="E-mail"
        testID="sign-up-email"
        autoComplete="email"
        inputMode="email"
        autoCapitalize="none"
      />
      <FormTextField
        control={control}
        name="password"
        emptyAs="text"
        label="Password"
        testID="sign-up-password"
        autoComplete="new-password"
        secureTextEntry
        hint={NEW_PASSWORD_HINT}
        onSubmitEditing={submit}
      />
      <Button label="Create account" testID="sign-up-submit" onPress={submit} loading={formState.isSubmitting} />
      <View style={styles.footer}>
        <Text color="textMuted">Already have an account?</Text>
        <Link href="/sign-in" testID="to-sign-in">
          <Text color="accent" variant="bodyStrong">
            Sign in
          </Text>
        </Link>
      </View>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({
  sent: { gap: spacing.md },
  footer: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm, alignItems: 'center' },
});
