import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useAddCareMutation } from '@/api/queries/records';
import { Button } from '@/components/button';
import { FormActions } from '@/components/form-actions';
import { Card } from '@/components/card';
import { Caution } from '@/components/caution';
import { Chip } from '@/components/chip';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { formatDate, localToday } from '@/lib/dates';
import { careKinds, damageKinds, type Area, type CareEntry, type CareInput } from '@/shared/schemas/records';
import { colors, spacing } from '@/theme';

type Kind = (typeof careKinds)[number];
type Damage = (typeof damageKinds)[number];

const KIND_LABELS: Record<Kind, string> = { water: 'Water', feed: 'Feed', repot: 'Repot', treat: 'Treat', move: 'Move', damage: 'Damage', note: 'Note' };
const DAMAGE_LABELS: Record<Damage, string> = { sunburn: 'Sunburn', cold: 'Cold', rot: 'Rot', mechanical: 'Broken or bruised', pest: 'Pest', other: 'Other' };

/** The usual cautions for any pest or disease treatment; the product label always rules. */
export function TreatmentCaution() {
  return (
    <Caution title="Before you treat" testID="treatment-caution">
      <Text>Follow the product label: it is the law for that product. Wear gloves (and eye protection if it says so), work where the air moves or outdoors, keep children and pets away until it has dried, and follow your local rules on pesticides.</Text>
    </Caution>
  );
}

export function describeCare(entry: CareEntry, areas: Area[]): string {
  const area = (id: string | null) => areas.find((a) => a.id === id)?.name ?? 'another area';
  switch (entry.kind) {
    case 'feed':
      return entry.withCalcium ? 'Fed, with calcium' : 'Fed, without calcium';
    case 'repot':
      return `Repotted into ${entry.newMedium}`;
    case 'treat':
      return `Treated ${entry.target} with ${entry.product}`;
    case 'move':
      return `Moved to ${area(entry.toAreaId)}`;
    case 'damage':
      return `Damage: ${entry.damageKind ? DAMAGE_LABELS[entry.damageKind].toLowerCase() : 'unspecified'}`;
    case 'water':
      return 'Watered';
    default:
      return 'Note';
  }
}

export function CareSection({ collectionId, plantId, entries, areas, canWrite }: { collectionId: string; plantId: string; entries: CareEntry[]; areas: Area[]; canWrite: boolean }) {
  const [adding, setAdding] = useState(false);
  return (
    <Card title="Care" testID="care-section">
      {canWrite && !adding ? <Button label="Add a care entry" tone="secondary" onPress={() => setAdding(true)} testID="add-care" /> : null}
      {adding ? <CareForm collectionId={collectionId} plantId={plantId} areas={areas} onDone={() => setAdding(false)} /> : null}
      {entries.length === 0 ? (
        <Text color="textMuted">No care recorded yet.</Text>
      ) : (
        entries.map((entry) => (
          <View key={entry.id} style={styles.entry}>
            <Text variant="label" color="textMuted">
              {formatDate(entry.occurredOn)}
            </Text>
            <Text>{describeCare(entry, areas)}</Text>
            {entry.note ? <Text variant="caption" color="textMuted">{entry.note}</Text> : null}
          </View>
        ))
      )}
    </Card>
  );
}

function CareForm({ collectionId, plantId, areas, onDone }: { collectionId: string; plantId: string; areas: Area[]; onDone: () => void }) {
  const add = useAddCareMutation(collectionId, plantId);
  const [kind, setKind] = useState<Kind>('water');
  const [occurredOn, setOccurredOn] = useState(localToday());
  const [note, setNote] = useState('');
  const [withCalcium, setWithCalcium] = useState(false);
  const [newMedium, setNewMedium] = useState('');
  const [product, setProduct] = useState('');
  const [target, setTarget] = useState('');
  const [toAreaId, setToAreaId] = useState<string | null>(null);
  const [damageKind, setDamageKind] = useState<Damage>('cold');
  const error = add.error instanceof ApiError ? add.error : undefined;

  const build = (): CareInput => {
    const base = { occurredOn, note: note || null };
    switch (kind) {
      case 'feed':
        return { kind, withCalcium, ...base };
      case 'repot':
        return { kind, newMedium, ...base };
      case 'treat':
        return { kind, product, target, ...base };
      case 'move':
        return { kind, toAreaId: toAreaId ?? '', ...base };
      case 'damage':
        return { kind, damageKind, ...base };
      case 'note':
        return { kind, occurredOn, note };
      default:
        return { kind: 'water', ...base };
    }
  };

  return (
    <View style={styles.form} testID="care-form">
      <View style={styles.chips} role="radiogroup" aria-label="Kind of care">
        {careKinds.map((k) => (
          <Chip key={k} label={KIND_LABELS[k]} selected={kind === k} onPress={() => setKind(k)} testID={`care-kind-${k}`} />
        ))}
      </View>
      {kind === 'treat' ? <TreatmentCaution /> : null}
      <TextField label="Date" value={occurredOn} onChangeText={setOccurredOn} hint="YYYY-MM-DD" error={error?.fieldError('occurredOn')} />
      {kind === 'feed' ? (
        <View style={styles.chips}>
          <Chip label="With calcium" selected={withCalcium} onPress={() => setWithCalcium(true)} />
          <Chip label="Without calcium" selected={!withCalcium} onPress={() => setWithCalcium(false)} />
        </View>
      ) : null}
      {kind === 'repot' ? <TextField label="New medium" value={newMedium} onChangeText={setNewMedium} error={error?.fieldError('newMedium')} /> : null}
      {kind === 'treat' ? (
        <>
          <TextField label="Product" value={product} onChangeText={setProduct} error={error?.fieldError('product')} />
          <TextField label="Pest or disease" value={target} onChangeText={setTarget} error={error?.fieldError('target')} />
        </>
      ) : null}
      {kind === 'move' ? (
        <View style={styles.chips} role="radiogroup" aria-label="Move to">
          {areas.map((a) => (
            <Chip key={a.id} label={a.name} selected={toAreaId === a.id} onPress={() => setToAreaId(a.id)} />
          ))}
          {error?.fieldError('toAreaId') ? <Text color="danger">Choose where it went</Text> : null}
        </View>
      ) : null}
      {kind === 'damage' ? (
        <View style={styles.chips} role="radiogroup" aria-label="Kind of damage">
          {damageKinds.map((d) => (
            <Chip key={d} label={DAMAGE_LABELS[d]} selected={damageKind === d} onPress={() => setDamageKind(d)} />
          ))}
        </View>
      ) : null}
      <TextField label={kind === 'note' ? 'Note' : 'Note (optional)'} value={note} onChangeText={setNote} multiline error={error?.fieldError('note')} />
      {error && error.details.length === 0 ? <Text color="danger">{error.message}</Text> : null}
      <FormActions onCancel={onDone}>
        <Button label="Save care entry" loading={add.isPending} onPress={() => add.mutate(build(), { onSuccess: onDone })} testID="save-care" />
      </FormActions>
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.md },
  chips: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  entry: { gap: spacing.xxs, paddingTop: spacing.sm, borderTopWidth: 1, borderTopColor: colors.borderSubtle },
});
