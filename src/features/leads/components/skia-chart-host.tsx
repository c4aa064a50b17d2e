// Loaded lazily by lead-chart.tsx: WithSkiaWeb pulls in CanvasKit's loader (~120 KB), which
// screens without a chart should never download.
import { WithSkiaWeb } from '@shopify/react-native-skia/lib/module/web';
import { ActivityIndicator, StyleSheet } from 'react-native';
import { colors } from '@/theme';
import type { LeadChartData } from './chart-data';

const SKIA_OPTIONS = { locateFile: (file: string) => `/${file}` };

export default function SkiaChartHost({ data }: { data: LeadChartData }) {
  return (
    <WithSkiaWeb
      opts={SKIA_OPTIONS}
      getComponent={() => import('./lead-chart-canvas')}
      fallback={<ActivityIndicator color={colors.accent} style={styles.loading} accessibilityLabel="Drawing the chart" />}
      componentProps={{ data }}
    />
  );
}

const styles = StyleSheet.create({ loading: { height: 260 } });
