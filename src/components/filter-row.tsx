import type { ReactNode } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { spacing } from '@/theme';
import { Text } from './text';

/** A labelled row of filter chips that scrolls sideways on a narrow screen. */
export function FilterRow({ label, children }: { label: string; children: ReactNode }) {
  return (
    <View style={styles.row} role="group" aria-label={`Filter by ${label.toLowerCase()}`}>
      <Text variant="label" color="textMuted">
        {label}
      </Text>
      <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={styles.chips}>
        {children}
      </ScrollView>
    </View>
  );
}

const styles = StyleSheet.create({
  row: { gap: spacing.xs },
  chips: { gap: spacing.xs, paddingRight: spacing.lg },
});
