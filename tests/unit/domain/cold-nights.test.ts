import { describe, expect, it } from 'vitest';
import { plantsToBringIn } from '@/domain/cold-nights';
import { CATTLEYA_DEFAULTS, LAELIA_DEFAULTS } from '@/domain/genus-defaults';
import { buildPlant } from './builders';

describe('plantsToBringIn', () => {
  const plants = [
    buildPlant({ id: 'catt', genus: 'C.' }),
    buildPlant({ id: 'laelia', genus: 'L.' }),
    buildPlant({ id: 'tender', genus: 'L.', minNightTempC: 15 }),
    buildPlant({ id: 'inside', genus: 'C.', areaId: 'kitchen' }),
  ];

  it('lists plants whose limit is above the forecast low, coldest margin first', () => {
    const out = plantsToBringIn(plants, 8, { indoorAreaIds: new Set(['kitchen']) });
    expect(out.map((i) => i.plantId)).toEqual(['tender', 'catt']);
    expect(out[0]).toMatchObject({ limitC: 15, limitSource: 'plant', marginC: 7 });
    expect(out[1]).toMatchObject({ limitC: CATTLEYA_DEFAULTS.minNightTempC, limitSource: 'genus' });
    // 13 °C: the low end of the AOS culture sheet's 13–16 °C Cattleya nights (REFERENCES.md).
    expect(out[1].reason).toBe('forecast low 8.0 °C is 5.0 °C under the C. limit of 13.0 °C');
  });

  it.each([
    ['a warm night', 20, 0],
    ['exactly at the Laelia limit', LAELIA_DEFAULTS.minNightTempC, 3],
    ['no forecast', Number.NaN, 0],
  ])('%s', (_n, low, count) => {
    expect(plantsToBringIn(plants, low)).toHaveLength(count);
  });
});
