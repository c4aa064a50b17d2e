import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { usePlantHandoffsQuery, useRevokeHandoffMutation, useSendHandoffMutation } from '@/api/queries/handoffs';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Confirm } from '@/components/confirm';
import { FormActions } from '@/components/form-actions';
import { QueryState } from '@/components/query-state';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { createHandoffInputSchema, HANDOFF_LIFETIME_DAYS, type Handoff } from '@/shared/schemas/handoffs';
import type { Plant } from '@/shared/schemas/records';
import { colors, radius, spacing } from '@/theme';

/**
 * Giving a division (or a whole plant) to another grower by e-mail: the form, the pending
 * links with a confirmed withdraw, and nothing at all once the plant has been given away.
 */
export function HandoffSection({ collectionId, plant }: { collectionId: string; plant: Plant }) {
  const pending = usePlantHandoffsQuery(collectionId, plant.id);
  const [open, setOpen] = useState(false);
  const what = plant.parentPlantId ? 'division' : 'plant';
  return (
    <Card title={`Give this ${what} away`} testID="handoff-section">
      <Text color="textMuted">
        Send it to the new grower's e-mail. When they accept, it becomes a plant in their collection with a read-only copy of its
        history up to the division date and its photos; this record stays here and notes where it went.
      </Text>
      <QueryState query={pending} loadingLabel="Loading hand-offs…">
        {(list) => (list.length > 0 ? <PendingList collectionId={collectionId} list={list} /> : null)}
      </QueryState>
      {open ? (
        <HandoffForm collectionId={collectionId} plantId={plant.id} what={what} onDone={() => setOpen(false)} />
      ) : (
        <View style={styles.actions}>
          <Button label={`Give this ${what} away`} tone="secondary" onPress={() => setOpen(true)} testID="handoff-open" />
        </View>
      )}
    </Card>
  );
}

function PendingList({ collectionId, list }: { collectionId: string; list: Handoff[] }) {
  const revoke = useRevokeHandoffMutation(collectionId);
  const [confirming, setConfirming] = useState<string | null>(null);
  return (
    <View style={styles.list} role="list" aria-label="Pending hand-offs" testID="handoff-pending">
      {list.map((h) => (
        <View key={h.id} role="listitem" style={styles.item} testID={`handoff-pending-${h.recipientEmail}`}>
          <Text>
            Waiting for <Text variant="bodyStrong">{h.recipientEmail}</Text>
          </Text>
          <Text variant="caption" color="textMuted">
            Sent{h.sentBy ? ` by ${h.sentBy}` : ''} on {h.createdAt.slice(0, 10)}; the link works until {h.expiresAt.slice(0, 10)}.
          </Text>
          {h.canRevoke ? (
            confirming === h.id ? (
              <Confirm
                message={`Withdraw the hand-off to ${h.recipientEmail}? The link in their mail will stop working.`}
                confirmLabel="Withdraw"
                busy={revoke.isPending}
                onCancel={() => setConfirming(null)}
                onConfirm={() => revoke.mutate(h.id, { onSettled: () => setConfirming(null) })}
              />
            ) : (
              <View style={styles.actions}>
                <Button label="Withdraw" tone="quiet" onPress={() => setConfirming(h.id)} testID="handoff-revoke" />
              </View>
            )
          ) : null}
        </View>
      ))}
      {revoke.error instanceof ApiError ? <Text color="danger">{revoke.error.message}</Text> : null}
    </View>
  );
}

function HandoffForm({ collectionId, plantId, what, onDone }: { collectionId: string; plantId: string; what: string; onDone: () => void }) {
  const send = useSendHandoffMutation(collectionId, plantId);
  const [email, setEmail] = useState('');
  const [note, setNote] = useState('');
  const [localErrors, setLocalErrors] = useState<Record<string, string>>({});
  const [sentTo, setSentTo] = useState<string | null>(null);
  const error = send.error instanceof ApiError ? send.error : undefined;

  const submit = () => {
    const parsed = createHandoffInputSchema.safeParse({ email, note });
    if (!parsed.success) {
      setLocalErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setLocalErrors({});
    send.mutate(
      { email: parsed.data.email, note: parsed.data.note ?? undefined },
      {
        onSuccess: (h) => {
          setSentTo(h.recipientEmail);
          setEmail('');
          setNote('');
        },
      },
    );
  };

  return (
    <View style={styles.form} testID="handoff-form">
      {sentTo ? (
        <Text color="success" role="status" testID="handoff-sent">
          Sent to {sentTo}. The link works once, for {HANDOFF_LIFETIME_DAYS} days.
        </Text>
      ) : null}
      <TextField
        label="Recipient's e-mail"
        testID="handoff-email"
        autoComplete="email"
        inputMode="email"
        autoCapitalize="none"
        value={email}
        onChangeText={setEmail}
        error={localErrors.email ?? error?.fieldError('email')}
      />
      <TextField
        label="Note for them (optional)"
        testID="handoff-note"
        value={note}
        onChangeText={setNote}
        multiline
        error={localErrors.note ?? error?.fieldError('note')}
        hint="Care tips, the grex's story, when it last bloomed…"
      />
      {error && error.details.length === 0 ? (
        <Text color="danger" role="alert">
          {error.message}
        </Text>
      ) : null}
      <FormActions onCancel={onDone} cancelLabel={sentTo ? 'Done' : 'Cancel'}>
        <Button label={`Send the ${what}`} loading={send.isPending} onPress={submit} testID="handoff-send" />
      </FormActions>
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.md },
  list: { gap: spacing.sm },
  item: { gap: spacing.xs, padding: spacing.md, borderRadius: radius.md, borderWidth: 1, borderColor: colors.borderSubtle },
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
});
