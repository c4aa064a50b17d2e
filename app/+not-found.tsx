import { Link, Stack } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/text';
import { colors, spacing } from '@/theme';

export default function NotFound() {
  return (
    <View style={styles.root}>
      <Stack.Screen options={{ title: 'Not found' }} />
      <Text variant="title">This page does not exist</Text>
      <Link href="/" style={styles.link}>
        <Text color="accent" variant="bodyStrong">
          Go to Today
        </Text>
      </Link>
    </View>
  );
}

const styles = StyleSheet.create({
  root: { flex: 1, alignItems: 'center', justifyContent: 'center', gap: spacing.lg, backgroundColor: colors.background, padding: spacing.xl },
  link: { padding: spacing.md },
});
