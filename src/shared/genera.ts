/**
 * Genus abbreviations for the sympodial genera Sympodia is built around, as written on
 * tags. From the orchid registrar's published abbreviation list (from memory; the list is
 * long and changes as genera are revised, so any other abbreviation is accepted too).
 */
export const COMMON_GENERA: ReadonlyArray<{ abbreviation: string; name: string }> = [
  { abbreviation: 'C.', name: 'Cattleya' },
  { abbreviation: 'Ctt.', name: 'Cattlianthe' },
  { abbreviation: 'Gur.', name: 'Guarianthe' },
  { abbreviation: 'Lc.', name: 'Laeliocattleya' },
  { abbreviation: 'Rlc.', name: 'Rhyncholaeliocattleya' },
  { abbreviation: 'Bc.', name: 'Brassocattleya' },
  { abbreviation: 'B.', name: 'Brassavola' },
  { abbreviation: 'L.', name: 'Laelia' },
  { abbreviation: 'Enc.', name: 'Encyclia' },
  { abbreviation: 'Epi.', name: 'Epidendrum' },
  { abbreviation: 'Den.', name: 'Dendrobium' },
  { abbreviation: 'Stan.', name: 'Stanhopea' },
  { abbreviation: 'Onc.', name: 'Oncidium' },
  { abbreviation: 'Bulb.', name: 'Bulbophyllum' },
];

/** Potting media growers commonly use; free text is accepted as well. */
export const COMMON_MEDIA = ['bark', 'sphagnum', 'LECA', 'lava rock', 'mount', 'bark and perlite', 'coconut husk chips', 'basket'] as const;
