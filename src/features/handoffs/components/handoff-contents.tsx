import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/text';
import type { HandoffContents } from '@/shared/schemas/handoffs';
import { spacing } from '@/theme';

const count = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

/** What comes with a division, in plain words: its own records, the lineage history, photos. */
export function HandoffContentsList({ contents: c }: { contents: HandoffContents }) {
  const lines = [
    `Its own ${count(c.ownLeads, 'lead', 'leads')}, ${count(c.ownMeasurements, 'measurement', 'measurements')} and ${count(c.ownBlooms, 'bloom record', 'bloom records')}`,
    c.historyPlants > 0
      ? `Read-only history of ${c.historyPlants === 1 ? 'the parent plant' : `${c.historyPlants} ancestor plants`} up to the division date: ${count(c.historyLeads, 'lead', 'leads')}, ${count(c.historyMeasurements, 'measurement', 'measurements')}, ${count(c.historyBlooms, 'bloom record', 'bloom records')}`
      : null,
    c.photos > 0 ? count(c.photos, 'photo', 'photos') : null,
  ].filter((l): l is string => l !== null);
  return (
    <View style={styles.list} role="list" aria-label="What comes with it" testID="handoff-contents">
      <Text variant="label" color="textMuted">
        What comes with it
      </Text>
      {lines.map((line) => (
        <Text key={line} role="listitem">
          • {line}
        </Text>
      ))}
      {c.historyPlants > 0 ? (
        <Text variant="caption" color="textMuted">
          The history lets its forecasts start from real seasons instead of from nothing.
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  list: { gap: spacing.xs },
});
