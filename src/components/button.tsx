import { ActivityIndicator, Pressable, StyleSheet, View, type PressableProps } from 'react-native';
import { useInBrowser } from '@/lib/use-in-browser';
import { colors, radius, spacing, TOUCH_TARGET } from '@/theme';
import { Text } from './text';

type Tone = 'primary' | 'secondary' | 'danger' | 'quiet';

export interface ButtonProps extends Omit<PressableProps, 'children'> {
  label: string;
  tone?: Tone;
  loading?: boolean;
}

const TONES: Record<Tone, { background: string; pressed: string; text: 'onAccent' | 'accent' | 'danger' | 'text'; border: string }> = {
  primary: { background: colors.accent, pressed: colors.accentPressed, text: 'onAccent', border: colors.accent },
  secondary: { background: colors.surface, pressed: colors.accentSoft, text: 'accent', border: colors.accent },
  danger: { background: colors.surface, pressed: colors.dangerSoft, text: 'danger', border: colors.danger },
  quiet: { background: 'transparent', pressed: colors.surfaceMuted, text: 'accent', border: 'transparent' },
};

export function Button({ label, tone = 'primary', loading = false, disabled, style, ...rest }: ButtonProps) {
  const look = TONES[tone];
  const inactive = disabled || loading;
  // A press before the page's scripts have taken it over would do nothing: until then the
  // button says it is not ready (and keeps its look, to avoid a flash).
  const ready = useInBrowser();
  return (
    <Pressable
      accessibilityRole="button"
      accessibilityLabel={label}
      {...rest}
      accessibilityState={{ disabled: !!inactive || !ready, busy: loading }}
      disabled={inactive || !ready}
      style={(state) => [
        styles.base,
        { backgroundColor: state.pressed ? look.pressed : look.background, borderColor: look.border },
        inactive && styles.inactive,
        typeof style === 'function' ? style(state) : style,
      ]}
    >
      <View style={styles.row}>
        {loading ? <ActivityIndicator size="small" color={colors[look.text]} accessibilityLabel={`${label}: working`} /> : null}
        <Text variant="label" color={look.text} style={styles.label}>
          {label}
        </Text>
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  base: {
    minHeight: TOUCH_TARGET,
    paddingHorizontal: spacing.lg,
    borderRadius: radius.md,
    borderWidth: 1.5,
    justifyContent: 'center',
    alignItems: 'center',
  },
  row: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm },
  label: { fontSize: 17 },
  inactive: { opacity: 0.55 },
});
