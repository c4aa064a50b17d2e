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

let canvasModule: Promise<typeof import('./lead-chart-canvas')> | null = null;

/**
 * As WithSkiaWeb does: CanvasKit first (the canvas module reads it when it loads), then the
 * canvas. Shared by every chart, so one that mounts again (another lead, a layout change)
 * neither loads CanvasKit nor asks for the chunk a second time; a failed load is forgotten,
 * so the next chart tries again.
 */
function loadCanvas() {
  canvasModule ??= LoadSkiaWeb(SKIA_OPTIONS)
    .then(() => import('./lead-chart-canvas'))
    .catch((error: unknown) => {
      canvasModule = null;
      throw error;
    });
  return canvasModule;
}

export default function SkiaChartHost({ data }: { data: LeadChartData }) {
  const Canvas = useMemo(() => lazy(loadCanvas), []);
  return (
    <Suspense fallback={<ActivityIndicator color={colors.accent} style={styles.loading} accessibilityLabel="Drawing the chart" />}>
      <Canvas data={data} />
    </Suspense>
  );
}

const styles = StyleSheet.create({ loading: { height: 260 } });
