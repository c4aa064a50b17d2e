import { Text as NativeText, type TextProps as NativeTextProps } from 'react-native';
import { colors, typeScale, type ColorName, type TypeVariant } from '@/theme';

export interface TextProps extends NativeTextProps {
  variant?: TypeVariant;
  color?: ColorName;
}

/** The only text component screens use: it carries Source Sans 3 and the type scale. */
export function Text({ variant = 'body', color = 'text', style, ...rest }: TextProps) {
  const role = variant === 'display' || variant === 'title' || variant === 'heading' ? 'header' : undefined;
  return <NativeText accessibilityRole={role} {...rest} style={[typeScale[variant], { color: colors[color] }, style]} />;
}
