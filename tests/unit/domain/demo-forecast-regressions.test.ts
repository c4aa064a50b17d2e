// Regressions from the demo collection as a new grower saw it on 3 December 2026 (the issue's
// date): the generated demo (db/seed/generate.ts, invented plants) at that date, read through the
// same engine the server uses. Each case names what was wrong.
import { describe, expect, it } from 'vitest';
import { entryLooksWrong, forecastLead, Z80_HALF } from '@/domain';
import { DEMO_SCENARIO, DEMO_SEED, generateCollection } from '../../../db/seed/generate';
import { currentForecasts } from '../../../server/routes/engine';
import { buildEngineData } from '../../../server/services/engine-data';

const TODAY = '2026-12-03';
const g = generateCollection({ seed: DEMO_SEED, today: TODAY, plants: 40, seasons: 4 });
const data = buildEngineData({ plants: g.plants, leads: g.leads, measurements: g.measurements, blooms: g.bloomRecords }, { seasonStartMonth: 3, units: 'mm' });
const forecasts = currentForecasts(data, TODAY);
const ofTag = (tag: string) => forecasts.filter((x) => x.p.tag === tag);

describe('the demo on 3 December 2026', () => {
  it('dresses no past date as a forecast, and no window collapses onto today', () => {
    for (const { p, h, f, story } of forecasts) {
      const w = f.bloom.firstOpen;
      if (!w || f.bloom.timing === 'record') continue;
      expect(w.p10 >= TODAY, `${p.tag} ${h.lead.label}`).toBe(true);
      expect(w.p10 < w.p90, `${p.tag} ${h.lead.label}: 10th = 90th percentile`).toBe(true);
      expect(story.bloom, `${p.tag} ${h.lead.label}`).not.toMatch(/Likely first flower/);
    }
  });

  it('a budded lead long past its date is late or not this season, its chance below the buds-open chance', () => {
    const late = forecasts.filter((x) => x.f.bloom.late !== null);
    expect(late.length).toBeGreaterThan(0);
    for (const { f, story } of late) {
      expect(f.bloom.chance).toBeLessThan(0.95);
      expect(story.bloom).toMatch(/^Late: its record made .* likely, \d+ days? ago/);
    }
  });

  it(`tells the stalled ${DEMO_SCENARIO.stalledLeadTag} lead one way, with its flag on the chip and no maturity date in the past`, () => {
    const [stalled] = ofTag(DEMO_SCENARIO.stalledLeadTag).filter((x) => x.f.flags.length > 0);
    expect(stalled).toBeDefined();
    expect(stalled.story.chip.label).toMatch(/Stalled|Aborted/);
    expect(stalled.story.growth).toBeNull();
    expect(stalled.story.flag).toMatch(/of last season's final size\.$/);
    expect(stalled.story.size).toMatch(/of last season's lead at the same age and \d+% of last season's final size/);
  });

  it('says a window of months as uncertain timing, never as a likely date range', () => {
    const wide = forecasts.filter((x) => x.story.figures.uncertain);
    expect(wide.length).toBeGreaterThan(0);
    for (const { f, story } of wide) {
      expect(story.bloom).toMatch(/sometime from [A-Z][a-z]+ (\d{4} )?to [A-Z][a-z]+ \d{4} — timing uncertain/);
      if (f.bloom.timing === 'forecast') expect(story.bloom).toMatch(/^First flower sometime from/);
      expect(story.bloom).not.toMatch(/80%:/);
    }
  });

  it("makes no window narrower than the plant's own held-out errors at the lead's stage support", () => {
    let checked = 0;
    for (const { f } of forecasts) {
      const half = f.bloom.heldOutHalfWidthDays;
      const w = f.bloom.firstOpen;
      if (half === null || !w || f.bloom.timing === 'record') continue;
      checked += 1;
      const days = (a: string, b: string) => (Date.parse(b) - Date.parse(a)) / 86_400_000;
      expect(Math.max(days(w.p10, w.p50), days(w.p50, w.p90))).toBeGreaterThanOrEqual(Math.floor(half));
    }
    expect(checked).toBeGreaterThan(0);
    expect(Z80_HALF).toBeCloseTo(1.2816, 4);
  });

  it('gives a genus without a sheath (Stan., Den.) no sheath stage', () => {
    const sheathless = forecasts.filter((x) => x.p.plant.genus === 'Stan.' || x.p.plant.genus === 'Den.');
    expect(sheathless.length).toBeGreaterThan(0);
    for (const { f } of sheathless) expect(f.bloom.stage).not.toMatch(/^sheath_|buds_in_sheath/);
  });

  it('never fits a mature height below the tallest height measured', () => {
    for (const { p, h, f } of forecasts) {
      const tallest = Math.max(0, ...h.measurements.map((m) => m.heightMm));
      expect(f.fit.matureHeightMm, `${p.tag} ${h.lead.label}`).toBeGreaterThanOrEqual(tallest - (f.fit.residualSdMm ?? 3) - 1e-9);
    }
  });

  it('forecasts no lead of a season two or more growth years back', () => {
    for (const p of data.plants) {
      for (const h of p.ownLeads.filter((x) => x.lead.season <= 2024)) {
        const f = forecastLead({ plant: p.plant, leads: p.leads, leadId: h.lead.id, today: TODAY, seasonStartMonth: 3 })!;
        expect(['record', 'none']).toContain(f.bloom.timing);
      }
    }
  });

  it('asks before saving a mature 184 mm bulb as 100 mm', () => {
    const looks = [
      { date: '2026-09-01', heightMm: 170 },
      { date: '2026-10-01', heightMm: 184 },
    ];
    expect(entryLooksWrong(looks, { date: '2026-12-03', heightMm: 100 }, 'mm')).toBe("100 mm is 84 mm below this lead's tallest, 184 mm on 1 Oct 2026; a bulb does not shrink that much.");
    expect(entryLooksWrong(looks, { date: '2026-12-03', heightMm: 182 }, 'mm')).toBeNull();
    expect(entryLooksWrong([{ date: '2026-11-20', heightMm: 18 }], { date: '2026-12-03', heightMm: 180 }, 'mm')).toMatch(/more than 2.5 times the 18 mm/);
  });
});
