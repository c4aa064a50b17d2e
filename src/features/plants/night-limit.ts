import { FALLBACK_DEFAULTS, genusDefaultsFor } from '@/domain/genus-defaults';

/**
 * The hint under a plant's lowest-night-temperature field: what a blank field falls back to.
 * It names the genus default only for a genus that has one; otherwise it says the general
 * fallback is used, and for which reason (no genus yet, or none of its own).
 */
export function nightLimitHint(genus: string): string {
  const name = genus.trim();
  const defaults = genusDefaultsFor(name);
  if (!name) return `Bring in below this. Left blank, the genus default is used once the genus is filled in.`;
  if (defaults === FALLBACK_DEFAULTS) return `Bring in below this. ${name} has no default of its own, so blank uses ${FALLBACK_DEFAULTS.minNightTempC} °C.`;
  return `Bring in below this. Blank uses the ${name} default of ${defaults.minNightTempC} °C.`;
}
