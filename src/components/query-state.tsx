import type { ReactNode } from 'react';
import { ActivityIndicator, StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { colors, radius, spacing } from '@/theme';
import { Button } from './button';
import { Text } from './text';

export interface QueryStateProps<T> {
  query: { data: T | undefined; isPending: boolean; isError: boolean; error: unknown; refetch: () => unknown };
  /** Whether loaded data counts as empty; the empty state is shown instead of children. */
  isEmpty?: (data: T) => boolean;
  empty?: { title: string; body?: string; action?: ReactNode };
  loadingLabel?: string;
  children: (data: T) => ReactNode;
}

/** Loading, error-with-retry and empty states, drawn the same way on every screen. */
export function QueryState<T>({ query, isEmpty, empty, loadingLabel = 'Loading…', children }: QueryStateProps<T>) {
  if (query.isPending) {
    return (
      <View style={styles.center} accessibilityRole="progressbar" accessibilityLabel={loadingLabel} testID="query-loading">
        <ActivityIndicator color={colors.accent} size="large" accessibilityLabel={loadingLabel} />
        <Text color="textMuted">{loadingLabel}</Text>
      </View>
    );
  }
  if (query.isError || query.data === undefined) {
    const message = query.error instanceof ApiError ? query.error.message : 'The server could not be reached.';
    return (
      <View style={[styles.panel, styles.errorPanel]} role="alert" testID="query-error">
        <Text variant="heading" color="danger">
          Could not load this
        </Text>
        <Text color="text">{message}</Text>
        <Button label="Try again" tone="secondary" onPress={() => query.refetch()} />
      </View>
    );
  }
  if (empty && isEmpty?.(query.data)) return <EmptyState {...empty} />;
  return <>{children(query.data)}</>;
}

export function EmptyState({ title, body, action }: { title: string; body?: string; action?: ReactNode }) {
  return (
    <View style={styles.panel} testID="empty-state">
      <Text variant="heading">{title}</Text>
      {body ? <Text color="textMuted">{body}</Text> : null}
      {action}
    </View>
  );
}

const styles = StyleSheet.create({
  center: { alignItems: 'center', justifyContent: 'center', padding: spacing.xxl, gap: spacing.md },
  panel: {
    padding: spacing.xl,
    gap: spacing.md,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.borderSubtle,
    backgroundColor: colors.surface,
  },
  errorPanel: { borderColor: colors.danger, backgroundColor: colors.dangerSoft },
});
