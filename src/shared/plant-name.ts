/**
 * A plant's name as growers write it (ICNCP 2016 and the RHS guidance for orchid hybrids):
 * genus abbreviation, grex in roman type or species epithet in lower case, clonal name in
 * single quotes — e.g. `Rlc. Harbor Lantern 'Dune'`.
 */
export function plantDisplayName(plant: { genus: string; epithet: string; isSpecies: boolean; clonalName: string | null }): string {
  const epithet = plant.isSpecies ? plant.epithet.toLowerCase() : plant.epithet;
  const clonal = plant.clonalName ? ` '${plant.clonalName}'` : '';
  return `${plant.genus} ${epithet}${clonal}`;
}
