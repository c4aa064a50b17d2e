import { TabList, TabSlot, Tabs, TabTrigger, type TabTriggerSlotProps } from 'expo-router/ui';
import { forwardRef } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { useSafeAreaInsets } from 'react-native-safe-area-context';
import { Text } from '@/components/text';
import { useIsWide } from '@/lib/use-is-wide';
import { colors, radius, spacing, TOUCH_TARGET } from '@/theme';
import { useCurrentCollection } from '../collections/current-collection';

const RAIL_WIDTH = 232;
/** Room at the top of the rail for the product's name and the open collection. */
const BRAND_HEIGHT = 112;

const TABS = [
  { name: 'today', href: '/', label: 'Today' },
  { name: 'plants', href: '/plants', label: 'Plants' },
  { name: 'rounds', href: '/rounds', label: 'Rounds' },
  { name: 'calendar', href: '/calendar', label: 'Calendar' },
  { name: 'collection', href: '/collection', label: 'Collection' },
] as const;

/** Bottom tab bar on a phone; a side rail with the collection's name from 900 px. */
export function AppTabs() {
  const wide = useIsWide();
  const insets = useSafeAreaInsets();
  const { collection } = useCurrentCollection();
  return (
    <View style={styles.frame}>
      <Tabs style={StyleSheet.flatten([styles.root, wide && styles.rootWide])}>
        <View style={styles.slot}>
          <TabSlot style={styles.slot} />
        </View>
        <TabList
          accessibilityRole="tablist"
          aria-label="Sections"
          style={StyleSheet.flatten([wide ? styles.rail : styles.bar, !wide && { paddingBottom: Math.max(insets.bottom, spacing.xs) }])}
        >
          {TABS.map((tab) => (
            <TabTrigger key={tab.name} name={tab.name} href={tab.href} asChild>
              <TabButton label={tab.label} wide={wide} testID={`tab-${tab.name}`} />
            </TabTrigger>
          ))}
        </TabList>
      </Tabs>
      {wide ? (
        // Drawn over the top of the rail: the tab list itself may hold only tabs.
        <View style={styles.brand} pointerEvents="none">
          <Text variant="title" color="onNav">
            Sympodia
          </Text>
          {collection ? (
            <Text variant="caption" color="onNavMuted" numberOfLines={2}>
              {collection.name}
            </Text>
          ) : null}
        </View>
      ) : null}
    </View>
  );
}

const TabButton = forwardRef<View, TabTriggerSlotProps & { label: string; wide: boolean }>(function TabButton(
  { label, wide, isFocused, ...props },
  ref,
) {
  return (
    <Pressable
      ref={ref}
      {...props}
      accessibilityRole="tab"
      accessibilityState={{ selected: !!isFocused }}
      aria-current={isFocused ? 'page' : undefined}
      style={StyleSheet.flatten([wide ? styles.railItem : styles.barItem, isFocused && (wide ? styles.railItemActive : styles.barItemActive)])}
    >
      <Text variant="label" color={isFocused ? 'onNav' : 'onNavMuted'} style={wide ? styles.railLabel : styles.barLabel}>
        {label}
      </Text>
      {!wide ? <View style={[styles.marker, isFocused && styles.markerActive]} /> : null}
    </Pressable>
  );
});

const styles = StyleSheet.create({
  root: { flex: 1, flexDirection: 'column', backgroundColor: colors.background },
  rootWide: { flexDirection: 'row-reverse' },
  // minHeight 0 lets the slot shrink to the window, so a tall screen scrolls inside itself
  // instead of stretching the page (and taking the tab bar with it).
  slot: { flex: 1, minHeight: 0 },
  bar: {
    flexDirection: 'row',
    backgroundColor: colors.nav,
    paddingTop: spacing.xs,
    paddingHorizontal: spacing.xs,
  },
  barItem: {
    flex: 1,
    flexDirection: 'column',
    minHeight: TOUCH_TARGET + 8,
    alignItems: 'center',
    justifyContent: 'center',
    gap: spacing.xs,
    borderRadius: radius.sm,
  },
  barItemActive: { backgroundColor: colors.navActive },
  barLabel: { fontSize: 14 },
  marker: { width: 20, height: 3, borderRadius: 2, backgroundColor: 'transparent' },
  markerActive: { backgroundColor: colors.onNav },
  rail: {
    flexDirection: 'column',
    justifyContent: 'flex-start',
    width: RAIL_WIDTH,
    backgroundColor: colors.nav,
    paddingTop: BRAND_HEIGHT,
    paddingBottom: spacing.xl,
    paddingHorizontal: spacing.md,
    gap: spacing.xs,
  },
  frame: { flex: 1 },
  brand: { position: 'absolute', top: 0, left: 0, width: RAIL_WIDTH, height: BRAND_HEIGHT, paddingTop: spacing.xl, paddingHorizontal: spacing.xl, gap: spacing.xs },
  railItem: {
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'flex-start',
    minHeight: TOUCH_TARGET,
    paddingHorizontal: spacing.md,
    borderRadius: radius.md,
  },
  railItemActive: { backgroundColor: colors.navActive },
  railLabel: { fontSize: 17 },
});
