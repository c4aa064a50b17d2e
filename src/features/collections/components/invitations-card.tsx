import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useCreateInvitationMutation, useInvitationsQuery, useRevokeInvitationMutation } from '@/api/queries/mail';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { ROLE_LABELS } from '@/lib/format';
import type { Role } from '@/shared/schemas/auth';
import { createInvitationInputSchema, type Invitation } from '@/shared/schemas/mail';
import { colors, radius, spacing } from '@/theme';

const ROLE_OPTIONS = (['viewer', 'grower', 'owner'] as const).map((value) => ({ value, label: ROLE_LABELS[value] }));

/** Owners invite people by e-mail and see, and can withdraw, the invitations not yet accepted. */
export function InvitationsCard({ collectionId }: { collectionId: string }) {
  const query = useInvitationsQuery(collectionId);
  const create = useCreateInvitationMutation(collectionId);
  const revoke = useRevokeInvitationMutation(collectionId);
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<Role>('grower');
  const [emailError, setEmailError] = useState<string>();
  const [sentTo, setSentTo] = useState<string>();
  const [confirming, setConfirming] = useState<string | null>(null);
  const failure = [create.error, revoke.error].find((e) => e instanceof ApiError) as ApiError | undefined;

  const send = () => {
    setSentTo(undefined);
    const parsed = createInvitationInputSchema.safeParse({ email, role });
    if (!parsed.success) {
      setEmailError(parsed.error.issues.find((i) => i.path[0] === 'email')?.message);
      return;
    }
    setEmailError(undefined);
    create.mutate(parsed.data, {
      onSuccess: (invitation) => {
        setSentTo(invitation.email);
        setEmail('');
      },
      onError: (error) => {
        if (error instanceof ApiError) setEmailError(error.fieldError('email'));
      },
    });
  };

  return (
    <Card title="Invite someone" testID="invitations">
      <TextField
        label="Their e-mail"
        testID="invite-email"
        autoComplete="email"
        inputMode="email"
        autoCapitalize="none"
        value={email}
        onChangeText={setEmail}
        error={emailError}
        onSubmitEditing={send}
      />
      <Segmented label="Role for the new member" value={role} options={ROLE_OPTIONS} onChange={setRole} testID="invite-role" />
      <Button label="Send invitation" testID="invite-send" onPress={send} loading={create.isPending} />
      {sentTo ? (
        <Text color="success" role="status" testID="invite-sent">
          Invitation sent to {sentTo}. The link works once, for 7 days.
        </Text>
      ) : null}
      {failure && !emailError ? (
        <Text color="danger" role="alert">
          {failure.message}
        </Text>
      ) : null}
      <Text variant="bodyStrong" role="heading" aria-level={3}>
        Waiting for an answer
      </Text>
      <QueryState query={query} loadingLabel="Loading invitations…" isEmpty={(list) => list.length === 0} empty={{ title: 'No invitations waiting' }}>
        {(list) => (
          <View style={styles.list}>
            {list.map((invitation) => (
              <PendingRow
                key={invitation.id}
                invitation={invitation}
                confirming={confirming === invitation.id}
                busy={revoke.isPending}
                onAsk={() => setConfirming(invitation.id)}
                onCancel={() => setConfirming(null)}
                onRevoke={() => revoke.mutate(invitation.id, { onSettled: () => setConfirming(null) })}
              />
            ))}
          </View>
        )}
      </QueryState>
    </Card>
  );
}

interface PendingRowProps {
  invitation: Invitation;
  confirming: boolean;
  busy: boolean;
  onAsk: () => void;
  onCancel: () => void;
  onRevoke: () => void;
}

function PendingRow({ invitation, confirming, busy, onAsk, onCancel, onRevoke }: PendingRowProps) {
  return (
    <View style={styles.row} testID={`invitation-${invitation.email}`}>
      <Text variant="bodyStrong">{invitation.email}</Text>
      <Text variant="caption" color="textMuted">
        {ROLE_LABELS[invitation.role]} · link valid until {invitation.expiresAt.slice(0, 10)}
        {invitation.invitedBy ? ` · sent by ${invitation.invitedBy}` : ''}
      </Text>
      {confirming ? (
        <View style={styles.confirm} role="alert">
          <Text>Withdraw the invitation to {invitation.email}? Their link will stop working.</Text>
          <View style={styles.actions}>
            <Button label="Withdraw" tone="danger" testID="invite-revoke-confirm" onPress={onRevoke} loading={busy} />
            <Button label="Keep" tone="quiet" onPress={onCancel} />
          </View>
        </View>
      ) : (
        <Button label={`Withdraw invitation to ${invitation.email}`} tone="quiet" testID="invite-revoke" onPress={onAsk} style={styles.start} />
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: spacing.sm },
  row: { gap: spacing.xs, paddingVertical: spacing.sm, borderTopWidth: 1, borderTopColor: colors.borderSubtle },
  confirm: { gap: spacing.sm, padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.dangerSoft },
  actions: { flexDirection: 'row', gap: spacing.sm },
  start: { alignSelf: 'flex-start' },
});
