import { StyleSheet, View } from 'react-native';
import { colors, radius, spacing } from '@/theme';
import { Button } from './button';
import { Text } from './text';

/** An inline "are you sure" for destructive actions; nothing happens until confirmed. */
export function Confirm({ message, confirmLabel, onConfirm, onCancel, busy }: { message: string; confirmLabel: string; onConfirm: () => void; onCancel: () => void; busy?: boolean }) {
  return (
    <View style={styles.box} role="alertdialog" aria-label={message} testID="confirm">
      <Text>{message}</Text>
      <View style={styles.actions}>
        <Button label={confirmLabel} tone="danger" onPress={onConfirm} loading={busy} testID="confirm-yes" />
        <Button label="Cancel" tone="quiet" onPress={onCancel} testID="confirm-no" />
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { gap: spacing.sm, padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.dangerSoft, borderWidth: 1, borderColor: colors.danger },
  actions: { flexDirection: 'row', gap: spacing.sm, flexWrap: 'wrap' },
});
