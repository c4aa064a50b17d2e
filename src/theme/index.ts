export { colors, type ColorName } from './colors';
export { radius, spacing, TOUCH_TARGET, WIDE_BREAKPOINT } from './spacing';
export { fontFaces, fonts, typeScale, type TypeVariant } from './typography';
