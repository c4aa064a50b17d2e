import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'expo-router';
import { useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import { useAreasQuery, useCreatePlantMutation } from '@/api/queries/records';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Chip } from '@/components/chip';
import { FormTextField } from '@/components/form-text-field';
import { TextField } from '@/components/text-field';
import { parseNumber } from '@/components/number-field';
import { Screen } from '@/components/screen';
import { Text } from '@/components/text';
import { COMMON_GENERA, COMMON_MEDIA } from '@/shared/genera';
import { plantDisplayName } from '@/shared/plant-name';
import { plantInputSchema } from '@/shared/schemas/records';
import { spacing } from '@/theme';
import { FormError } from '../auth/form-error';
import { applyServerErrors } from '../auth/use-server-errors';
import { useCollectionSettings } from '../collections/use-collection-settings';
import { nightLimitHint } from './night-limit';

type Values = z.input<typeof plantInputSchema>;
const FIELDS = ['tag', 'genus', 'epithet', 'clonalName', 'source', 'acquiredOn', 'areaId', 'medium', 'notes', 'minNightTempC'] as const;

/**
 * The plant's own lowest night temperature, typed as text: blank is the genus default (null),
 * a number is kept, anything else goes to the schema as NaN so its message is shown.
 */
function NightLimitField({ genus, onChange, error }: { genus: string; onChange: (value: number | null) => void; error?: string }) {
  const [text, setText] = useState('');
  return (
    <TextField
      label="Lowest night temperature, °C (optional)"
      value={text}
      onChangeText={(next) => {
        setText(next);
        onChange(parseNumber(next));
      }}
      inputMode="decimal"
      hint={nightLimitHint(genus)}
      error={error}
      testID="plant-min-night"
    />
  );
}

export function NewPlantScreen() {
  const router = useRouter();
  const { collectionId, canWrite } = useCollectionSettings();
  const areas = useAreasQuery(collectionId);
  const create = useCreatePlantMutation(collectionId);
  const [formError, setFormError] = useState<string>();
  const { control, handleSubmit, setError, watch, formState } = useForm<Values, unknown, z.output<typeof plantInputSchema>>({
    resolver: zodResolver(plantInputSchema),
    defaultValues: { tag: '', genus: '', epithet: '', isSpecies: false, clonalName: null, areaId: null, medium: null },
  });
  const preview = watch();

  const submit = handleSubmit(async (values) => {
    setFormError(undefined);
    try {
      const plant = await create.mutateAsync(values);
      router.replace(`/plants/${plant.id}`);
    } catch (error) {
      setFormError(applyServerErrors(error, FIELDS, setError));
    }
  });

  if (!canWrite) {
    return (
      <Screen title="Add a plant">
        <Text>Viewers can read this collection but not add plants.</Text>
      </Screen>
    );
  }

  return (
    <Screen title="Add a plant" subtitle={preview.genus && preview.epithet ? plantDisplayName({ genus: preview.genus, epithet: preview.epithet, isSpecies: !!preview.isSpecies, clonalName: preview.clonalName ?? null }) : undefined} testID="new-plant-screen">
      <Card>
        <View style={styles.form}>
          <FormError message={formError} />
          <FormTextField control={control} name="tag" label="Tag" hint="The label on the pot, e.g. SH-014" testID="plant-tag" autoCapitalize="characters" />
          {/* Quick picks sit under the field they fill in, so each label names its field first. */}
          <FormTextField control={control} name="genus" label="Genus (abbreviation)" hint="C., Rlc., Den., Stan., B., L. …" testID="plant-genus" autoCapitalize="words" />
          <Controller
            control={control}
            name="genus"
            render={({ field }) => (
              <View style={styles.chips} role="group" aria-label="Common genera">
                {COMMON_GENERA.slice(0, 11).map((g) => (
                  <Chip key={g.abbreviation} label={g.abbreviation} selected={field.value === g.abbreviation} onPress={() => field.onChange(g.abbreviation)} />
                ))}
              </View>
            )}
          />
          <FormTextField control={control} name="epithet" label="Grex or species" testID="plant-epithet" />
          <Controller
            control={control}
            name="isSpecies"
            render={({ field }) => (
              <View style={styles.chips} role="radiogroup" aria-label="Hybrid or species">
                <Chip label="Hybrid (grex)" selected={!field.value} onPress={() => field.onChange(false)} />
                <Chip label="Species" selected={!!field.value} onPress={() => field.onChange(true)} />
              </View>
            )}
          />
          <FormTextField control={control} name="clonalName" label="Clonal name (optional)" hint="Without quotes; they are added when the name is shown" testID="plant-clonal" />
          <Controller
            control={control}
            name="areaId"
            render={({ field }) => (
              <View style={styles.field}>
                <Text variant="label">Area</Text>
                <View style={styles.chips}>
                  {(areas.data ?? []).map((a) => (
                    <Chip key={a.id} label={a.name} selected={field.value === a.id} onPress={() => field.onChange(field.value === a.id ? null : a.id)} />
                  ))}
                  {areas.data?.length === 0 ? <Text color="textMuted">No areas yet</Text> : null}
                </View>
              </View>
            )}
          />
          <FormTextField control={control} name="medium" label="Medium" testID="plant-medium" />
          <Controller
            control={control}
            name="medium"
            render={({ field }) => (
              <View style={styles.chips} role="group" aria-label="Common media">
                {COMMON_MEDIA.slice(0, 6).map((m) => (
                  <Chip key={m} label={m} selected={field.value === m} onPress={() => field.onChange(m)} />
                ))}
              </View>
            )}
          />
          <FormTextField control={control} name="source" label="Source (optional)" />
          <FormTextField control={control} name="acquiredOn" label="Acquired on (optional)" hint="YYYY-MM-DD" />
          <Controller
            control={control}
            name="minNightTempC"
            render={({ field, fieldState }) => (
              <NightLimitField genus={preview.genus ?? ''} onChange={field.onChange} error={fieldState.error?.message} />
            )}
          />
          <FormTextField control={control} name="notes" label="Notes (optional)" multiline numberOfLines={3} />
          <Button label="Save plant" onPress={submit} loading={formState.isSubmitting} testID="save-plant" />
        </View>
      </Card>
    </Screen>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.lg },
  field: { gap: spacing.sm },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
});
