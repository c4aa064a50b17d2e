import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useCollectionQuery, useUpdateCollectionMutation } from '@/api/queries/collections';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { monthName } from '@/lib/format';
import type { Collection } from '@/shared/schemas/collections';
import { spacing } from '@/theme';

const UNIT_OPTIONS = [
  { value: 'mm', label: 'Millimetres' },
  { value: 'in', label: 'Inches' },
] as const;

export function CollectionSettings({ collectionId }: { collectionId: string }) {
  const query = useCollectionQuery(collectionId);
  return (
    <Card title="Settings" testID="collection-settings">
      <QueryState query={query}>{(collection) => <SettingsForm key={collection.id} collection={collection} />}</QueryState>
    </Card>
  );
}

function SettingsForm({ collection }: { collection: Collection }) {
  const canEdit = collection.role === 'owner';
  const update = useUpdateCollectionMutation(collection.id);
  const [name, setName] = useState(collection.name);
  const [units, setUnits] = useState(collection.units);
  const [seasonStartMonth, setSeasonStartMonth] = useState(collection.seasonStartMonth);

  const error = update.error instanceof ApiError ? update.error : undefined;
  const dirty = name !== collection.name || units !== collection.units || seasonStartMonth !== collection.seasonStartMonth;

  return (
    <View style={styles.form}>
      <TextField
        label="Name"
        value={name}
        onChangeText={setName}
        editable={canEdit}
        error={error?.fieldError('name')}
        testID="collection-name"
      />
      <View style={styles.field}>
        <Text variant="label">Show sizes in</Text>
        <Segmented label="Show sizes in" value={units} options={UNIT_OPTIONS} onChange={setUnits} disabled={!canEdit} testID="collection-units" />
        <Text variant="caption" color="textMuted">
          Sizes are always kept in millimetres; this only changes how they are shown and typed.
        </Text>
      </View>
      <View style={styles.field}>
        <Text variant="label">
          Growth year starts in
        </Text>
        <View style={styles.stepper}>
          <Button
            label="‹"
            accessibilityLabel="Earlier month"
            tone="secondary"
            disabled={!canEdit}
            onPress={() => setSeasonStartMonth((m) => (m === 1 ? 12 : m - 1))}
          />
          <Text variant="bodyStrong" aria-label={`Growth year starts in ${monthName(seasonStartMonth)}`} accessibilityLiveRegion="polite" style={styles.month}>
            {monthName(seasonStartMonth)}
          </Text>
          <Button
            label="›"
            accessibilityLabel="Later month"
            tone="secondary"
            disabled={!canEdit}
            onPress={() => setSeasonStartMonth((m) => (m === 12 ? 1 : m + 1))}
          />
        </View>
        <Text variant="caption" color="textMuted">
          Leads are grouped into seasons from this month: March suits most northern growers, September southern ones.
        </Text>
      </View>
      {canEdit ? (
        <View style={styles.actions}>
          <Button
            label="Save settings"
            disabled={!dirty}
            loading={update.isPending}
            onPress={() => update.mutate({ name, units, seasonStartMonth })}
            testID="collection-save"
          />
          {update.isSuccess && !dirty ? <Text color="success">Saved</Text> : null}
          {error && !error.fieldError('name') ? <Text color="danger">{error.message}</Text> : null}
        </View>
      ) : (
        <Text variant="caption" color="textMuted">
          Only an owner can change these settings.
        </Text>
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.lg },
  field: { gap: spacing.sm },
  stepper: { flexDirection: 'row', alignItems: 'center', gap: spacing.md },
  month: { minWidth: 96, textAlign: 'center' },
  actions: { flexDirection: 'row', alignItems: 'center', gap: spacing.md },
});
