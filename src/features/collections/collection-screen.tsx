import { StyleSheet, View } from 'react-native';
import { useSignOutMutation, useMeQuery } from '@/api/queries/session';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Column, Columns } from '@/components/columns';
import { Screen } from '@/components/screen';
import { Text } from '@/components/text';
import { ROLE_LABELS } from '@/lib/format';
import { spacing } from '@/theme';
import { useCurrentCollection } from './current-collection';
import { CollectionSettings } from './components/collection-settings';
import { DigestSetting } from './components/digest-setting';
import { InvitationsCard } from './components/invitations-card';
import { MemberList } from './components/member-list';

export function CollectionScreen() {
  const me = useMeQuery();
  const signOut = useSignOutMutation();
  const { collection, collections, select } = useCurrentCollection();

  return (
    <Screen title="Collection" subtitle={collection ? `${collection.name} · you are ${ROLE_LABELS[collection.role].toLowerCase()}` : undefined} testID="collection-screen">
      <Columns>
        <Column>
          {collection ? <CollectionSettings collectionId={collection.id} /> : null}
          {collections.length > 1 ? (
            <Card title="Your collections">
              {collections.map((c) => (
                <View key={c.id} style={styles.switchRow}>
                  <View style={styles.grow}>
                    <Text variant="bodyStrong">{c.name}</Text>
                    <Text variant="caption" color="textMuted">
                      {ROLE_LABELS[c.role]}
                    </Text>
                  </View>
                  {c.id === collection?.id ? (
                    <Text variant="label" color="success">
                      Open now
                    </Text>
                  ) : (
                    <Button label={`Open ${c.name}`} tone="secondary" onPress={() => select(c.id)} />
                  )}
                </View>
              ))}
            </Card>
          ) : null}
        </Column>
        <Column>
          {collection ? <MemberList collectionId={collection.id} myRole={collection.role} myUserId={me.data?.user.id} /> : null}
          {collection?.role === 'owner' ? <InvitationsCard collectionId={collection.id} /> : null}
          {collection ? <DigestSetting collectionId={collection.id} /> : null}
          <Card title="Your account">
            <Text>
              Signed in as <Text variant="bodyStrong">{me.data?.user.displayName}</Text> ({me.data?.user.email})
            </Text>
            <Button label="Sign out" tone="secondary" testID="sign-out" loading={signOut.isPending} onPress={() => signOut.mutate()} />
          </Card>
        </Column>
      </Columns>
    </Screen>
  );
}

const styles = StyleSheet.create({
  switchRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.md },
  grow: { flex: 1 },
});
