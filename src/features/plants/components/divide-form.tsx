import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useDividePlantMutation } from '@/api/queries/records';
import { Button } from '@/components/button';
import { FormActions } from '@/components/form-actions';
import { Caution } from '@/components/caution';
import { Chip } from '@/components/chip';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { localToday } from '@/lib/dates';
import { MIN_BULBS_PER_DIVISION, type PlantDetail } from '@/shared/schemas/records';
import { colors, radius, spacing } from '@/theme';

interface Piece {
  tag: string;
  bulbCount: string;
  medium: string;
  leadIds: string[];
}

/** Cutting the rhizome into pieces; each piece becomes a plant that keeps the parent's history. */
export function DivideForm({ collectionId, plant, onDone }: { collectionId: string; plant: PlantDetail; onDone: () => void }) {
  const divide = useDividePlantMutation(collectionId, plant.id);
  const [dividedOn, setDividedOn] = useState(localToday());
  const [pieces, setPieces] = useState<Piece[]>([{ tag: `${plant.tag}-a`, bulbCount: '', medium: plant.medium ?? '', leadIds: [] }]);
  const [warnings, setWarnings] = useState<string[]>([]);
  const error = divide.error instanceof ApiError ? divide.error : undefined;
  const growing = plant.leads.filter((l) => l.status === 'growing' || l.status === 'mature');

  const update = (index: number, change: Partial<Piece>) => setPieces((all) => all.map((p, i) => (i === index ? { ...p, ...change } : p)));

  return (
    <View style={styles.form} testID="divide-form">
      <Caution title="Before you cut" testID="divide-caution">
        <Text>
          Sterilize the blade between plants — by flame, or a fresh bleach or trisodium phosphate soak — since tools spread
          orchid viruses from plant to plant (common practice). Take care with sharp tools and wear gloves with bleach.
        </Text>
        <Text variant="caption" color="textMuted">
          Pieces of at least {MIN_BULBS_PER_DIVISION}–4 pseudobulbs with a lead re-establish best (common practice).
        </Text>
      </Caution>
      <TextField label="Divided on" value={dividedOn} onChangeText={setDividedOn} hint="YYYY-MM-DD" error={error?.fieldError('dividedOn')} />
      {pieces.map((piece, index) => (
        <View key={index} style={styles.piece}>
          <Text variant="label">Piece {index + 1}</Text>
          <TextField label="New tag" value={piece.tag} onChangeText={(tag) => update(index, { tag })} error={error?.fieldError(`pieces.${index}.tag`)} testID={`piece-${index}-tag`} />
          <TextField label="Pseudobulbs in this piece" value={piece.bulbCount} onChangeText={(bulbCount) => update(index, { bulbCount })} inputMode="numeric" />
          <TextField label="Medium" value={piece.medium} onChangeText={(medium) => update(index, { medium })} />
          {growing.length > 0 ? (
            <View style={styles.chips} role="group" aria-label={`Leads going with piece ${index + 1}`}>
              {growing.map((lead) => (
                <Chip
                  key={lead.id}
                  label={`Lead ${lead.label}`}
                  selected={piece.leadIds.includes(lead.id)}
                  onPress={() =>
                    update(index, { leadIds: piece.leadIds.includes(lead.id) ? piece.leadIds.filter((id) => id !== lead.id) : [...piece.leadIds, lead.id] })
                  }
                />
              ))}
            </View>
          ) : null}
          {error?.fieldError(`pieces.${index}.leadIds`) ? <Text color="danger">{error.fieldError(`pieces.${index}.leadIds`)}</Text> : null}
        </View>
      ))}
      <Button
        label="Add another piece"
        tone="secondary"
        onPress={() => setPieces((all) => [...all, { tag: `${plant.tag}-${String.fromCharCode(97 + all.length)}`, bulbCount: '', medium: plant.medium ?? '', leadIds: [] }])}
      />
      {error && error.details.length === 0 ? <Text color="danger">{error.message}</Text> : null}
      {warnings.map((w) => (
        <Text key={w} color="warning">
          {w}
        </Text>
      ))}
      <FormActions onCancel={onDone} cancelLabel={warnings.length > 0 ? 'Done' : 'Cancel'}>
        <Button
          label="Divide the plant"
          loading={divide.isPending}
          testID="divide-submit"
          onPress={() =>
            divide.mutate(
              {
                dividedOn,
                pieces: pieces.map((p) => ({
                  tag: p.tag,
                  leadIds: p.leadIds,
                  bulbCount: p.bulbCount ? Number(p.bulbCount) : null,
                  medium: p.medium || null,
                })),
              },
              {
                onSuccess: (result) => {
                  setWarnings(result.warnings.map((w) => `Piece ${w.piece + 1}: ${w.message}`));
                  if (result.warnings.length === 0) onDone();
                },
              },
            )
          }
        />
      </FormActions>
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.md },
  piece: { gap: spacing.sm, padding: spacing.md, borderRadius: radius.md, borderWidth: 1, borderColor: colors.borderSubtle },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
});
