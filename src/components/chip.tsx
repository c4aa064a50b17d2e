import { Pressable, StyleSheet } from 'react-native';
import { useInBrowser } from '@/lib/use-in-browser';
import { colors, radius, spacing } from '@/theme';
import { Text } from './text';

/** A toggle for filters and quick choices; read as a pressed/unpressed button. */
export function Chip({ label, selected, onPress, testID }: { label: string; selected: boolean; onPress: () => void; testID?: string }) {
  // Not ready until the page's scripts have taken it over (a press before would do nothing).
  const ready = useInBrowser();
  return (
    <Pressable
      role="button"
      aria-pressed={selected}
      disabled={!ready}
      aria-disabled={!ready || undefined}
      onPress={onPress}
      testID={testID}
      style={StyleSheet.flatten([styles.chip, selected && styles.selected])}
    >
      <Text variant="label" color={selected ? 'onAccent' : 'text'}>
        {label}
      </Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  chip: {
    minHeight: 40,
    paddingHorizontal: spacing.md,
    justifyContent: 'center',
    borderRadius: radius.pill,
    borderWidth: 1.5,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  selected: { backgroundColor: colors.accent, borderColor: colors.accent },
});
