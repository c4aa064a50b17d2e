import { StyleSheet, View } from 'react-native';
import { useBacktestQuery } from '@/api/queries/engine';
import { Text } from '@/components/text';
import type { BacktestResponse } from '@/shared/schemas/engine';
import { colors, radius, spacing } from '@/theme';

/** How far last seasons' bloom forecasts were off, in plain words; null figures say so. */
export function trustSentence(figures: Pick<BacktestResponse, 'n' | 'medianAbsErrorDays' | 'shareInside80' | 'naive'>): string {
  if (figures.n === 0 || figures.medianAbsErrorDays === null) return 'Not enough history yet to check the forecasts.';
  const days = Math.round(figures.medianAbsErrorDays);
  const parts = [`Last seasons' forecasts were off by a median of ${days} ${days === 1 ? 'day' : 'days'}`];
  if (figures.shareInside80 !== null) parts.push(`${Math.round(figures.shareInside80 * 5)} in 5 fell inside the window`);
  let sentence = `${parts.join('; ')}.`;
  if (figures.naive.medianAbsErrorDays !== null && figures.naive.n > 0) {
    const naive = Math.round(figures.naive.medianAbsErrorDays);
    sentence += ` Simply expecting last year's date would have been off by ${naive} ${naive === 1 ? 'day' : 'days'}.`;
  }
  return `${sentence} (${figures.n} ${figures.n === 1 ? 'bloom' : 'blooms'} checked.)`;
}

/** The forecast-trust line shown wherever bloom forecasts are shown. */
export function ForecastTrust({ collectionId }: { collectionId: string }) {
  const backtest = useBacktestQuery(collectionId);
  const text = backtest.data
    ? trustSentence(backtest.data)
    : backtest.isError
      ? 'How far past forecasts were off could not be loaded.'
      : 'Checking how far past forecasts were off…';
  return (
    <View style={styles.box} testID="forecast-trust">
      <Text variant="label" color="textMuted">
        How far to trust these dates
      </Text>
      <Text accessibilityLiveRegion="polite">{text}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: spacing.xxs, padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.surfaceMuted },
});
