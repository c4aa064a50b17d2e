import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { spacing } from '@/theme';
import { Button } from './button';

/** The row under a form: its save button(s), then a quiet way out. */
export function FormActions({ children, onCancel, cancelLabel = 'Cancel' }: { children: ReactNode; onCancel: () => void; cancelLabel?: string }) {
  return (
    <View style={styles.row}>
      {children}
      <Button label={cancelLabel} tone="quiet" onPress={onCancel} />
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
});
