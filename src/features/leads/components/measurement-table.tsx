import { useState } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { useDeleteMeasurementMutation } from '@/api/queries/records';
import { Button } from '@/components/button';
import { Confirm } from '@/components/confirm';
import { Text } from '@/components/text';
import { formatDate } from '@/lib/dates';
import { formatLength, type LengthUnit } from '@/lib/units';
import type { Measurement } from '@/shared/schemas/records';
import { colors, spacing } from '@/theme';
import { SHEATH_LABELS } from '../../plants/components/lead-chip';

const COLUMNS = ['Date', 'Height', 'Leaves', 'Sheath', 'Root tips', 'Width', 'Note', ''];

/** The lead's measurements, newest first, as a real table for screen readers. */
export function MeasurementTable({ collectionId, measurements, units, canDelete }: { collectionId: string; measurements: Measurement[]; units: LengthUnit; canDelete: (m: Measurement) => boolean }) {
  const remove = useDeleteMeasurementMutation(collectionId);
  const [confirming, setConfirming] = useState<string | null>(null);
  if (measurements.length === 0) return <Text color="textMuted">No measurements yet.</Text>;
  const rows = [...measurements].reverse();
  return (
    <View style={styles.wrap}>
      {confirming ? (
        <Confirm
          message={`Delete the measurement of ${formatDate(rows.find((m) => m.id === confirming)?.date)}?`}
          confirmLabel="Delete measurement"
          busy={remove.isPending}
          onCancel={() => setConfirming(null)}
          onConfirm={() => remove.mutate(confirming, { onSettled: () => setConfirming(null) })}
        />
      ) : null}
      <ScrollView horizontal>
        <View role="table" aria-label="Measurements" testID="measurement-table">
          <View role="row" style={[styles.row, styles.head]}>
            {COLUMNS.map((c, i) => (
              <Text key={i} role="columnheader" variant="label" style={[styles.cell, i === 6 && styles.noteCell]}>
                {c}
              </Text>
            ))}
          </View>
          {rows.map((m) => (
            <View key={m.id} role="row" style={styles.row} testID={`measurement-${m.date}`}>
              <Text role="cell" style={styles.cell}>{formatDate(m.date)}</Text>
              <Text role="cell" style={styles.cell}>{formatLength(m.heightMm, units)}</Text>
              <Text role="cell" style={styles.cell}>{m.leafCount ?? '—'}</Text>
              <Text role="cell" style={styles.cell}>{SHEATH_LABELS[m.sheath]}</Text>
              <Text role="cell" style={styles.cell}>{m.rootTips ?? '—'}</Text>
              <Text role="cell" style={styles.cell}>{formatLength(m.bulbWidthMm, units)}</Text>
              <Text role="cell" style={[styles.cell, styles.noteCell]}>{m.note ?? ''}</Text>
              <View role="cell" style={styles.cell}>
                {canDelete(m) ? <Button label="Delete" accessibilityLabel={`Delete the measurement of ${formatDate(m.date)}`} tone="quiet" onPress={() => setConfirming(m.id)} /> : null}
              </View>
            </View>
          ))}
        </View>
      </ScrollView>
    </View>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.sm },
  row: { flexDirection: 'row', alignItems: 'center', borderBottomWidth: 1, borderBottomColor: colors.borderSubtle, minHeight: 44 },
  head: { borderBottomColor: colors.border },
  cell: { width: 108, paddingHorizontal: spacing.xs },
  noteCell: { width: 180 },
});
