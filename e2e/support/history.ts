import type { Page } from '@playwright/test';
import { expect } from '@playwright/test';
import { E2E_PORT } from './constants';
import { daysAgo } from './session';

const ORIGIN = { Origin: `http://127.0.0.1:${E2E_PORT}` };

/** One lead as the test writes it: days are counted back from today. */
export interface LeadPlan {
  label: string;
  firstSeenDaysAgo: number;
  status: 'growing' | 'mature';
  /** [age in days since first seen, height mm, sheath] */
  looks: Array<[number, number, ('none' | 'forming' | 'empty' | 'budded' | 'dry')?]>;
  bloom?: { budsSeenAge?: number; firstOpenAge?: number; lastFadedAge?: number; flowers?: number };
}

/** Today's growth year for the demo collection (its season starts in March). */
const seasonOf = (date: string) => (Number(date.slice(5, 7)) >= 3 ? Number(date.slice(0, 4)) : Number(date.slice(0, 4)) - 1);

/**
 * A plant with leads, looks and bloom records written through the API as a grower would, all
 * dated relative to today — so what the forecast says of it does not depend on the calendar.
 */
export async function plantWithHistory(page: Page, collectionId: string, plant: { tag: string; genus: string; epithet: string }, leads: LeadPlan[]) {
  const api = (path: string) => `/api/collections/${collectionId}${path}`;
  const created = await page.request.post(api('/plants'), { data: { ...plant, isSpecies: false }, headers: ORIGIN });
  expect(created.status(), await created.text()).toBe(201);
  const plantId = (await created.json()).id as string;
  const leadIds: Record<string, string> = {};
  for (const l of leads) {
    const firstSeen = daysAgo(l.firstSeenDaysAgo);
    const lead = await page.request.post(api(`/plants/${plantId}/leads`), { data: { season: seasonOf(firstSeen), label: l.label, firstSeen, status: l.status }, headers: ORIGIN });
    expect(lead.status(), await lead.text()).toBe(201);
    const leadId = (await lead.json()).id as string;
    leadIds[l.label] = leadId;
    for (const [age, heightMm, sheath] of l.looks) {
      const m = await page.request.post(api(`/leads/${leadId}/measurements`), { data: { date: daysAgo(l.firstSeenDaysAgo - age), heightMm, sheath: sheath ?? 'none' }, headers: ORIGIN });
      expect(m.status(), await m.text()).toBe(201);
    }
    if (l.bloom) {
      const at = (age?: number) => (age === undefined ? null : daysAgo(l.firstSeenDaysAgo - age));
      const b = await page.request.put(api(`/leads/${leadId}/bloom`), {
        data: { budsSeenOn: at(l.bloom.budsSeenAge), firstOpenOn: at(l.bloom.firstOpenAge), lastFadedOn: at(l.bloom.lastFadedAge), flowerCount: l.bloom.flowers ?? null, spikeCount: l.bloom.flowers ? 1 : null },
        headers: ORIGIN,
      });
      expect(b.status(), await b.text()).toBe(201);
    }
  }
  return { plantId, leadIds };
}

/** A season of a Cattleya-type lead: grown by day 150 to 160 mm, sheath at 150, buds at 170, open at 180. */
export function pastSeason(label: string, firstSeenDaysAgo: number): LeadPlan {
  return {
    label,
    firstSeenDaysAgo,
    status: 'mature',
    looks: [[0, 4], [30, 25], [60, 70], [90, 120], [120, 150], [150, 160, 'forming']],
    bloom: { budsSeenAge: 170, firstOpenAge: 180, lastFadedAge: 205, flowers: 4 },
  };
}
