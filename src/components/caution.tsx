import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { colors, radius, spacing } from '@/theme';
import { Text } from './text';

/** A safety note shown before work that can hurt someone or spread disease. */
export function Caution({ title, children, testID }: { title: string; children: ReactNode; testID?: string }) {
  return (
    <View style={styles.box} role="note" aria-label={title} testID={testID}>
      <Text variant="bodyStrong">{title}</Text>
      {children}
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: spacing.xs, padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.warningSoft },
});
