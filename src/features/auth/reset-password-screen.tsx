import { Link, useLocalSearchParams, useRouter } from 'expo-router';
import { useState } from 'react';
import { ApiError } from '@/api/client';
import { useCompletePasswordResetMutation } from '@/api/queries/mail';
import { Button } from '@/components/button';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { NEW_PASSWORD_HINT, newPasswordSchema } from '@/shared/schemas/auth';
import { AuthFrame } from './auth-frame';
import { FormError } from './form-error';

/** Where a reset link lands: choose a new password; every other session of the account ends. */
export function ResetPasswordScreen() {
  const { token } = useLocalSearchParams<{ token: string }>();
  const router = useRouter();
  const complete = useCompletePasswordResetMutation();
  const [password, setPassword] = useState('');
  const [repeat, setRepeat] = useState('');
  const [errors, setErrors] = useState<{ password?: string; repeat?: string }>({});
  const [formError, setFormError] = useState<string>();

  const submit = () => {
    const parsed = newPasswordSchema.safeParse(password);
    if (!parsed.success) return setErrors({ password: parsed.error.issues[0]?.message });
    if (password !== repeat) return setErrors({ repeat: 'The two passwords differ' });
    setErrors({});
    setFormError(undefined);
    complete.mutate(
      { token: token ?? '', password },
      {
        onSuccess: () => router.replace('/'),
        onError: (error) => {
          if (error instanceof ApiError && error.fieldError('password')) setErrors({ password: error.fieldError('password') });
          else setFormError(error instanceof ApiError ? error.message : 'Something went wrong; try again.');
        },
      },
    );
  };

  return (
    <AuthFrame title="Choose a new password">
      <Text color="textMuted">Saving it signs you out on every other device.</Text>
      <FormError message={formError} />
      <TextField
        label="New password"
        testID="new-password"
        autoComplete="new-password"
        secureTextEntry
        value={password}
        onChangeText={setPassword}
        error={errors.password}
        hint={NEW_PASSWORD_HINT}
      />
      <TextField
        label="The same password again"
        testID="new-password-repeat"
        autoComplete="new-password"
        secureTextEntry
        value={repeat}
        onChangeText={setRepeat}
        error={errors.repeat}
        onSubmitEditing={submit}
      />
      <Button label="Save the new password" testID="new-password-save" onPress={submit} loading={complete.isPending} />
      <Link href="/forgot-password">
        <Text color="accent" variant="bodyStrong">
          Ask for a new link
        </Text>
      </Link>
    </AuthFrame>
  );
}
