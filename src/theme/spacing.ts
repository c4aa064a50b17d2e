/** Spacing scale in density-independent pixels. */
export const spacing = {
  xxs: 2,
  xs: 4,
  sm: 8,
  md: 12,
  lg: 16,
  xl: 24,
  xxl: 32,
  xxxl: 48,
} as const;

export const radius = { sm: 6, md: 10, lg: 16, pill: 999 } as const;

/** Minimum touch target: 44 px (WCAG 2.5.5 / Apple HIG); we use 48 for gloved hands. */
export const TOUCH_TARGET = 48;

/** From this window width the tabs become a side rail and screens may use two columns. */
export const WIDE_BREAKPOINT = 900;
