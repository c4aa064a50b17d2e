import { Link, useLocalSearchParams, useRouter } from 'expo-router';
import { useRef, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useAcceptHandoffMutation, useHandoffPreviewQuery } from '@/api/queries/handoffs';
import { useMeQuery, useSignInMutation, useSignOutMutation, useSignUpMutation } from '@/api/queries/session';
import { Button } from '@/components/button';
import { QueryState } from '@/components/query-state';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { AuthFrame } from '@/features/auth/auth-frame';
import { FormError } from '@/features/auth/form-error';
import { rememberCollection } from '@/features/collections/current-collection';
import { formatDate } from '@/lib/dates';
import { NEW_PASSWORD_HINT, signInInputSchema, signUpInputSchema, type Me } from '@/shared/schemas/auth';
import type { AcceptedHandoff, HandoffPreview } from '@/shared/schemas/handoffs';
import { colors, radius, spacing } from '@/theme';
import { HandoffContentsList } from './components/handoff-contents';

type Mode = 'sign-up' | 'sign-in';
const MODES = [
  { value: 'sign-up', label: 'I am new here' },
  { value: 'sign-in', label: 'I have an account' },
] as const;

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
        <SignInPart recipientEmail={handoff.recipientEmail} />
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

function SignInPart({ recipientEmail }: { recipientEmail: string }) {
  const signUp = useSignUpMutation();
  const signIn = useSignInMutation();
  const [mode, setMode] = useState<Mode>('sign-up');
  const [email, setEmail] = useState(recipientEmail);
  const [displayName, setDisplayName] = useState('');
  const [password, setPassword] = useState('');
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [formError, setFormError] = useState<string>();
  const [busy, setBusy] = useState(false);

  const submit = async () => {
    setFormError(undefined);
    const schema = mode === 'sign-up' ? signUpInputSchema : signInInputSchema;
    const parsed = schema.safeParse(mode === 'sign-up' ? { email, password, displayName } : { email, password });
    if (!parsed.success) {
      setErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setErrors({});
    setBusy(true);
    try {
      if (mode === 'sign-up') await signUp.mutateAsync(parsed.data as never);
      else await signIn.mutateAsync(parsed.data);
    } catch (error) {
      if (error instanceof ApiError && error.details.length > 0) setErrors(Object.fromEntries(error.details.map((d) => [d.field, d.reason])));
      else setFormError(error instanceof ApiError ? error.message : 'Something went wrong; try again.');
    } finally {
      setBusy(false);
    }
  };

  return (
    <View style={styles.body}>
      <Text>Sign in, or create an account, with {recipientEmail} to take the division in.</Text>
      <FormError message={formError} />
      <Segmented label="Do you have a Sympodia account?" value={mode} options={MODES} onChange={setMode} testID="handoff-mode" />
      {mode === 'sign-up' ? (
        <TextField label="Your name" testID="handoff-name" autoComplete="name" value={displayName} onChangeText={setDisplayName} error={errors.displayName} />
      ) : null}
      <TextField
        label="E-mail"
        testID="handoff-account-email"
        autoComplete="email"
        inputMode="email"
        autoCapitalize="none"
        value={email}
        onChangeText={setEmail}
        error={errors.email}
      />
      <TextField
        label={mode === 'sign-up' ? 'Choose a password' : 'Password'}
        testID="handoff-password"
        autoComplete={mode === 'sign-up' ? 'new-password' : 'current-password'}
        secureTextEntry
        value={password}
        onChangeText={setPassword}
        error={errors.password}
        hint={mode === 'sign-up' ? NEW_PASSWORD_HINT : undefined}
        onSubmitEditing={submit}
      />
      <Button label={mode === 'sign-up' ? 'Create account' : 'Sign in'} testID="handoff-submit" loading={busy} onPress={submit} />
      {mode === 'sign-in' ? (
        <Link href="/forgot-password">
          <Text color="accent">Forgot password? Reset it, then open the hand-off link again.</Text>
        </Link>
      ) : null}
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
