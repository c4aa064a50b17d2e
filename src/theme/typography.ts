import type { TextStyle } from 'react-native';

/** Font family names registered by app/_layout.tsx for the shipped Source Sans 3 files. */
export const fontFaces = {
  regular: 'SourceSans3_400Regular',
  semibold: 'SourceSans3_600SemiBold',
  bold: 'SourceSans3_700Bold',
} as const;

/**
 * The screens draw before the font files arrive (they swap in when loaded), so each family
 * names a system sans-serif to use meanwhile instead of the browser's default serif.
 */
const FALLBACK = 'system-ui, -apple-system, "Segoe UI", Roboto, Helvetica, Arial, sans-serif';

/** Source Sans 3 weights, as CSS font-family lists with the fallback. */
export const fonts = {
  regular: `${fontFaces.regular}, ${FALLBACK}`,
  semibold: `${fontFaces.semibold}, ${FALLBACK}`,
  bold: `${fontFaces.bold}, ${FALLBACK}`,
} as const;

/** Type scale: sizes suit reading at arm's length outdoors (body 17 px). */
export const typeScale = {
  display: { fontFamily: fonts.bold, fontSize: 30, lineHeight: 36 },
  title: { fontFamily: fonts.bold, fontSize: 24, lineHeight: 30 },
  heading: { fontFamily: fonts.semibold, fontSize: 19, lineHeight: 25 },
  body: { fontFamily: fonts.regular, fontSize: 17, lineHeight: 24 },
  bodyStrong: { fontFamily: fonts.semibold, fontSize: 17, lineHeight: 24 },
  label: { fontFamily: fonts.semibold, fontSize: 15, lineHeight: 20 },
  caption: { fontFamily: fonts.regular, fontSize: 14, lineHeight: 19 },
} satisfies Record<string, TextStyle>;

export type TypeVariant = keyof typeof typeScale;
