// Test builders for invented leads and measurements (generated scenarios only).
import { addDays } from '@/domain/dates';
import { logisticHeight } from '@/domain/growth-curve';
import type { Lead, Measurement, Plant } from '@/domain/types';

export function buildPlant(overrides: Partial<Plant> = {}): Plant {
  return {
    id: 'plant-1',
    genus: 'C.',
    parentPlantId: null,
    dividedOn: null,
    medium: 'bark',
    areaId: 'area-1',
    minNightTempC: null,
    ...overrides,
  };
}

export function buildLead(overrides: Partial<Lead> = {}): Lead {
  const season = overrides.season ?? 2026;
  return {
    id: `lead-${season}`,
    plantId: 'plant-1',
    season,
    label: `${season}-A`,
    firstSeen: `${season}-03-01`,
    status: 'growing',
    parentLeadId: null,
    ...overrides,
  };
}

export function buildMeasurement(lead: Lead, age: number, heightMm: number, overrides: Partial<Measurement> = {}): Measurement {
  return {
    id: `${lead.id}-m${age}`,
    leadId: lead.id,
    date: addDays(lead.firstSeen, age),
    heightMm,
    leafCount: null,
    sheath: 'none',
    rootTips: null,
    bulbWidthMm: null,
    ...overrides,
  };
}

/** Measurements every `every` days from age 0 to `untilAge` along a logistic curve. */
export function measureAlongCurve(
  lead: Lead,
  curve: { a: number; m: number; s: number },
  untilAge: number,
  every = 7,
): Measurement[] {
  const out: Measurement[] = [];
  for (let age = 0; age <= untilAge; age += every) {
    out.push(buildMeasurement(lead, age, Math.round(logisticHeight(age, curve.a, curve.m, curve.s) * 10) / 10));
  }
  return out;
}
