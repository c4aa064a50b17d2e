import { Link, useLocalSearchParams, useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useConfirmSignUpMutation } from '@/api/queries/session';
import { Button } from '@/components/button';
import { Text } from '@/components/text';
import { spacing } from '@/theme';
import { AuthFrame } from './auth-frame';

/**
 * Where a sign-up link lands: one press makes the account and signs in, then the app opens
 * (or the invitation or hand-off page the sign-up started from). A press, not the page load,
 * so a mail program that opens links to look at them makes no account.
 */
export function WelcomeScreen() {
  const { token } = useLocalSearchParams<{ token: string }>();
  const router = useRouter();
  const confirm = useConfirmSignUpMutation();
  const failure = confirm.error ? (confirm.error instanceof ApiError ? confirm.error.message : 'Something went wrong; try again.') : undefined;

  return (
    <AuthFrame title="Finish creating your account">
      <View style={styles.body}>
        <Text>Your address is confirmed by this link. Create the account to start: your first collection is made for you.</Text>
        {failure ? (
          <View role="alert" testID="welcome-error" style={styles.body}>
            <Text color="danger">{failure}</Text>
            <Link href="/sign-up">
              <Text color="accent" variant="bodyStrong">
                Sign up again
              </Text>
            </Link>
          </View>
        ) : null}
        <Button
          label="Create my account"
          testID="welcome-finish"
          loading={confirm.isPending}
          onPress={() => confirm.mutate(token ?? '', { onSuccess: (answer) => router.replace(answer.next ?? '/') })}
        />
      </View>
    </AuthFrame>
  );
}

const styles = StyleSheet.create({
  body: { gap: spacing.md },
});
