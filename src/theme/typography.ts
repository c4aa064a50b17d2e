import type { TextStyle } from 'react-native';

/** Source Sans 3 weights shipped in the bundle (loaded in app/_layout.tsx). */
export const fonts = {
  regular: 'SourceSans3_400Regular',
  semibold: 'SourceSans3_600SemiBold',
  bold: 'SourceSans3_700Bold',
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
