import { zodResolver } from '@hookform/resolvers/zod';
import { Link, useRouter } from 'expo-router';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import { useSignInMutation } from '@/api/queries/session';
import { Button } from '@/components/button';
import { Text } from '@/components/text';
import { FormTextField } from '@/components/form-text-field';
import { signInInputSchema } from '@/shared/schemas/auth';
import { spacing } from '@/theme';
import { AuthFrame } from './auth-frame';
import { FormError } from './form-error';
import { applyServerErrors } from './use-server-errors';

type Values = z.input<typeof signInInputSchema>;

export function SignInScreen() {
  const router = useRouter();
  const signIn = useSignInMutation();
  const [formError, setFormError] = useState<string>();
  const { control, handleSubmit, setError, formState } = useForm<Values, unknown, z.output<typeof signInInputSchema>>({
    resolver: zodResolver(signInInputSchema),
    defaultValues: { email: '', password: '' },
  });

  const submit = handleSubmit(async (values) => {
    setFormError(undefined);
    try {
      await signIn.mutateAsync(values);
      router.replace('/');
    } catch (error) {
      setFormError(applyServerErrors(error, ['email', 'password'], setError));
    }
  });

  return (
    <AuthFrame title="Sign in">
      <FormError message={formError} />
      <FormTextField
        control={control}
        name="email"
        emptyAs="text"
        label="E-mail"
        testID="sign-in-email"
        autoComplete="email"
        inputMode="email"
        autoCapitalize="none"
        onSubmitEditing={submit}
      />
      <FormTextField
        control={control}
        name="password"
        emptyAs="text"
        label="Password"
        testID="sign-in-password"
        autoComplete="current-password"
        secureTextEntry
        onSubmitEditing={submit}
      />
      <Button label="Sign in" testID="sign-in-submit" onPress={submit} loading={formState.isSubmitting} />
      <Link href="/forgot-password" testID="to-forgot-password">
        <Text color="accent">Forgot password?</Text>
      </Link>
      <View style={styles.footer}>
        <Text color="textMuted">New to Sympodia?</Text>
        <Link href="/sign-up" testID="to-sign-up">
          <Text color="accent" variant="bodyStrong">
            Create an account
          </Text>
        </Link>
      </View>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({
  footer: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm, alignItems: 'center' },
});
