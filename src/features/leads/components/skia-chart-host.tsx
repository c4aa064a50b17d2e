// Loaded lazily by lead-chart.tsx: CanvasKit's loader (~120 KB) is only for screens with a chart.
// Skia's own WithSkiaWeb is not used: it imports Skia's Platform module and, through it, Skia's
// type modules, which the chart canvas imports too, so the bundler moved them into the chunk
// every screen loads at start. LoadSkiaWeb alone keeps them in the chart's own chunk.
import { lazy, Suspense, useMemo } from 'react';
import { LoadSkiaWeb } from '@shopify/react-native-skia/lib/module/web/LoadSkiaWeb';
import { ActivityIndicator, StyleSheet } from 'react-native';
import { colors } from '@/theme';
import type { LeadChartData } from './chart-data';

const SKIA_OPTIONS = { locateFile: (file: string) => `/${file}` };

export default function SkiaChartHost({ data }: { data: LeadChartData }) {
  // As WithSkiaWeb does: CanvasKit first (the canvas module reads it when it loads), then the canvas.
  const Canvas = useMemo(
    () =>
      lazy(async () => {
        await LoadSkiaWeb(SKIA_OPTIONS);
        return import('./lead-chart-canvas');
      }),
    [],
  );
  return (
    <Suspense fallback={<ActivityIndicator color={colors.accent} style={styles.loading} accessibilityLabel="Drawing the chart" />}>
      <Canvas data={data} />
    </Suspense>
  );
}

const styles = StyleSheet.create({ loading: { height: 260 } });
