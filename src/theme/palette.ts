/**
 * Sympodia's raw colours: moss and bark greens on a warm paper ground, chosen to stay
 * legible in full sun on a phone. Components use the semantic names in colors.ts.
 */
export const palette = {
  paper: '#F7F4EC',
  white: '#FFFFFF',
  bark900: '#16241C',
  bark700: '#3E4C43',
  bark500: '#5E6B62',
  stone300: '#C6CCC2',
  stone200: '#E2E5DC',
  stone100: '#EEF0E9',
  moss800: '#1E3B2F',
  moss700: '#245C45',
  moss600: '#2D6E53',
  moss100: '#DDEBE2',
  brick700: '#9B2C1F',
  brick100: '#F6E1DC',
  amber700: '#7A5200',
  amber100: '#F5EACB',
  leaf700: '#2F6A1E',
  leaf100: '#E0EED6',
} as const;
