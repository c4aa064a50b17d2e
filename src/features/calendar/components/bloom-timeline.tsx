import { Link } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { Text } from '@/components/text';
import type { BloomCalendarResponse } from '@/shared/schemas/engine';
import { colors, radius, spacing } from '@/theme';
import { CHANCE_BANDS, chanceBand, chanceText, monthLabel, monthStarts, positionPercent } from '../timeline';

type CalendarWindow = BloomCalendarResponse['windows'][number];

const LABEL_COLUMN = 300;
const TRACK_HEIGHT = 30;
const AXIS_EVERY = 8;

/** Bloom windows drawn with plain Views: absolute bars in a relative track, widths as percentages. */
export function BloomTimeline({ windows, from, to, today, on, wide }: { windows: CalendarWindow[]; from: string; to: string; today: string; on: string | null; wide: boolean }) {
  const year = Number(today.slice(0, 4));
  const months = monthStarts(from, to);
  return (
    <View style={styles.wrap} testID="bloom-timeline">
      {windows.map((w, i) => (
        <View key={w.leadId}>
          {i % AXIS_EVERY === 0 ? <Axis months={months} from={from} to={to} wide={wide} /> : null}
          <TimelineRow window={w} from={from} to={to} today={today} on={on} wide={wide} year={year} months={months} />
        </View>
      ))}
    </View>
  );
}

/** Month names over the tracks, repeated down a long list so a phone never scrolls away from them. */
function Axis({ months, from, to, wide }: { months: string[]; from: string; to: string; wide: boolean }) {
  return (
    <View style={StyleSheet.flatten([styles.row, wide ? styles.rowWide : null, styles.axisRow])} aria-hidden>
      {wide ? <View style={styles.labelColumn} /> : null}
      <View style={StyleSheet.flatten([styles.axis, wide ? styles.trackWide : null])}>
        {months.map((m, i) => (
          <Text key={m} variant="caption" color="textMuted" style={StyleSheet.flatten([styles.month, { left: `${positionPercent(m, from, to)}%` }])}>
            {wide ? monthLabel(m, i === 0 || m.endsWith('-01-01')) : m.endsWith('-01-01') ? `Jan ’${m.slice(2, 4)}` : monthLabel(m, false)}
          </Text>
        ))}
      </View>
    </View>
  );
}

function TimelineRow({ window: w, from, to, today, on, wide, year, months }: { window: CalendarWindow; from: string; to: string; today: string; on: string | null; wide: boolean; year: number; months: string[] }) {
  const band = chanceBand(w.chance);
  const left = positionPercent(w.firstOpen.p10, from, to);
  const right = positionPercent(w.firstOpen.p90, from, to);
  const spanRight = positionPercent(w.span.end, from, to);
  const median = positionPercent(w.firstOpen.p50, from, to);
  const showsToday = today >= from && today <= to;
  const showsOn = on !== null && on >= from && on <= to;
  // The lead's own story says when; an uncertain window is drawn faint and says so.
  const uncertain = w.story.figures.uncertain;
  void year;
  return (
    <Link href={`/plants/${w.plantId}/leads/${w.leadId}`} asChild>
      <Pressable accessibilityRole="link" style={StyleSheet.flatten([styles.row, styles.leadRow, wide ? styles.rowWide : null])} testID={`calendar-row-${w.plantTag}-${w.leadLabel}`}>
        <View style={wide ? styles.labelColumn : styles.labelStacked}>
          <Text variant="bodyStrong">
            {w.plantTag} · lead {w.leadLabel}
          </Text>
          <Text variant="caption" testID="calendar-row-chance">
            {w.story.chance ? (
              <Text variant="caption" style={styles.chanceWord}>
                {`${band.dots} ${chanceText(w.chance).replace(/^./, (c) => c.toUpperCase())} · `}
              </Text>
            ) : null}
            {`${w.story.chip.label}${uncertain ? ' · timing uncertain' : ''}`}
          </Text>
          <Text variant="caption" color="textMuted" testID="calendar-row-story">
            {w.story.bloom}
          </Text>
        </View>
        <View style={StyleSheet.flatten([styles.track, wide ? styles.trackWide : null])} aria-hidden>
          {months.map((m) => (
            <View key={m} style={StyleSheet.flatten([styles.monthLine, { left: `${positionPercent(m, from, to)}%` }])} />
          ))}
          <View style={StyleSheet.flatten([styles.span, { left: `${left}%`, width: `${Math.max(0, spanRight - left)}%`, backgroundColor: band.color }, uncertain ? styles.faint : null])} />
          <View style={StyleSheet.flatten([styles.bar, { left: `${left}%`, width: `${Math.max(0, right - left)}%`, backgroundColor: band.color }, uncertain ? styles.faint : null])} />
          <View style={StyleSheet.flatten([styles.median, { left: `${median}%` }])} />
          {showsToday ? <View style={StyleSheet.flatten([styles.todayLine, { left: `${positionPercent(today, from, to)}%` }])} /> : null}
          {showsOn && on ? <View style={StyleSheet.flatten([styles.onLine, { left: `${positionPercent(on, from, to)}%` }])} /> : null}
        </View>
      </Pressable>
    </Link>
  );
}

/** What the colours and marks mean, in words beside each swatch. */
export function TimelineLegend({ showsOn }: { showsOn: boolean }) {
  return (
    <View style={styles.legend} testID="calendar-legend" role="group" aria-label="Legend">
      <View style={styles.legendGroup}>
        {CHANCE_BANDS.map((b) => (
          <View key={b.band} style={styles.legendItem}>
            <View style={StyleSheet.flatten([styles.swatch, { backgroundColor: b.color }])} />
            <Text variant="caption" style={styles.legendText}>{b.legend}</Text>
          </View>
        ))}
      </View>
      <View style={styles.legendGroup}>
        <View style={styles.legendItem}>
          <View style={StyleSheet.flatten([styles.swatchBar, { backgroundColor: colors.textMuted }])} />
          <Text variant="caption" style={styles.legendText}>Thick bar: first flower, earliest to latest (10th–90th percentile)</Text>
        </View>
        <View style={styles.legendItem}>
          <View style={styles.swatchMedian} />
          <Text variant="caption" style={styles.legendText}>Light mark with dark edge: most likely first flower (median)</Text>
        </View>
        <View style={styles.legendItem}>
          <View style={StyleSheet.flatten([styles.swatchSpan, { backgroundColor: colors.textMuted }])} />
          <Text variant="caption" style={styles.legendText}>Thin line: may still be in flower</Text>
        </View>
        <View style={styles.legendItem}>
          <View style={StyleSheet.flatten([styles.swatchBar, { backgroundColor: colors.textMuted }, styles.faint])} />
          <Text variant="caption" style={styles.legendText}>Faint bar: timing uncertain (a window of more than three months)</Text>
        </View>
        <View style={styles.legendItem}>
          <View style={styles.swatchToday} />
          <Text variant="caption" style={styles.legendText}>Dashed line: today</Text>
        </View>
        {showsOn ? (
          <View style={styles.legendItem}>
            <View style={styles.swatchOn} />
            <Text variant="caption" style={styles.legendText}>Red line: the date you chose</Text>
          </View>
        ) : null}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  faint: { opacity: 0.35 },
  wrap: { gap: 0, borderTopWidth: 1, borderTopColor: colors.borderSubtle },
  row: { gap: spacing.xs, paddingVertical: spacing.sm },
  rowWide: { flexDirection: 'row', alignItems: 'center', gap: spacing.lg },
  axisRow: { paddingVertical: spacing.xs },
  leadRow: { borderBottomWidth: 1, borderBottomColor: colors.borderSubtle, paddingHorizontal: spacing.xs },
  labelColumn: { width: LABEL_COLUMN, gap: spacing.xxs },
  labelStacked: { gap: spacing.xxs },
  chanceWord: { fontWeight: '600' },
  axis: { position: 'relative', height: 20, width: '100%' },
  month: { position: 'absolute', top: 0, paddingLeft: 3 },
  track: {
    position: 'relative',
    height: TRACK_HEIGHT,
    width: '100%',
    borderRadius: radius.sm,
    backgroundColor: colors.surfaceMuted,
    overflow: 'hidden',
  },
  // Side by side from 900 px: only there may the track flex beside the label column.
  trackWide: { flex: 1, width: 'auto' },
  monthLine: { position: 'absolute', top: 0, bottom: 0, width: 1, backgroundColor: colors.border },
  span: { position: 'absolute', top: TRACK_HEIGHT / 2 - 2, height: 4, borderRadius: 2, opacity: 0.55 },
  bar: { position: 'absolute', top: 7, height: TRACK_HEIGHT - 14, minWidth: 6, borderRadius: radius.sm },
  median: { position: 'absolute', top: 2, bottom: 2, width: 7, marginLeft: -3.5, borderRadius: 2, borderWidth: 2, borderColor: colors.text, backgroundColor: colors.surface },
  todayLine: { position: 'absolute', top: 0, bottom: 0, width: 0, borderLeftWidth: 2, borderStyle: 'dashed', borderColor: colors.textMuted },
  onLine: { position: 'absolute', top: 0, bottom: 0, width: 2, marginLeft: -1, backgroundColor: colors.danger },
  legend: { gap: spacing.sm },
  legendGroup: { flexDirection: 'row', flexWrap: 'wrap', columnGap: spacing.lg, rowGap: spacing.xs },
  legendItem: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs, maxWidth: '100%' },
  legendText: { flexShrink: 1 },
  swatch: { width: 18, height: 12, borderRadius: 3 },
  swatchBar: { width: 24, height: 12, borderRadius: 3 },
  swatchMedian: { width: 7, height: 18, borderRadius: 2, borderWidth: 2, borderColor: colors.text, backgroundColor: colors.surface },
  swatchSpan: { width: 24, height: 4, borderRadius: 2, opacity: 0.55 },
  swatchToday: { width: 0, height: 18, borderLeftWidth: 2, borderStyle: 'dashed', borderColor: colors.textMuted },
  swatchOn: { width: 2, height: 18, backgroundColor: colors.danger },
});
