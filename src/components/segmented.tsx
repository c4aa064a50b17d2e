import { Pressable, StyleSheet, View } from 'react-native';
import { useInBrowser } from '@/lib/use-in-browser';
import { colors, radius, spacing, TOUCH_TARGET } from '@/theme';
import { Text } from './text';

export interface SegmentedProps<T extends string> {
  label: string;
  value: T;
  options: ReadonlyArray<{ value: T; label: string }>;
  onChange: (value: T) => void;
  disabled?: boolean;
  testID?: string;
}

/** A small set of exclusive choices shown side by side, read by screen readers as radios. */
export function Segmented<T extends string>({ label, value, options, onChange, disabled, testID }: SegmentedProps<T>) {
  // Not ready until the page's scripts have taken it over (a press before would do nothing).
  const ready = useInBrowser();
  return (
    <View role="radiogroup" aria-label={label} style={styles.row} testID={testID}>
      {options.map((option) => {
        const selected = option.value === value;
        return (
          <Pressable
            key={option.value}
            role="radio"
            aria-checked={selected}
            aria-disabled={disabled || !ready}
            disabled={disabled || !ready}
            onPress={() => onChange(option.value)}
            testID={testID ? `${testID}-${option.value}` : undefined}
            style={[styles.option, selected && styles.selected, disabled && styles.disabled]}
          >
            <Text variant="label" color={selected ? 'onAccent' : 'text'}>
              {option.label}
            </Text>
          </Pressable>
        );
      })}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  option: {
    minHeight: TOUCH_TARGET - 8,
    minWidth: 64,
    paddingHorizontal: spacing.md,
    borderRadius: radius.pill,
    borderWidth: 1.5,
    borderColor: colors.border,
    backgroundColor: colors.surface,
    alignItems: 'center',
    justifyContent: 'center',
  },
  selected: { backgroundColor: colors.accent, borderColor: colors.accent },
  disabled: { opacity: 0.6 },
});
