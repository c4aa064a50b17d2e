import { useLocalSearchParams, useRouter } from 'expo-router';
import { useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useAcceptHandoffMutation, useHandoffPreviewQuery } from '@/api/queries/handoffs';
import { useMeQuery, useSignOutMutation } from '@/api/queries/session';
import { Button } from '@/components/button';
import { QueryState } from '@/components/query-state';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { AccountForLink } from '@/features/auth/account-for-link';
import { AuthFrame } from '@/features/auth/auth-frame';
import { rememberCollection } from '@/features/collections/current-collection';
import { formatDate } from '@/lib/dates';
import type { Me } from '@/shared/schemas/auth';
import type { AcceptedHandoff, HandoffPreview } from '@/shared/schemas/handoffs';
import { colors, radius, spacing } from '@/theme';
import { HandoffContentsList } from './components/handoff-contents';

/**
 * Where a hand-off link lands: shows the division and what history comes with it, lets the
 * recipient sign up or sign in, choose one of their collections (or make one), and accept.
 */
export function HandoffScreen() {
  const { token } = useLocalSearchParams<{ token: string }>();
  // Signing in clears the cache of the person before; the preview read stays on screen.
  const held = useRef<HandoffPreview | undefined>(undefined);
  const preview = useHandoffPreviewQuery(token ?? '', !held.current);
  if (preview.data) held.current = preview.data;
  const me = useMeQuery();

  const body = (handoff: HandoffPreview) =>
    me.isPending ? <Text color="textMuted">Checking your session…</Text> : <HandoffBody token={token!} handoff={handoff} me={me.data ?? null} />;

  if (held.current) return <AuthFrame title="A division for you">{body(held.current)}</AuthFrame>;
  if (preview.isError && preview.error instanceof ApiError && preview.error.status >= 400 && preview.error.status < 500) {
    return (
      <AuthFrame title="This hand-off cannot be used">
        <View role="alert" testID="handoff-refused">
          <Text>{preview.error.message}</Text>
        </View>
      </AuthFrame>
    );
  }
  return (
    <AuthFrame title="A division for you">
      <QueryState query={preview} loadingLabel="Reading the hand-off…">
        {(handoff) => body(handoff)}
      </QueryState>
    </AuthFrame>
  );
}

function HandoffBody({ token, handoff, me }: { token: string; handoff: HandoffPreview; me: Me | null }) {
  const signOut = useSignOutMutation();
  const isRecipient = me && me.user.email.toLowerCase() === handoff.recipientEmail;
  return (
    <View style={styles.body} testID="handoff-screen">
      <Text>
        {handoff.givenBy ?? 'A grower'} is handing you{' '}
        <Text variant="bodyStrong" testID="handoff-plant">
          {handoff.plantName}
        </Text>{' '}
        (tag {handoff.plantTag}){handoff.dividedOn ? `, divided on ${formatDate(handoff.dividedOn)}` : ''}.
      </Text>
      {handoff.note ? (
        <View style={styles.note} role="note" aria-label="Their note">
          <Text color="textMuted">
            {handoff.givenBy ?? 'They'} wrote: {handoff.note}
          </Text>
        </View>
      ) : null}
      <HandoffContentsList contents={handoff.contents} />
      <Text variant="caption" color="textMuted">
        Sent to {handoff.recipientEmail}; the link works once, until {handoff.expiresAt.slice(0, 10)}.
      </Text>
      {!me ? (
        <View style={styles.body}>
          <Text>Sign in, or create an account, with {handoff.recipientEmail} to take the division in.</Text>
          <AccountForLink
            email={handoff.recipientEmail}
            testIDPrefix="handoff"
            submitLabel={{ signUp: 'Create account', signIn: 'Sign in' }}
            forgotPasswordText="Forgot password? Reset it, then open the hand-off link again."
            returnTo={`/handoff/${token}`}
          />
        </View>
      ) : isRecipient ? (
        <AcceptPart token={token} me={me} />
      ) : (
        <View style={styles.body} role="alert" testID="handoff-wrong-account">
          <Text>
            You are signed in as {me.user.email}, but this division was handed to {handoff.recipientEmail}. Only that person can accept it.
          </Text>
          <Button label="Sign out and use the other account" tone="secondary" loading={signOut.isPending} onPress={() => signOut.mutate()} testID="handoff-switch" />
        </View>
      )}
    </View>
  );
}

const NEW = 'new';

function AcceptPart({ token, me }: { token: string; me: Me }) {
  const router = useRouter();
  const accept = useAcceptHandoffMutation(token);
  const writable = me.collections.filter((c) => c.role === 'owner' || c.role === 'grower');
  const [target, setTarget] = useState<string>(writable[0]?.id ?? NEW);
  const [name, setName] = useState('Received divisions');
  const [renamed, setRenamed] = useState<AcceptedHandoff | null>(null);
  const error = accept.error instanceof ApiError ? accept.error : undefined;

  const open = (accepted: AcceptedHandoff) => {
    rememberCollection(accepted.collectionId);
    router.replace(`/plants/${accepted.plantId}`);
  };

  if (renamed) {
    return (
      <View style={styles.body} role="status" testID="handoff-renamed">
        <Text>
          Your collection already had a plant tagged {renamed.tagChangedFrom}, so the division is saved as{' '}
          <Text variant="bodyStrong">{renamed.tag}</Text>. You can change the tag on the plant.
        </Text>
        <Button label="Open the plant" onPress={() => open(renamed)} testID="handoff-open-plant" />
      </View>
    );
  }

  const options = [...writable.map((c) => ({ value: c.id, label: c.name })), { value: NEW, label: 'A new collection' }];
  return (
    <View style={styles.body}>
      <Text>
        Signed in as {me.user.displayName} ({me.user.email}). Where should it go?
      </Text>
      <Segmented label="Collection for the division" value={target} options={options} onChange={setTarget} testID="handoff-target" />
      {target === NEW ? (
        <TextField label="Name of the new collection" testID="handoff-new-name" value={name} onChangeText={setName} error={error?.fieldError('newCollectionName')} />
      ) : null}
      {error?.fieldError('collectionId') ? <Text color="danger">{error.fieldError('collectionId')}</Text> : null}
      {error && error.details.length === 0 ? (
        <Text color="danger" role="alert">
          {error.message}
        </Text>
      ) : null}
      <Button
        label="Accept the division"
        testID="handoff-accept"
        loading={accept.isPending}
        onPress={() =>
          accept.mutate(target === NEW ? { newCollectionName: name } : { collectionId: target }, {
            onSuccess: (accepted) => (accepted.tagChangedFrom ? setRenamed(accepted) : open(accepted)),
          })
        }
      />
    </View>
  );
}

const styles = StyleSheet.create({
  body: { gap: spacing.lg },
  note: { padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.surfaceMuted },
});
