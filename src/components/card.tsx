import type { ReactNode } from 'react';
import { StyleSheet, View, type ViewStyle } from 'react-native';
import { colors, radius, spacing } from '@/theme';
import { Text } from './text';

/** A titled panel grouping one part of a screen. */
export function Card({ title, children, style, testID }: { title?: string; children: ReactNode; style?: ViewStyle; testID?: string }) {
  return (
    <View style={[styles.card, style]} testID={testID}>
      {title ? (
        <Text variant="heading" role="heading" aria-level={2}>
          {title}
        </Text>
      ) : null}
      {children}
    </View>
  );
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: colors.surface,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.borderSubtle,
    padding: spacing.lg,
    gap: spacing.md,
  },
});
