import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/text';
import { colors, radius, spacing } from '@/theme';

/** A form-level message (wrong password, rate limit, server unreachable), announced politely. */
export function FormError({ message }: { message: string | undefined }) {
  if (!message) return null;
  return (
    <View style={styles.box} role="alert" testID="form-error">
      <Text color="danger">{message}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  box: { padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.dangerSoft, borderWidth: 1, borderColor: colors.danger },
});
