import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/text';
import { formatDate } from '@/lib/dates';
import type { Plant } from '@/shared/schemas/records';
import { colors, radius, spacing } from '@/theme';

/**
 * What a plant's hand-off history means for this record: a read-only copy of another grower's
 * plant, a division received from someone, or a plant given away (kept here as a record).
 */
export function HandoffBanner({ plant }: { plant: Plant }) {
  if (plant.historyOnly) {
    return (
      <View style={[styles.box, styles.readOnly]} role="note" aria-label="Read-only history" testID="history-only-banner">
        <Text variant="bodyStrong">Read-only history from {plant.receivedFrom ?? 'another grower'}</Text>
        <Text color="textMuted">
          This is a copy of the grower's record up to the division date, so the division's forecasts start from real history. It cannot be changed.
        </Text>
      </View>
    );
  }
  if (!plant.receivedFrom && !plant.givenAwayOn) return null;
  return (
    <View style={[styles.box, styles.info]} role="note" aria-label="Hand-off" testID="handoff-banner">
      {plant.receivedFrom ? <Text testID="received-from">Received from {plant.receivedFrom}</Text> : null}
      {plant.givenAwayOn ? (
        <Text testID="given-to">
          Given to {plant.givenTo ?? 'another grower'} on {formatDate(plant.givenAwayOn)}. It stays here as a record and is left out of Today and Rounds.
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: spacing.xs, padding: spacing.md, borderRadius: radius.md, borderWidth: 1 },
  readOnly: { backgroundColor: colors.surfaceMuted, borderColor: colors.border },
  info: { backgroundColor: colors.accentSoft, borderColor: colors.borderSubtle },
});
