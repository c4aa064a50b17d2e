import { useLocalSearchParams, useRouter } from 'expo-router';
import { useEffect, useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useAcceptInvitationMutation, useInvitationPreviewQuery } from '@/api/queries/mail';
import { useMeQuery } from '@/api/queries/session';
import { Button } from '@/components/button';
import { QueryState } from '@/components/query-state';
import { Text } from '@/components/text';
import { AccountForLink } from '@/features/auth/account-for-link';
import { AuthFrame } from '@/features/auth/auth-frame';
import { FormError } from '@/features/auth/form-error';
import { rememberCollection } from '@/features/collections/current-collection';
import { ROLE_LABELS } from '@/lib/format';
import type { InvitationPreview } from '@/shared/schemas/mail';
import { spacing } from '@/theme';

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
  // Signing up or in here means joining: once signed in, the invitation is accepted at once.
  const [joinOnSignIn, setJoinOnSignIn] = useState(false);

  const finish = async () => {
    const accepted = await accept.mutateAsync();
    rememberCollection(accepted.collectionId);
    router.replace('/collection');
  };
  useEffect(() => {
    if (!joinOnSignIn || !signedInAs) return;
    setJoinOnSignIn(false);
    finish().catch(() => {});
    // Keyed on the sign-in itself, not on `finish`, which is a new function every render.
  }, [joinOnSignIn, signedInAs]);
  const acceptError = accept.error ? (accept.error instanceof ApiError ? accept.error.message : 'Something went wrong; try again.') : undefined;

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
      {signedInAs ? (
        <>
          <FormError message={acceptError} />
          <Text>
            You are signed in as {signedInAs.displayName} ({signedInAs.email}).
          </Text>
          <Button label="Accept and open the collection" testID="invite-accept" loading={accept.isPending} onPress={() => finish().catch(() => {})} />
        </>
      ) : (
        <AccountForLink
          email={invitation.email}
          testIDPrefix="invite"
          submitLabel={{ signUp: 'Create account and join', signIn: 'Sign in and join' }}
          forgotPasswordText="Forgot password? Reset it, then open the invitation link again."
          returnTo={`/invite/${token}`}
          onSignedIn={() => setJoinOnSignIn(true)}
        />
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  body: { gap: spacing.lg },
});
