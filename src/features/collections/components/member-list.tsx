import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useChangeMemberRoleMutation, useMembersQuery, useRemoveMemberMutation } from '@/api/queries/collections';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { ROLE_LABELS } from '@/lib/format';
import type { Role } from '@/shared/schemas/auth';
import type { Member } from '@/shared/schemas/collections';
import { colors, radius, spacing } from '@/theme';

const ROLE_OPTIONS = (['owner', 'grower', 'viewer'] as const).map((value) => ({ value, label: ROLE_LABELS[value] }));

const ROLE_MEANING: Record<Role, string> = {
  owner: 'Everything, including members and deleting plants',
  grower: 'Adds and edits plants, leads, measurements and care',
  viewer: 'Reads everything and exports; changes nothing',
};

export function MemberList({ collectionId, myRole, myUserId }: { collectionId: string; myRole: Role; myUserId?: string }) {
  const query = useMembersQuery(collectionId);
  const changeRole = useChangeMemberRoleMutation(collectionId);
  const remove = useRemoveMemberMutation(collectionId);
  const [confirming, setConfirming] = useState<string | null>(null);
  const isOwner = myRole === 'owner';
  const failure = [changeRole.error, remove.error].find((e) => e instanceof ApiError) as ApiError | undefined;

  return (
    <Card title="Members" testID="member-list">
      <QueryState query={query} loadingLabel="Loading members…">
        {(members) => (
          <View style={styles.list}>
            {failure ? (
              <Text color="danger" role="alert">
                {failure.message}
              </Text>
            ) : null}
            {members.map((member) => (
              <MemberRow
                key={member.userId}
                member={member}
                isMe={member.userId === myUserId}
                canManage={isOwner}
                confirming={confirming === member.userId}
                busy={changeRole.isPending || remove.isPending}
                onRole={(role) => changeRole.mutate({ userId: member.userId, role })}
                onAskRemove={() => setConfirming(member.userId)}
                onCancelRemove={() => setConfirming(null)}
                onRemove={() => remove.mutate(member.userId, { onSettled: () => setConfirming(null) })}
              />
            ))}
          </View>
        )}
      </QueryState>
    </Card>
  );
}

interface MemberRowProps {
  member: Member;
  isMe: boolean;
  canManage: boolean;
  confirming: boolean;
  busy: boolean;
  onRole: (role: Role) => void;
  onAskRemove: () => void;
  onCancelRemove: () => void;
  onRemove: () => void;
}

function MemberRow({ member, isMe, canManage, confirming, busy, onRole, onAskRemove, onCancelRemove, onRemove }: MemberRowProps) {
  return (
    <View style={styles.row} testID={`member-${member.email}`}>
      <View style={styles.who}>
        <Text variant="bodyStrong">
          {member.displayName}
          {isMe ? ' (you)' : ''}
        </Text>
        <Text variant="caption" color="textMuted">
          {member.email}
        </Text>
      </View>
      {canManage ? (
        <Segmented label={`Role of ${member.displayName}`} value={member.role} options={ROLE_OPTIONS} onChange={onRole} disabled={busy} />
      ) : (
        <Text variant="label">{ROLE_LABELS[member.role]}</Text>
      )}
      <Text variant="caption" color="textMuted">
        {ROLE_MEANING[member.role]}
      </Text>
      {canManage && !isMe ? (
        confirming ? (
          <View style={styles.confirm} role="alert">
            <Text>Remove {member.displayName} from this collection? Their past entries stay.</Text>
            <View style={styles.confirmActions}>
              <Button label="Remove" tone="danger" onPress={onRemove} loading={busy} />
              <Button label="Keep" tone="quiet" onPress={onCancelRemove} />
            </View>
          </View>
        ) : (
          <Button label={`Remove ${member.displayName}`} tone="quiet" onPress={onAskRemove} style={styles.removeButton} />
        )
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: spacing.md },
  row: {
    gap: spacing.sm,
    paddingVertical: spacing.md,
    borderTopWidth: 1,
    borderTopColor: colors.borderSubtle,
  },
  who: { gap: spacing.xxs },
  confirm: { gap: spacing.sm, padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.dangerSoft },
  confirmActions: { flexDirection: 'row', gap: spacing.sm },
  removeButton: { alignSelf: 'flex-start' },
});
