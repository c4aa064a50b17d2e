import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useUpdatePlantMutation } from '@/api/queries/records';
import { Button } from '@/components/button';
import { FormActions } from '@/components/form-actions';
import { Chip } from '@/components/chip';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { parseNumber } from '@/components/number-field';
import type { Area, PlantDetail } from '@/shared/schemas/records';
import { spacing } from '@/theme';
import { nightLimitHint } from '../night-limit';

/** Edits the plant's record; a save over someone else's newer change is refused and explained. */
export function EditPlantForm({ collectionId, plant, areas, onDone }: { collectionId: string; plant: PlantDetail; areas: Area[]; onDone: () => void }) {
  const update = useUpdatePlantMutation(collectionId, plant.id);
  const [tag, setTag] = useState(plant.tag);
  const [epithet, setEpithet] = useState(plant.epithet);
  const [clonalName, setClonalName] = useState(plant.clonalName ?? '');
  const [medium, setMedium] = useState(plant.medium ?? '');
  const [areaId, setAreaId] = useState(plant.areaId);
  const [notes, setNotes] = useState(plant.notes ?? '');
  const [minNight, setMinNight] = useState(plant.minNightTempC === null ? '' : String(plant.minNightTempC));
  const [minNightError, setMinNightError] = useState<string | undefined>();
  const error = update.error instanceof ApiError ? update.error : undefined;

  return (
    <View style={styles.form} testID="edit-plant-form">
      {error?.code === 'stale' ? (
        <Text color="danger" role="alert">
          Someone else changed this plant while you were editing. The latest version is shown above; make your change again.
        </Text>
      ) : null}
      <TextField label="Tag" value={tag} onChangeText={setTag} error={error?.fieldError('tag') ?? (error?.status === 409 && error.code !== 'stale' ? error.message : undefined)} />
      <TextField label="Grex or species" value={epithet} onChangeText={setEpithet} error={error?.fieldError('epithet')} />
      <TextField label="Clonal name" value={clonalName} onChangeText={setClonalName} />
      <TextField label="Medium" value={medium} onChangeText={setMedium} />
      <View style={styles.chips} role="radiogroup" aria-label="Area">
        {areas.map((a) => (
          <Chip key={a.id} label={a.name} selected={areaId === a.id} onPress={() => setAreaId(areaId === a.id ? null : a.id)} />
        ))}
      </View>
      <TextField
        label="Lowest night temperature (°C)"
        value={minNight}
        onChangeText={(text) => {
          setMinNight(text);
          setMinNightError(undefined);
        }}
        inputMode="decimal"
        hint={nightLimitHint(plant.genus)}
        error={minNightError ?? error?.fieldError('minNightTempC')}
        testID="plant-min-night"
      />
      <TextField label="Notes" value={notes} onChangeText={setNotes} multiline />
      <FormActions onCancel={onDone}>
        <Button
          label="Save changes"
          loading={update.isPending}
          testID="save-plant-edit"
          onPress={() => {
            const minNightTempC = parseNumber(minNight);
            if (Number.isNaN(minNightTempC)) return setMinNightError('Write a temperature in °C, such as 10 or 12.5, or leave it blank');
            update.mutate(
              { tag, epithet, clonalName: clonalName || null, medium: medium || null, areaId, notes: notes || null, minNightTempC, version: plant.version },
              { onSuccess: onDone },
            );
          }}
        />
      </FormActions>
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.md },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
});
