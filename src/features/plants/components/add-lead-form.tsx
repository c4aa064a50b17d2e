import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useCreateLeadMutation } from '@/api/queries/records';
import { Button } from '@/components/button';
import { FormActions } from '@/components/form-actions';
import { Chip } from '@/components/chip';
import { TextField } from '@/components/text-field';
import { localToday, seasonOf } from '@/lib/dates';
import type { LeadSummary } from '@/shared/schemas/records';
import { spacing } from '@/theme';

/** The next free label of a season: 2026-A, 2026-B, … */
export function nextLeadLabel(season: number, leads: Array<Pick<LeadSummary, 'label'>>): string {
  const taken = new Set(leads.map((l) => l.label));
  for (let i = 0; i < 26; i += 1) {
    const label = `${season}-${String.fromCharCode(65 + i)}`;
    if (!taken.has(label)) return label;
  }
  return `${season}-${leads.length + 1}`;
}

export function AddLeadForm({ collectionId, plantId, leads, seasonStartMonth, onDone }: { collectionId: string; plantId: string; leads: LeadSummary[]; seasonStartMonth: number; onDone: () => void }) {
  const today = localToday();
  const season = seasonOf(today, seasonStartMonth);
  const [label, setLabel] = useState(nextLeadLabel(season, leads));
  const [firstSeen, setFirstSeen] = useState(today);
  const [fromBackBulb, setFromBackBulb] = useState(false);
  const create = useCreateLeadMutation(collectionId, plantId);
  const error = create.error instanceof ApiError ? create.error : undefined;

  return (
    <View style={styles.form} testID="add-lead-form">
      <TextField label="Label" value={label} onChangeText={setLabel} error={error?.fieldError('label') ?? (error?.status === 409 ? error.message : undefined)} testID="lead-label" />
      <TextField label="First seen" value={firstSeen} onChangeText={setFirstSeen} hint="YYYY-MM-DD" error={error?.fieldError('firstSeen')} testID="lead-first-seen" />
      <View style={styles.chips}>
        <Chip label="From a back bulb" selected={fromBackBulb} onPress={() => setFromBackBulb((v) => !v)} />
      </View>
      <FormActions onCancel={onDone}>
        <Button
          label="Save lead"
          loading={create.isPending}
          testID="save-lead"
          onPress={() =>
            create.mutate(
              { season: seasonOf(firstSeen.match(/^\d{4}-\d{2}-\d{2}$/) ? firstSeen : today, seasonStartMonth), label, firstSeen, fromBackBulb },
              { onSuccess: onDone },
            )
          }
        />
      </FormActions>
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.md },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
});
