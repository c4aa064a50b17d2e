import { Link } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useRequestPasswordResetMutation } from '@/api/queries/mail';
import { Button } from '@/components/button';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { requestPasswordResetInputSchema } from '@/shared/schemas/mail';
import { spacing } from '@/theme';
import { AuthFrame } from './auth-frame';
import { FormError } from './form-error';

/** Asks for a reset link. The answer is the same whether or not the address has an account. */
export function ForgotPasswordScreen() {
  const request = useRequestPasswordResetMutation();
  const [email, setEmail] = useState('');
  const [error, setError] = useState<string>();
  const [sent, setSent] = useState<string>();

  const submit = () => {
    const parsed = requestPasswordResetInputSchema.safeParse({ email });
    if (!parsed.success) {
      setError(parsed.error.issues[0]?.message);
      return;
    }
    setError(undefined);
    request.mutate(parsed.data.email, { onSuccess: () => setSent(parsed.data.email) });
  };

  const failure = request.error instanceof ApiError ? request.error.message : request.error ? 'Something went wrong; try again.' : undefined;

  return (
    <AuthFrame title="Forgot your password?">
      {sent ? (
        <View role="status" testID="reset-requested" style={styles.body}>
          <Text>
            If an account uses {sent}, a link to set a new password is on its way. It works once, within one hour.
          </Text>
        </View>
      ) : (
        <>
          <Text color="textMuted">Enter the e-mail you sign in with and we will send a link to choose a new password.</Text>
          <FormError message={failure} />
          <TextField
            label="E-mail"
            testID="reset-email"
            autoComplete="email"
            inputMode="email"
            autoCapitalize="none"
            value={email}
            onChangeText={setEmail}
            error={error}
            onSubmitEditing={submit}
          />
          <Button label="Send the link" testID="reset-request" onPress={submit} loading={request.isPending} />
        </>
      )}
      <Link href="/sign-in" testID="back-to-sign-in">
        <Text color="accent" variant="bodyStrong">
          Back to sign in
        </Text>
      </Link>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({ body: { gap: spacing.md } });
