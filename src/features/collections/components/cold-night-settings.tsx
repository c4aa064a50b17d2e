import { useQueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useCreateAreaMutation, useUpdateAreaMutation } from '@/api/queries/areas';
import { coldNightKeys } from '@/api/queries/cold-nights';
import { useCollectionQuery, useUpdateCollectionMutation } from '@/api/queries/collections';
import { useAreasQuery } from '@/api/queries/records';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { parseNumber } from '@/components/number-field';
import { QueryState } from '@/components/query-state';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import type { Collection } from '@/shared/schemas/collections';
import type { Area } from '@/shared/schemas/records';
import { colors, spacing } from '@/theme';

const PLACE_OPTIONS = [
  { value: 'outdoors', label: 'Outdoors' },
  { value: 'indoors', label: 'Indoors' },
] as const;

/** The collection's location for the night forecast: typed by the owner, never read from photos. */
export function LocationSetting({ collectionId }: { collectionId: string }) {
  const query = useCollectionQuery(collectionId);
  return (
    <Card title="Location for cold nights" testID="location-setting">
      <QueryState query={query} loadingLabel="Loading the location…">
        {(collection) => <LocationForm key={collection.id} collection={collection} />}
      </QueryState>
    </Card>
  );
}

function LocationForm({ collection }: { collection: Collection }) {
  const canEdit = collection.role === 'owner';
  const client = useQueryClient();
  const update = useUpdateCollectionMutation(collection.id);
  const [latitude, setLatitude] = useState(collection.latitude === null ? '' : String(collection.latitude));
  const [longitude, setLongitude] = useState(collection.longitude === null ? '' : String(collection.longitude));
  const [problem, setProblem] = useState<{ field: 'latitude' | 'longitude'; reason: string } | null>(null);
  const error = update.error instanceof ApiError ? update.error : undefined;
  const isSet = collection.latitude !== null && collection.longitude !== null;

  const save = (lat: number | null, lon: number | null) =>
    update.mutate({ latitude: lat, longitude: lon }, { onSuccess: () => client.invalidateQueries({ queryKey: coldNightKeys.forCollection(collection.id) }) });

  const submit = () => {
    const lat = parseNumber(latitude);
    const lon = parseNumber(longitude);
    if (lat === null && lon === null) return save(null, null);
    if (lat === null || Number.isNaN(lat)) return setProblem({ field: 'latitude', reason: 'Write the latitude in decimal degrees, such as 26.1 (south is negative)' });
    if (lon === null || Number.isNaN(lon)) return setProblem({ field: 'longitude', reason: 'Write the longitude in decimal degrees, such as -80.3 (west is negative)' });
    setProblem(null);
    save(lat, lon);
  };

  if (!canEdit) {
    return (
      <Text color="textMuted">
        {isSet
          ? `The night forecast is read for ${collection.latitude}, ${collection.longitude}. Only an owner can change it.`
          : 'No location is set, so cold nights are not checked. Only an owner can set it.'}
      </Text>
    );
  }
  return (
    <View style={styles.form}>
      <Text color="textMuted">
        The forecast for this place decides which plants in outdoor areas to bring in. Type it yourself (decimal degrees, from any map); Sympodia never reads it from photos.
      </Text>
      <View style={styles.pair}>
        <View style={styles.half}>
          <TextField
            label="Latitude"
            value={latitude}
            onChangeText={setLatitude}
            inputMode="decimal"
            hint="North positive, e.g. 26.1"
            error={problem?.field === 'latitude' ? problem.reason : error?.fieldError('latitude')}
            testID="location-latitude"
          />
        </View>
        <View style={styles.half}>
          <TextField
            label="Longitude"
            value={longitude}
            onChangeText={setLongitude}
            inputMode="decimal"
            hint="East positive, e.g. -80.3"
            error={problem?.field === 'longitude' ? problem.reason : error?.fieldError('longitude')}
            testID="location-longitude"
          />
        </View>
      </View>
      <View style={styles.actions}>
        <Button label="Save location" loading={update.isPending} onPress={submit} testID="location-save" />
        {isSet ? <Button label="Clear" tone="quiet" disabled={update.isPending} onPress={() => save(null, null)} testID="location-clear" /> : null}
        {update.isSuccess ? <Text color="success">Saved</Text> : null}
      </View>
    </View>
  );
}

/** Each area marked indoors or outdoors (only outdoor plants are checked for cold nights), and a new area. */
export function AreasCard({ collectionId, canWrite }: { collectionId: string; canWrite: boolean }) {
  const query = useAreasQuery(collectionId);
  return (
    <Card title="Areas" testID="areas-card">
      <Text color="textMuted">Plants in outdoor areas are checked against the night forecast; indoor ones never are.</Text>
      <QueryState query={query} loadingLabel="Loading the areas…" isEmpty={(areas) => areas.length === 0 && !canWrite} empty={{ title: 'No areas yet' }}>
        {(areas) => (
          <View style={styles.list}>
            {areas.map((area) => (
              <AreaRow key={area.id} collectionId={collectionId} area={area} canWrite={canWrite} />
            ))}
            {canWrite ? <NewArea collectionId={collectionId} /> : null}
          </View>
        )}
      </QueryState>
    </Card>
  );
}

function AreaRow({ collectionId, area, canWrite }: { collectionId: string; area: Area; canWrite: boolean }) {
  const update = useUpdateAreaMutation(collectionId);
  const stale = update.error instanceof ApiError && update.error.code === 'stale';
  return (
    <View style={styles.area} testID={`area-${area.name}`}>
      <Text variant="bodyStrong">{area.name}</Text>
      {canWrite ? (
        <Segmented
          label={`Where ${area.name} is`}
          value={area.indoors ? 'indoors' : 'outdoors'}
          options={PLACE_OPTIONS}
          disabled={update.isPending}
          onChange={(value) => update.mutate({ areaId: area.id, version: area.version, indoors: value === 'indoors' })}
          testID={`area-place-${area.id}`}
        />
      ) : (
        <Text color="textMuted">{area.indoors ? 'Indoors' : 'Outdoors'}</Text>
      )}
      {update.error ? (
        <Text color="danger" role="alert">
          {stale ? 'Someone changed this area meanwhile; the latest is shown. Choose again.' : update.error.message}
        </Text>
      ) : null}
    </View>
  );
}

function NewArea({ collectionId }: { collectionId: string }) {
  const create = useCreateAreaMutation(collectionId);
  const [name, setName] = useState('');
  const [place, setPlace] = useState<'outdoors' | 'indoors'>('outdoors');
  const error = create.error instanceof ApiError ? create.error : undefined;
  return (
    <View style={[styles.area, styles.newArea]}>
      <TextField label="New area" value={name} onChangeText={setName} error={error?.fieldError('name') ?? (error?.status === 409 ? error.message : undefined)} testID="new-area-name" />
      <Segmented label="Where the new area is" value={place} options={PLACE_OPTIONS} onChange={setPlace} testID="new-area-place" />
      <Button
        label="Add area"
        tone="secondary"
        disabled={name.trim() === ''}
        loading={create.isPending}
        onPress={() => create.mutate({ name: name.trim(), indoors: place === 'indoors' }, { onSuccess: () => setName('') })}
        testID="new-area-add"
      />
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.md },
  pair: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md },
  half: { flexGrow: 1, flexBasis: 140 },
  actions: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, flexWrap: 'wrap' },
  list: { gap: spacing.md },
  area: { gap: spacing.xs, paddingTop: spacing.sm, borderTopWidth: 1, borderTopColor: colors.borderSubtle },
  newArea: { gap: spacing.sm },
});
