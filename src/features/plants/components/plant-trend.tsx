import { StyleSheet, View } from 'react-native';
import { useLeadStoriesQuery, usePlantTrendQuery } from '@/api/queries/engine';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Text } from '@/components/text';
import { formatDate } from '@/lib/dates';
import { formatLength, type LengthUnit } from '@/lib/units';
import { colors, radius, spacing } from '@/theme';
import { trendSentence } from '../trend-story';

/**
 * Mature lead size per season as a bar per season, with the trend in words and the
 * plant's flag history. Bars are plain views: no chart engine needed on the plant page.
 */
export function PlantTrend({ collectionId, plantId, units }: { collectionId: string; plantId: string; units: LengthUnit }) {
  const trend = usePlantTrendQuery(collectionId, plantId);
  // A lead flagged now is told as every screen tells it (its story); history as it read then.
  const stories = useLeadStoriesQuery(collectionId);
  return (
    <Card title="Lead size by season" testID="plant-trend">
      <QueryState query={trend} loadingLabel="Working out the trend…">
        {(t) => {
          const tallest = Math.max(1, ...t.seasons.map((s) => s.matureHeightMm));
          return (
            <View style={styles.wrap}>
              <Text testID="trend-sentence">{trendSentence(t, units)}</Text>
              <View role="list" aria-label="Mature lead size per season" style={styles.bars}>
                {t.seasons.map((s) => (
                  <View key={s.leadId} role="listitem" style={styles.barRow} aria-label={`Season ${s.season}: ${formatLength(s.matureHeightMm, units)}${s.note ? `, ${s.note}` : ''}`}>
                    <Text variant="label" style={styles.season}>
                      {s.season}
                    </Text>
                    <View style={styles.track}>
                      <View
                        style={StyleSheet.flatten([
                          styles.bar,
                          { width: `${(s.matureHeightMm / tallest) * 100}%`, backgroundColor: s.excluded ? colors.border : colors.accent },
                        ])}
                      />
                    </View>
                    <Text variant="caption" style={styles.value}>
                      {formatLength(s.matureHeightMm, units)}
                    </Text>
                  </View>
                ))}
              </View>
              {t.seasons.some((s) => s.excluded) ? (
                <Text variant="caption" color="textMuted">
                  Grey bars are kept out of the trend: {t.seasons.filter((s) => s.excluded).map((s) => `${s.season} (${s.note ?? 'expected smaller'})`).join('; ')}.
                </Text>
              ) : null}
              {t.notes.map((note) => (
                <Text key={note} variant="caption" color="textMuted">
                  {note}
                </Text>
              ))}
              {t.flagHistory.length > 0 ? (
                <View style={styles.flags}>
                  <Text variant="label">Flags over the seasons</Text>
                  {t.flagHistory.map((f) => {
                    const now = stories.data?.get(f.leadId)?.flag;
                    return (
                      <Text key={`${f.leadId}-${f.kind}`} variant="caption" testID={`flag-history-${f.leadLabel}`}>
                        {now
                          ? `${f.season} lead ${f.leadLabel}, flagged since ${formatDate(f.firstFlaggedOn)}: ${now}`
                          : `${f.season} lead ${f.leadLabel}: ${f.kind} from ${formatDate(f.firstFlaggedOn)} to ${formatDate(f.lastFlaggedOn)} — as it read then, ${f.reason}`}
                      </Text>
                    );
                  })}
                </View>
              ) : null}
            </View>
          );
        }}
      </QueryState>
    </Card>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.sm },
  bars: { gap: spacing.xs },
  barRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  season: { width: 44 },
  track: { flex: 1, height: 14, borderRadius: radius.sm, backgroundColor: colors.surfaceMuted, overflow: 'hidden' },
  bar: { height: 14, borderRadius: radius.sm },
  value: { width: 64, textAlign: 'right' },
  flags: { gap: spacing.xxs, paddingTop: spacing.sm, borderTopWidth: 1, borderTopColor: colors.borderSubtle },
});
