import { palette } from './palette';

/** Semantic colours; every text/background pair here has a contrast of at least 4.5:1. */
export const colors = {
  background: palette.paper,
  surface: palette.white,
  surfaceMuted: palette.stone100,
  text: palette.bark900,
  textMuted: palette.bark700,
  textSubtle: palette.bark500,
  border: palette.stone300,
  borderSubtle: palette.stone200,
  accent: palette.moss700,
  accentPressed: palette.moss800,
  accentSoft: palette.moss100,
  onAccent: palette.white,
  nav: palette.moss800,
  onNav: palette.white,
  onNavMuted: palette.moss100,
  navActive: palette.moss600,
  danger: palette.brick700,
  dangerSoft: palette.brick100,
  warning: palette.amber700,
  warningSoft: palette.amber100,
  success: palette.leaf700,
  successSoft: palette.leaf100,
  focus: palette.moss600,
} as const;

export type ColorName = keyof typeof colors;
