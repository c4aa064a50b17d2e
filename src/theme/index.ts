export { colors, type ColorName } from './colors';
export { radius, spacing, TOUCH_TARGET, WIDE_BREAKPOINT } from './spacing';
export { fonts, typeScale, type TypeVariant } from './typography';
