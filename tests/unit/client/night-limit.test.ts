import { describe, expect, it } from 'vitest';
import { CATTLEYA_DEFAULTS, FALLBACK_DEFAULTS } from '../../../src/domain/genus-defaults';
import { nightLimitHint } from '../../../src/features/plants/night-limit';

describe('nightLimitHint', () => {
  it('names no number before a genus is given', () => {
    const hint = nightLimitHint('  ');
    expect(hint).not.toMatch(/\d/);
    expect(hint).toContain('once the genus is filled in');
  });

  it('names the genus default for a genus that has one', () => {
    expect(nightLimitHint('C.')).toBe(`Bring in below this. Blank uses the C. default of ${CATTLEYA_DEFAULTS.minNightTempC} °C.`);
  });

  it('says a genus without defaults of its own falls back to the general limit', () => {
    expect(nightLimitHint('Zzx.')).toBe(`Bring in below this. Zzx. has no default of its own, so blank uses ${FALLBACK_DEFAULTS.minNightTempC} °C.`);
  });
});
