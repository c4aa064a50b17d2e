import { ActivityIndicator, StyleSheet, View } from 'react-native';
import { Text } from '@/components/text';
import { colors, spacing } from '@/theme';

/** A whole-window state for the moments before any screen can draw (fonts, session). */
export function FullScreenMessage({ message, loading = false }: { message: string; loading?: boolean }) {
  return (
    <View style={styles.root} accessibilityRole={loading ? 'progressbar' : undefined} accessibilityLabel={message}>
      {loading ? <ActivityIndicator size="large" color={colors.accent} accessibilityLabel={message} /> : null}
      <Text color="textMuted">{message}</Text>
    </View>
  );
}

const styles = StyleSheet.create({
  root: { flex: 1, alignItems: 'center', justifyContent: 'center', gap: spacing.md, backgroundColor: colors.background },
});
