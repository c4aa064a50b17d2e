import { genusDefaultsFor } from '@/domain/genus-defaults';

/** The hint under a plant's lowest-night-temperature field, naming the genus default it falls back to. */
export function nightLimitHint(genus: string): string {
  const name = genus.trim();
  return `Bring in below this. Blank uses the ${name || 'genus'} default of ${genusDefaultsFor(name).minNightTempC} °C.`;
}
