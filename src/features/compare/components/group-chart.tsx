import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/text';
import type { ComparisonResponse } from '@/shared/schemas/engine';
import { colors, radius, spacing } from '@/theme';
import { relativeText } from '../summary';

type Group = ComparisonResponse['groups'][number];

const TRACK_HEIGHT = 22;

/**
 * One group's normalized lead size by season as bars out from 1.0 (the plants' own first
 * season): right of the centre line larger, left smaller. Plain Views, percentages of the track.
 */
export function GroupChart({ group, halfWidth, by, wide, note }: { group: Group; halfWidth: number; by: ComparisonResponse['by']; wide: boolean; note?: string | null }) {
  const tags = group.plants.map((p) => p.plantTag);
  return (
    <View style={StyleSheet.flatten([styles.card, wide ? styles.cardWide : null])} testID={`compare-group-${group.name}`}>
      <View style={styles.head}>
        <Text variant="heading" role="heading" aria-level={3}>
          {by === 'family' ? group.name : capitalize(group.name)}
        </Text>
        {note ? (
          <Text variant="caption" testID="compare-group-note">
            {note}
          </Text>
        ) : null}
        <Text variant="caption" color="textMuted">
          {group.plantsCompared} of {group.plants.length} {group.plants.length === 1 ? 'plant has' : 'plants have'} two or more seasons
        </Text>
        <Text variant="caption" testID="compare-group-plants">
          {by === 'family' ? 'Plant' : 'Plants'}: {tags.join(', ')}
        </Text>
      </View>
      {group.bySeason.length === 0 ? (
        <Text color="textMuted">No finished leads to compare yet.</Text>
      ) : (
        <View style={styles.rows}>
          <View style={styles.scaleRow} aria-hidden>
            <View style={styles.seasonColumn} />
            <View style={styles.scale}>
              <Text variant="caption" color="textMuted" style={styles.scaleLeft}>
                {(1 - halfWidth).toFixed(2)}
              </Text>
              <Text variant="caption" color="textMuted" style={styles.scaleMid}>
                1.0
              </Text>
              <Text variant="caption" color="textMuted" style={styles.scaleRight}>
                {(1 + halfWidth).toFixed(2)}
              </Text>
            </View>
          </View>
          {group.bySeason.map((s) => {
            const offset = Math.max(-1, Math.min(1, (s.meanRelative - 1) / halfWidth)) * 50;
            const larger = offset >= 0;
            return (
              <View key={s.season} style={styles.seasonRow}>
                <Text variant="label" style={styles.seasonColumn}>
                  {s.season}
                </Text>
                <View style={styles.barColumn}>
                  <View style={styles.track} aria-hidden>
                    <View style={styles.centre} />
                    <View
                      style={StyleSheet.flatten([
                        styles.bar,
                        larger ? { left: '50%', width: `${offset}%`, backgroundColor: colors.accent } : { right: '50%', width: `${-offset}%`, backgroundColor: colors.warning },
                      ])}
                    />
                  </View>
                  <Text variant="caption">
                    {relativeText(s.meanRelative)}
                    {by === 'family' ? '' : ` · ${s.plants} ${s.plants === 1 ? 'plant' : 'plants'}`}
                  </Text>
                </View>
              </View>
            );
          })}
        </View>
      )}
    </View>
  );
}

function capitalize(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}

/** The chart's numbers as a table, for screen readers and for reading exact figures. */
export function CompareTable({ groups }: { groups: Group[] }) {
  return (
    <View role="table" aria-label="Normalized lead size by group and season" testID="compare-table" style={styles.table}>
      <View role="row" style={StyleSheet.flatten([styles.tableRow, styles.tableHead])}>
        {['Group', 'Season', 'Size vs first season', 'Plants'].map((c) => (
          <Text key={c} role="columnheader" variant="label" style={styles.cell}>
            {c}
          </Text>
        ))}
      </View>
      {groups.flatMap((g) =>
        g.bySeason.map((s) => (
          <View key={`${g.name}-${s.season}`} role="row" style={styles.tableRow}>
            <Text role="cell" style={styles.cell}>
              {g.name}
            </Text>
            <Text role="cell" style={styles.cell}>
              {s.season}
            </Text>
            <Text role="cell" style={styles.cell}>
              {relativeText(s.meanRelative)}
            </Text>
            <Text role="cell" style={styles.cell}>
              {s.plants}
            </Text>
          </View>
        )),
      )}
    </View>
  );
}

const styles = StyleSheet.create({
  card: {
    gap: spacing.md,
    padding: spacing.lg,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.borderSubtle,
    backgroundColor: colors.surface,
  },
  cardWide: { width: '32%', minWidth: 280, flexGrow: 1 },
  head: { gap: spacing.xxs },
  rows: { gap: spacing.sm },
  scaleRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  scale: { flex: 1, position: 'relative', height: 18 },
  scaleLeft: { position: 'absolute', left: 0 },
  scaleMid: { position: 'absolute', left: '50%', marginLeft: -8 },
  scaleRight: { position: 'absolute', right: 0 },
  seasonRow: { flexDirection: 'row', alignItems: 'flex-start', gap: spacing.sm },
  seasonColumn: { width: 44 },
  barColumn: { flex: 1, gap: spacing.xxs },
  track: { position: 'relative', height: TRACK_HEIGHT, borderRadius: radius.sm, backgroundColor: colors.surfaceMuted, overflow: 'hidden' },
  centre: { position: 'absolute', left: '50%', top: 0, bottom: 0, width: 2, marginLeft: -1, backgroundColor: colors.text },
  bar: { position: 'absolute', top: 4, bottom: 4, minWidth: 2 },
  table: { borderTopWidth: 1, borderTopColor: colors.border },
  tableRow: { flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: colors.borderSubtle, minHeight: 40, alignItems: 'center' },
  tableHead: { borderBottomColor: colors.border },
  cell: { flex: 1, paddingHorizontal: spacing.xs, paddingVertical: spacing.xs },
});
