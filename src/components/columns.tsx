import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { useIsWide } from '@/lib/use-is-wide';
import { spacing } from '@/theme';

/**
 * Stacked on a phone, side by side from 900 px. Columns take equal shares only when side
 * by side: stacked, `flex: 1` would squeeze them into the screen's height and overlap.
 */
export function Columns({ children }: { children: ReactNode }) {
  const wide = useIsWide();
  return <View style={StyleSheet.flatten([styles.columns, wide && styles.columnsWide])}>{children}</View>;
}

export function Column({ children }: { children: ReactNode }) {
  const wide = useIsWide();
  return <View style={StyleSheet.flatten([styles.column, wide && styles.columnWide])}>{children}</View>;
}

const styles = StyleSheet.create({
  columns: { gap: spacing.lg },
  columnsWide: { flexDirection: 'row', alignItems: 'flex-start' },
  column: { gap: spacing.lg, minWidth: 0 },
  columnWide: { flex: 1 },
});
