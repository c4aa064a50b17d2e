import type { ReactNode } from 'react';
import { KeyboardAvoidingView, ScrollView, StyleSheet, View } from 'react-native';
import { Text } from '@/components/text';
import { useIsWide } from '@/lib/use-is-wide';
import { colors, radius, spacing } from '@/theme';

/** The sign-in and sign-up page: the product in one line beside (or above) the form. */
export function AuthFrame({ title, children }: { title: string; children: ReactNode }) {
  const wide = useIsWide();
  return (
    <KeyboardAvoidingView style={styles.root} behavior="padding">
      <ScrollView contentContainerStyle={[styles.scroll, wide && styles.scrollWide]}>
        <View style={[styles.intro, wide && styles.introWide]}>
          <Text variant="display" color="onNav">
            Sympodia
          </Text>
          <Text color="onNavMuted">
            Lead-by-lead records for sympodial orchids: see which new growths are ahead of last season, which have
            stalled, and when each plant should bloom.
          </Text>
        </View>
        <View style={[styles.card, wide && styles.cardWide]}>
          <Text variant="title" role="heading" aria-level={1}>
            {title}
          </Text>
          {children}
        </View>
      </ScrollView>
    </KeyboardAvoidingView>
  );
}

const styles = StyleSheet.create({
  root: { flex: 1, backgroundColor: colors.background },
  scroll: { flexGrow: 1 },
  scrollWide: { flexDirection: 'row', alignItems: 'stretch' },
  intro: { backgroundColor: colors.nav, padding: spacing.xl, paddingTop: spacing.xxl, gap: spacing.sm },
  introWide: { flex: 1, justifyContent: 'center', padding: spacing.xxxl, maxWidth: 520 },
  card: {
    margin: spacing.lg,
    padding: spacing.xl,
    gap: spacing.lg,
    backgroundColor: colors.surface,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.borderSubtle,
  },
  cardWide: { flex: 1, maxWidth: 480, alignSelf: 'center', marginHorizontal: 'auto' },
});
