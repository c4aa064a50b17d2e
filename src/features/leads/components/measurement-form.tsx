import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useState } from 'react';
import { Controller, useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { ApiError } from '@/api/client';
import { Button } from '@/components/button';
import { Chip } from '@/components/chip';
import { NumberField, parseNumber } from '@/components/number-field';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { fromMm, STEP, toMm, type LengthUnit } from '@/lib/units';
import { useToday } from '@/lib/use-today';
import { measurementInputSchema, sheathStates, type Measurement, type MeasurementInput, type SheathState } from '@/shared/schemas/records';
import { entryLooksWrong } from '@/domain/entry-check';
import { colors, radius, spacing } from '@/theme';
import { SHEATH_LABELS } from '../../plants/components/lead-chip';

/** What the grower types: sizes in the collection's unit, as text until saved. */
const formSchema = z.object({
  date: z.string(),
  height: z.string().min(1, 'Enter the pseudobulb height'),
  leafCount: z.string(),
  rootTips: z.string(),
  bulbWidth: z.string(),
  sheath: z.enum(sheathStates),
  note: z.string(),
});
type FormValues = z.infer<typeof formSchema>;

const FIELD_OF: Record<string, keyof FormValues> = { heightMm: 'height', bulbWidthMm: 'bulbWidth', leafCount: 'leafCount', rootTips: 'rootTips', date: 'date', sheath: 'sheath', note: 'note' };

function initialValues(last: Measurement | null, units: LengthUnit, today: string): FormValues {
  const text = (v: number | null | undefined) => (v === null || v === undefined ? '' : String(v));
  return {
    date: today,
    height: last ? String(fromMm(last.heightMm, units)) : '',
    leafCount: text(last?.leafCount),
    rootTips: text(last?.rootTips),
    bulbWidth: last?.bulbWidthMm ? String(fromMm(last.bulbWidthMm, units)) : '',
    sheath: last?.sheath ?? 'none',
    note: '',
  };
}

export interface MeasurementFormProps {
  last: Measurement | null;
  /** The lead's looks so far, for the second look at an entry that seems wrong (`entryLooksWrong`). */
  earlier?: readonly Measurement[];
  /** The lead's scatter about its curve (mm), when known. */
  spreadMm?: number | null;
  /** Sheath states to offer; a genus without a sheath gets none and no sheath field. */
  sheathStates?: readonly SheathState[];
  units: LengthUnit;
  /** Saves the entry; it must throw ApiError for a refusal so the fields can show it. */
  onSave: (input: MeasurementInput) => Promise<unknown>;
  saveLabel?: string;
  testIDPrefix?: string;
}

/**
 * The fast add-measurement form: last values pre-filled, steppers, today's date. The
 * typed values are converted to millimetres and checked with the shared schema before
 * anything is sent.
 */
export function MeasurementForm({ last, earlier, spreadMm = null, sheathStates: offered = sheathStates, units, onSave, saveLabel = 'Save measurement', testIDPrefix = 'measure' }: MeasurementFormProps) {
  const [formError, setFormError] = useState<string>();
  // An entry that looks wrong waits here for the grower's "save as typed".
  const [doubt, setDoubt] = useState<{ reason: string; input: MeasurementInput; values: FormValues } | null>(null);
  const [saved, setSaved] = useState(false);
  // The page's date while the browser takes the server's page over, then the grower's own.
  const today = useToday();
  const { control, handleSubmit, setError, reset, formState, getFieldState, setValue } = useForm<FormValues>({
    resolver: zodResolver(formSchema),
    defaultValues: initialValues(last, units, today),
  });
  useEffect(() => {
    if (!getFieldState('date').isDirty) setValue('date', today);
  }, [today, getFieldState, setValue]);

  const submit = handleSubmit(async (values) => {
    setFormError(undefined);
    setSaved(false);
    const height = parseNumber(values.height);
    const width = parseNumber(values.bulbWidth);
    const candidate = {
      date: values.date,
      heightMm: height === null ? undefined : toMm(height, units),
      leafCount: parseNumber(values.leafCount),
      rootTips: parseNumber(values.rootTips),
      bulbWidthMm: width === null ? null : toMm(width, units),
      sheath: values.sheath,
      note: values.note || null,
    };
    const checked = measurementInputSchema.safeParse(candidate);
    if (!checked.success) {
      for (const issue of checked.error.issues) {
        const field = FIELD_OF[String(issue.path[0])];
        if (field) setError(field, { type: 'schema', message: issue.message });
      }
      return;
    }
    const looks = earlier ?? (last ? [last] : []);
    const reason = entryLooksWrong(looks.map((m) => ({ date: m.date, heightMm: m.heightMm })), checked.data, units, spreadMm);
    if (reason) {
      setDoubt({ reason, input: checked.data, values });
      return;
    }
    await send(checked.data, values);
  });

  const send = async (input: MeasurementInput, values: FormValues) => {
    try {
      await onSave(input);
      setSaved(true);
      reset({ ...values, note: '' });
    } catch (error) {
      if (error instanceof ApiError) {
        let placed = false;
        for (const detail of error.details) {
          const field = FIELD_OF[detail.field];
          if (field) {
            setError(field, { type: 'server', message: detail.reason });
            placed = true;
          }
        }
        if (!placed) setFormError(error.message);
      } else setFormError('Something went wrong; try again.');
    }
  };

  const unitLabel = units === 'mm' ? 'mm' : 'inches';
  return (
    <View style={styles.form}>
      <Controller control={control} name="date" render={({ field, fieldState }) => <TextField label="Date" value={field.value} onChangeText={field.onChange} hint="YYYY-MM-DD" error={fieldState.error?.message} testID={`${testIDPrefix}-date`} />} />
      <Controller
        control={control}
        name="height"
        render={({ field, fieldState }) => (
          <NumberField label={`Pseudobulb height (${unitLabel})`} value={field.value} onChange={field.onChange} step={STEP[units]} decimals={units === 'in' ? 1 : 0} error={fieldState.error?.message} testID={`${testIDPrefix}-height`} />
        )}
      />
      <View style={styles.pair}>
        <View style={styles.half}>
          <Controller control={control} name="leafCount" render={({ field, fieldState }) => <NumberField label="Leaves" value={field.value} onChange={field.onChange} error={fieldState.error?.message} testID={`${testIDPrefix}-leaves`} />} />
        </View>
        <View style={styles.half}>
          <Controller control={control} name="rootTips" render={({ field, fieldState }) => <NumberField label="New root tips" value={field.value} onChange={field.onChange} error={fieldState.error?.message} testID={`${testIDPrefix}-roots`} />} />
        </View>
      </View>
      {offered.some((s) => s !== 'none') ? (
        <Controller
          control={control}
          name="sheath"
          render={({ field }) => (
            <View style={styles.group}>
              <Text variant="label">Sheath</Text>
              <View style={styles.chips} role="radiogroup" aria-label="Sheath">
                {(['none', ...offered.filter((s) => s !== 'none')] as SheathState[]).map((s) => (
                  <Chip key={s} label={SHEATH_LABELS[s]} selected={field.value === s} onPress={() => field.onChange(s)} testID={`${testIDPrefix}-sheath-${s}`} />
                ))}
              </View>
            </View>
          )}
        />
      ) : null}
      <Controller control={control} name="bulbWidth" render={({ field, fieldState }) => <TextField label={`Bulb width (${unitLabel}, optional)`} value={field.value} onChangeText={field.onChange} inputMode="decimal" error={fieldState.error?.message} />} />
      <Controller control={control} name="note" render={({ field, fieldState }) => <TextField label="Note (optional)" value={field.value} onChangeText={field.onChange} error={fieldState.error?.message} testID={`${testIDPrefix}-note`} />} />
      {formError ? (
        <Text color="danger" role="alert">
          {formError}
        </Text>
      ) : null}
      {saved && !formState.isDirty ? (
        <Text color="success" accessibilityLiveRegion="polite">
          Saved
        </Text>
      ) : null}
      {doubt ? (
        <View style={styles.doubt} role="alertdialog" aria-label="Is this right?" testID={`${testIDPrefix}-doubt`}>
          <Text variant="bodyStrong">Is this right?</Text>
          <Text>{doubt.reason}</Text>
          <View style={styles.chips}>
            <Button
              label="Save as typed"
              onPress={() => {
                const pending = doubt;
                setDoubt(null);
                void send(pending.input, pending.values);
              }}
              testID={`${testIDPrefix}-doubt-save`}
            />
            <Button label="Change it" tone="quiet" onPress={() => setDoubt(null)} testID={`${testIDPrefix}-doubt-change`} />
          </View>
        </View>
      ) : (
        <Button label={saveLabel} onPress={submit} loading={formState.isSubmitting} testID={`${testIDPrefix}-save`} />
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.md },
  pair: { gap: spacing.md },
  half: {},
  group: { gap: spacing.xs },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  doubt: { gap: spacing.xs, padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.warningSoft },
});
