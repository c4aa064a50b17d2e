import { useRouter } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { useSignOutEverywhereMutation, useSignOutMutation, useMeQuery } from '@/api/queries/session';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Confirm } from '@/components/confirm';
import { Column, Columns } from '@/components/columns';
import { Screen } from '@/components/screen';
import { Text } from '@/components/text';
import { ROLE_LABELS } from '@/lib/format';
import { spacing } from '@/theme';
import { useCurrentCollection } from './current-collection';
import { CollectionSettings } from './components/collection-settings';
import { AreasCard, LocationSetting } from './components/cold-night-settings';
import { DigestSetting } from './components/digest-setting';
import { ExportCard } from './components/export-card';
import { InvitationsCard } from './components/invitations-card';
import { MemberList } from './components/member-list';

export function CollectionScreen() {
  const me = useMeQuery();
  const signOut = useSignOutMutation();
  const signOutEverywhere = useSignOutEverywhereMutation();
  const [confirmingEverywhere, setConfirmingEverywhere] = useState(false);
  const { collection, collections, select } = useCurrentCollection();
  const router = useRouter();

  return (
    <Screen title="Collection" subtitle={collection ? `${collection.name} · you are ${ROLE_LABELS[collection.role].toLowerCase()}` : undefined} testID="collection-screen">
      <Columns>
        <Column>
          {collection ? <CollectionSettings collectionId={collection.id} /> : null}
          {collection ? <LocationSetting collectionId={collection.id} /> : null}
          {collection ? <AreasCard collectionId={collection.id} canWrite={collection.role !== 'viewer'} /> : null}
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
          {collection ? <ExportCard collectionId={collection.id} role={collection.role} /> : null}
          {collection && collection.role !== 'viewer' ? (
            <Card title="Import records" testID="import-card">
              <Text color="textMuted">Bring in past records from a spreadsheet (CSV): plants, leads, measurements and blooms.</Text>
              <Button label="Import a spreadsheet" tone="secondary" testID="open-import" onPress={() => router.push('/import')} />
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
            {confirmingEverywhere ? (
              <Confirm
                message="Sign out on every phone and computer where you are signed in, this one included?"
                confirmLabel="Sign out everywhere"
                busy={signOutEverywhere.isPending}
                onCancel={() => setConfirmingEverywhere(false)}
                onConfirm={() => signOutEverywhere.mutate(undefined, { onSettled: () => setConfirmingEverywhere(false) })}
              />
            ) : (
              <Button label="Sign out everywhere" tone="quiet" testID="sign-out-everywhere" onPress={() => setConfirmingEverywhere(true)} />
            )}
            {signOutEverywhere.isError ? (
              <Text color="danger" role="alert">
                Could not sign out everywhere; try again.
              </Text>
            ) : null}
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
