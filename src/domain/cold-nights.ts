/**
 * Cold nights: which plants should come in tonight, from the forecast minimum temperature and
 * each plant's minimum night temperature (the plant's own override, else its genus default).
 */
import { genusDefaultsFor, type GenusDefaults } from './genus-defaults';
import type { Plant } from './types';

export interface BringInItem {
  plantId: string;
  /** The plant's limit, °C. */
  limitC: number;
  limitSource: 'plant' | 'genus';
  /** How far below the limit the forecast goes, °C (> 0). */
  marginC: number;
  reason: string;
}

/**
 * Plants whose minimum night temperature is above `forecastMinC` (°C), coldest margin first.
 * Plants in `indoorAreaIds` are skipped. A non-finite forecast gives an empty list.
 */
export function plantsToBringIn(
  plants: readonly Pick<Plant, 'id' | 'genus' | 'areaId' | 'minNightTempC'>[],
  forecastMinC: number,
  options: { indoorAreaIds?: ReadonlySet<string>; genusDefaults?: (genus: string) => GenusDefaults } = {},
): BringInItem[] {
  if (!Number.isFinite(forecastMinC)) return [];
  const items: BringInItem[] = [];
  for (const p of plants) {
    if (p.areaId && options.indoorAreaIds?.has(p.areaId)) continue;
    const own = p.minNightTempC !== null && Number.isFinite(p.minNightTempC);
    const limitC = own ? (p.minNightTempC as number) : (options.genusDefaults ?? genusDefaultsFor)(p.genus).minNightTempC;
    if (!(forecastMinC < limitC)) continue;
    const marginC = limitC - forecastMinC;
    items.push({
      plantId: p.id,
      limitC,
      limitSource: own ? 'plant' : 'genus',
      marginC,
      reason: `forecast low ${forecastMinC.toFixed(1)} °C is ${marginC.toFixed(1)} °C under ${own ? "this plant's" : `the ${p.genus}`} limit of ${limitC.toFixed(1)} °C`,
    });
  }
  return items.sort((a, b) => b.marginC - a.marginC || a.plantId.localeCompare(b.plantId));
}
