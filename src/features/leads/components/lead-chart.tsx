import { Component, lazy, type ReactNode, Suspense, useState } from 'react';
import { ActivityIndicator, ScrollView, StyleSheet, View } from 'react-native';
import { Button } from '@/components/button';
import { Text } from '@/components/text';
import { formatDate } from '@/lib/dates';
import { useInBrowser } from '@/lib/use-in-browser';
import { colors, spacing } from '@/theme';
import type { LeadChartData } from './chart-data';

const SkiaChartHost = lazy(() => import('./skia-chart-host'));

/**
 * The lead's chart with its text alternative: a one-sentence summary always, and the same
 * numbers as a table on request. The chart engine (CanvasKit, Skia, victory-native) loads
 * only when this is on screen, in two lazy steps: the host, then the canvas.
 */
export function LeadChart({ data, summary }: { data: LeadChartData; summary: string }) {
  const [asTable, setAsTable] = useState(false);
  // CanvasKit runs in browsers only: the page drawn on the server shows the loading mark.
  const inBrowser = useInBrowser();
  const drawing = <ActivityIndicator color={colors.accent} style={styles.loading} accessibilityLabel="Drawing the chart" />;
  return (
    <View style={styles.wrap} testID="lead-chart">
      <Text variant="bodyStrong" testID="chart-summary">
        {summary}
      </Text>
      <Legend />
      {asTable ? (
        <ChartTable data={data} />
      ) : (
        <View accessible accessibilityRole="image" aria-label={`Chart: ${summary}`}>
          <ChartBoundary>
            {inBrowser ? (
              <Suspense fallback={drawing}>
                <SkiaChartHost data={data} />
              </Suspense>
            ) : (
              drawing
            )}
          </ChartBoundary>
        </View>
      )}
      <Button label={asTable ? 'Show as chart' : 'Show as table'} tone="quiet" onPress={() => setAsTable((v) => !v)} testID="chart-toggle" style={styles.toggle} />
    </View>
  );
}

/**
 * A chart that cannot load or draw (the chart engine failed to download, no WebGL) stays a
 * message inside its own box; the summary, the table and the rest of the screen carry on.
 */
class ChartBoundary extends Component<{ children: ReactNode }, { failed: boolean }> {
  state = { failed: false };

  static getDerivedStateFromError() {
    return { failed: true };
  }

  render() {
    if (!this.state.failed) return this.props.children;
    return (
      <Text color="textMuted" style={styles.loading} testID="chart-failed">
        The chart could not be drawn here. “Show as table” has the same numbers.
      </Text>
    );
  }
}

function Legend() {
  const items: Array<[string, string, string]> = [
    ['dot', colors.text, 'measured height'],
    ['line', colors.accent, 'fitted curve, shaded 80% band'],
    ['line', colors.textSubtle, 'last season’s lead'],
    ['bar', colors.warning, 'sheath or bloom event'],
  ];
  return (
    <View style={styles.legend}>
      {items.map(([shape, color, label]) => (
        <View key={label} style={styles.legendItem}>
          <View style={[shape === 'dot' ? styles.dot : shape === 'bar' ? styles.bar : styles.line, { backgroundColor: color }]} />
          <Text variant="caption" color="textMuted">
            {label}
          </Text>
        </View>
      ))}
    </View>
  );
}

function ChartTable({ data }: { data: LeadChartData }) {
  const lastByDay = new Map(data.lastSeason.map((l) => [l.day, l.height]));
  return (
    <ScrollView horizontal>
      <View role="table" aria-label="Chart values" testID="chart-table">
        <View role="row" style={styles.row}>
          {['Date', 'Day', `Height (${data.unit})`, 'Leaves', 'Root tips', 'Sheath', `Last season (${data.unit})`].map((h) => (
            <Text key={h} role="columnheader" variant="label" style={styles.cell}>
              {h}
            </Text>
          ))}
        </View>
        {data.measured.map((m) => (
          <View key={m.date} role="row" style={styles.row}>
            <Text role="cell" style={styles.cell}>{formatDate(m.date)}</Text>
            <Text role="cell" style={styles.cell}>{m.day}</Text>
            <Text role="cell" style={styles.cell}>{m.height}</Text>
            <Text role="cell" style={styles.cell}>{m.leafCount ?? '—'}</Text>
            <Text role="cell" style={styles.cell}>{m.rootTips ?? '—'}</Text>
            <Text role="cell" style={styles.cell}>{m.sheath}</Text>
            <Text role="cell" style={styles.cell}>{lastByDay.get(m.day) ?? '—'}</Text>
          </View>
        ))}
      </View>
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  wrap: { gap: spacing.sm },
  loading: { height: 260 },
  legend: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.md },
  legendItem: { flexDirection: 'row', alignItems: 'center', gap: spacing.xs },
  dot: { width: 10, height: 10, borderRadius: 5 },
  line: { width: 18, height: 3, borderRadius: 2 },
  bar: { width: 3, height: 14 },
  toggle: { alignSelf: 'flex-start' },
  row: { flexDirection: 'row', borderBottomWidth: 1, borderBottomColor: colors.borderSubtle, minHeight: 36, alignItems: 'center' },
  cell: { width: 110, paddingHorizontal: spacing.xs },
});
