import { Link, useLocalSearchParams, useRouter } from 'expo-router';
import { useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useAcceptInvitationMutation, useInvitationPreviewQuery } from '@/api/queries/mail';
import { useMeQuery, useSignInMutation, useSignUpMutation } from '@/api/queries/session';
import { Button } from '@/components/button';
import { QueryState } from '@/components/query-state';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { AuthFrame } from '@/features/auth/auth-frame';
import { FormError } from '@/features/auth/form-error';
import { rememberCollection } from '@/features/collections/current-collection';
import { ROLE_LABELS } from '@/lib/format';
import { NEW_PASSWORD_HINT, signInInputSchema, signUpInputSchema } from '@/shared/schemas/auth';
import type { InvitationPreview } from '@/shared/schemas/mail';
import { spacing } from '@/theme';

type Mode = 'sign-up' | 'sign-in';
const MODES = [
  { value: 'sign-up', label: 'I am new here' },
  { value: 'sign-in', label: 'I have an account' },
] as const;

/**
 * Where an invitation link lands: shows the collection and role, lets the person sign up or
 * sign in (or use the account already signed in), then accepts and opens the collection.
 */
export function InviteScreen() {
  const { token } = useLocalSearchParams<{ token: string }>();
  // Signing up or in clears the cache of the person before; the invitation read stays on screen.
  const held = useRef<InvitationPreview | undefined>(undefined);
  const preview = useInvitationPreviewQuery(token ?? '', !held.current);
  if (preview.data) held.current = preview.data;
  const me = useMeQuery();

  if (held.current) {
    return (
      <AuthFrame title="You are invited">
        {me.isPending ? <Text color="textMuted">Checking your session…</Text> : <InviteBody token={token!} invitation={held.current} signedInAs={me.data?.user ?? null} />}
      </AuthFrame>
    );
  }
  if (preview.isError && preview.error instanceof ApiError && preview.error.status >= 400 && preview.error.status < 500) {
    return (
      <AuthFrame title="This invitation cannot be used">
        <View role="alert" testID="invite-refused">
          <Text>{preview.error.message}</Text>
        </View>
      </AuthFrame>
    );
  }
  return (
    <AuthFrame title="You are invited">
      <QueryState query={preview} loadingLabel="Reading the invitation…">
        {(invitation) =>
          me.isPending ? (
            <Text color="textMuted">Checking your session…</Text>
          ) : (
            <InviteBody token={token!} invitation={invitation} signedInAs={me.data?.user ?? null} />
          )
        }
      </QueryState>
    </AuthFrame>
  );
}

function InviteBody({ token, invitation, signedInAs }: { token: string; invitation: InvitationPreview; signedInAs: { email: string; displayName: string } | null }) {
  const router = useRouter();
  const accept = useAcceptInvitationMutation(token);
  const signUp = useSignUpMutation();
  const signIn = useSignInMutation();
  const [mode, setMode] = useState<Mode>('sign-up');
  const [email, setEmail] = useState(invitation.email);
  const [displayName, setDisplayName] = useState('');
  const [password, setPassword] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string>();
  const [busy, setBusy] = useState(false);

  const finish = async () => {
    const accepted = await accept.mutateAsync();
    rememberCollection(accepted.collectionId);
    router.replace('/collection');
  };

  const run = async (action: () => Promise<void>) => {
    setFormError(undefined);
    setBusy(true);
    try {
      await action();
    } catch (error) {
      if (error instanceof ApiError && error.details.length > 0) {
        setErrors(Object.fromEntries(error.details.map((d) => [d.field, d.reason])));
      } else {
        setFormError(error instanceof ApiError ? error.message : 'Something went wrong; try again.');
      }
    } finally {
      setBusy(false);
    }
  };

  const submit = () =>
    run(async () => {
      const schema = mode === 'sign-up' ? signUpInputSchema : signInInputSchema;
      const parsed = schema.safeParse(mode === 'sign-up' ? { email, password, displayName } : { email, password });
      if (!parsed.success) {
        setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
        return;
      }
      setErrors({});
      if (mode === 'sign-up') await signUp.mutateAsync(parsed.data as never);
      else await signIn.mutateAsync(parsed.data);
      await finish();
    });

  return (
    <View style={styles.body} testID="invite-screen">
      <Text>
        {invitation.invitedBy ? `${invitation.invitedBy} invites you` : 'You are invited'} to the collection{' '}
        <Text variant="bodyStrong" testID="invite-collection">
          {invitation.collectionName}
        </Text>{' '}
        as <Text variant="bodyStrong">{ROLE_LABELS[invitation.role].toLowerCase()}</Text>.
      </Text>
      <Text variant="caption" color="textMuted">
        Sent to {invitation.email}; the link works once, until {invitation.expiresAt.slice(0, 10)}.
      </Text>
      <FormError message={formError} />
      {signedInAs ? (
        <>
          <Text>
            You are signed in as {signedInAs.displayName} ({signedInAs.email}).
          </Text>
          <Button label="Accept and open the collection" testID="invite-accept" loading={busy} onPress={() => run(finish)} />
        </>
      ) : (
        <>
          <Segmented label="Do you have a Sympodia account?" value={mode} options={MODES} onChange={setMode} testID="invite-mode" />
          {mode === 'sign-up' ? (
            <TextField label="Your name" testID="invite-name" autoComplete="name" value={displayName} onChangeText={setDisplayName} error={errors.displayName} />
          ) : null}
          <TextField
            label="E-mail"
            testID="invite-account-email"
            autoComplete="email"
            inputMode="email"
            autoCapitalize="none"
            value={email}
            onChangeText={setEmail}
            error={errors.email}
          />
          <TextField
            label={mode === 'sign-up' ? 'Choose a password' : 'Password'}
            testID="invite-password"
            autoComplete={mode === 'sign-up' ? 'new-password' : 'current-password'}
            secureTextEntry
            value={password}
            onChangeText={setPassword}
            error={errors.password}
            hint={mode === 'sign-up' ? NEW_PASSWORD_HINT : undefined}
            onSubmitEditing={submit}
          />
          <Button label={mode === 'sign-up' ? 'Create account and join' : 'Sign in and join'} testID="invite-submit" loading={busy} onPress={submit} />
          {mode === 'sign-in' ? (
            // The invitation mail stays valid meanwhile: its link brings the person back here.
            <Link href="/forgot-password" testID="invite-forgot-password">
              <Text color="accent">Forgot password? Reset it, then open the invitation link again.</Text>
            </Link>
          ) : null}
        </>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  body: { gap: spacing.lg },
});
