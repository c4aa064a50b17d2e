import { describe, expect, it } from 'vitest';
import { colors } from '@/theme/colors';

/** Relative luminance and contrast ratio as defined in WCAG 2.1 (§1.4.3, "relative luminance"). */
function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255);
  const linear = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
  return 0.2126 * linear(r) + 0.7152 * linear(g) + 0.0722 * linear(b);
}

function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

describe('contrast formula', () => {
  // WCAG's own bounds: black on white is 21:1, a colour on itself 1:1.
  it.each([
    ['#000000', '#FFFFFF', 21],
    ['#777777', '#777777', 1],
  ])('%s on %s is %d:1', (a, b, expected) => {
    expect(contrast(a, b)).toBeCloseTo(expected, 5);
  });
});

describe('palette pairs used for text', () => {
  const pairs: Array<[keyof typeof colors, keyof typeof colors]> = [
    ['text', 'background'],
    ['text', 'surface'],
    ['textMuted', 'background'],
    ['textMuted', 'surface'],
    ['textSubtle', 'surface'],
    ['accent', 'surface'],
    ['accent', 'background'],
    ['onAccent', 'accent'],
    ['onAccent', 'accentPressed'],
    ['onNav', 'nav'],
    ['onNavMuted', 'nav'],
    ['onNav', 'navActive'],
    ['danger', 'surface'],
    ['danger', 'dangerSoft'],
    ['warning', 'warningSoft'],
    ['success', 'surface'],
    ['success', 'successSoft'],
    ['text', 'accentSoft'],
  ];
  it.each(pairs)('%s on %s reaches 4.5:1 (WCAG AA for body text)', (fg, bg) => {
    expect(contrast(colors[fg], colors[bg])).toBeGreaterThanOrEqual(4.5);
  });
});
