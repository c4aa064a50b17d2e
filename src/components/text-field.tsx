import { forwardRef, useId, useState } from 'react';
import { StyleSheet, TextInput, View, type TextInputProps } from 'react-native';
import { useInBrowser } from '@/lib/use-in-browser';
import { colors, fonts, radius, spacing, TOUCH_TARGET } from '@/theme';
import { Text } from './text';

export interface TextFieldProps extends TextInputProps {
  label: string;
  error?: string;
  hint?: string;
}

/** A labelled input whose error is announced and tied to the field for screen readers. */
export const TextField = forwardRef<TextInput, TextFieldProps>(function TextField(
  { label, error, hint, style, onFocus, onBlur, editable, ...rest },
  ref,
) {
  // Typing into the server's page before its scripts take it over would be lost: read-only until then.
  const ready = useInBrowser();
  const id = useId();
  const [focused, setFocused] = useState(false);
  const describedBy = error ? `${id}-error` : hint ? `${id}-hint` : undefined;
  return (
    <View style={styles.wrap}>
      <Text variant="label" aria-hidden>
        {label}
      </Text>
      <TextInput
        ref={ref}
        aria-label={label}
        aria-describedby={describedBy}
        aria-invalid={error ? true : undefined}
        placeholderTextColor={colors.textSubtle}
        onFocus={(event) => {
          setFocused(true);
          onFocus?.(event);
        }}
        onBlur={(event) => {
          setFocused(false);
          onBlur?.(event);
        }}
        style={[styles.input, focused && styles.focused, error ? styles.invalid : null, style]}
        editable={editable !== false && ready}
        {...rest}
      />
      {error ? (
        <Text variant="caption" color="danger" id={`${id}-error`} accessibilityLiveRegion="polite" role="alert">
          {error}
        </Text>
      ) : hint ? (
        <Text variant="caption" color="textMuted" id={`${id}-hint`}>
          {hint}
        </Text>
      ) : null}
    </View>
  );
});

const styles = StyleSheet.create({
  wrap: { gap: spacing.xs },
  input: {
    minHeight: TOUCH_TARGET,
    borderWidth: 1.5,
    borderColor: colors.border,
    borderRadius: radius.md,
    paddingHorizontal: spacing.md,
    backgroundColor: colors.surface,
    color: colors.text,
    fontFamily: fonts.regular,
    fontSize: 17,
  },
  focused: { borderColor: colors.focus },
  invalid: { borderColor: colors.danger },
});
