import type { ReactNode } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { colors, spacing } from '@/theme';
import { useIsWide } from '@/lib/use-is-wide';
import { Text } from './text';

export interface ScreenProps {
  title: string;
  subtitle?: string;
  children: ReactNode;
  testID?: string;
  /** From 900 px, use the window's whole width (a timeline) instead of a reading width. */
  fullWidth?: boolean;
}

/** A screen's scrolling body with its title; content is held to a readable width. */
export function Screen({ title, subtitle, children, testID, fullWidth = false }: ScreenProps) {
  const wide = useIsWide();
  return (
    <ScrollView style={styles.scroll} contentContainerStyle={[styles.content, wide && styles.contentWide, wide && fullWidth && styles.fullWidth]} testID={testID}>
      <View style={styles.header}>
        <Text variant={wide ? 'display' : 'title'} role="heading" aria-level={1}>
          {title}
        </Text>
        {subtitle ? <Text color="textMuted">{subtitle}</Text> : null}
      </View>
      {children}
    </ScrollView>
  );
}

const styles = StyleSheet.create({
  scroll: { flex: 1, backgroundColor: colors.background },
  content: { padding: spacing.lg, gap: spacing.lg, width: '100%', maxWidth: 1100, alignSelf: 'center' },
  contentWide: { padding: spacing.xxl, gap: spacing.xl },
  fullWidth: { maxWidth: '100%' },
  header: { gap: spacing.xs },
});
