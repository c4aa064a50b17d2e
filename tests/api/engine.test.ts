import { median } from 'simple-statistics';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  attentionList,
  plantTrust,
  storyOf,
  trustSentence,
  backtestBloomForecasts,
  compareGroups,
  forecastLead,
  leadFlags,
  genusDefaultsFor,
  matureSizeTrend,
  type BacktestRow,
  type BloomHistory,
} from '@/domain';
import {
  attentionListSchema,
  backtestSchema,
  bloomCalendarSchema,
  comparisonSchema,
  leadForecastSchema,
  plantTrendSchema,
} from '@/shared/schemas/engine';
import { curve, daysAgo, insertEngineRecords, pastLead, type EngineFixture } from '../factories/engine';
import { buildCollectionWithMembers } from '../factories/users';
import { testDb } from './support/database';
import { browser, startTestServer, type TestServer } from './support/server';

/** What the wire makes of a value (undefined keys dropped, -0 written as 0). */
const wire = <T>(value: T): T => JSON.parse(JSON.stringify(value));

const season = (k: number) => daysAgo(365 * k + 100);

let server: TestServer;
let members: Awaited<ReturnType<typeof buildCollectionWithMembers>>;
let fx: EngineFixture;
let other: EngineFixture;
let viewer: ReturnType<typeof browser>;
const base = () => `/api/collections/${members.collectionId}`;

beforeAll(async () => {
  server = await startTestServer();
  const db = testDb();
  members = await buildCollectionWithMembers(db, 'Engine bench');
  fx = await insertEngineRecords(db, members.collectionId, [
    {
      plant: { tag: 'HL-001', medium: 'bark', area: 'bench' },
      leads: [pastLead('A3', season(3), 150), pastLead('A2', season(2), 160), pastLead('A1', season(1), 170), { label: 'A0', firstSeen: daysAgo(100), status: 'growing', heights: curve(180, 91) }],
    },
    {
      plant: { tag: 'HL-002', medium: 'bark', area: 'window' },
      leads: [
        pastLead('B3', season(3), 180),
        pastLead('B2', season(2), 185),
        pastLead('B1', season(1), 190),
        // Stops rising at about a fifth of last season's size, eight weeks before today.
        { label: 'B0', firstSeen: daysAgo(110), status: 'growing', heights: curve(190, 105, { flatFrom: 49 }) },
      ],
    },
    {
      plant: { tag: 'HL-003', genus: 'Rlc.', medium: 'bark', area: 'bench' },
      leads: [
        pastLead('C3', season(3), 140),
        pastLead('C2', season(2), 150),
        // Left 'growing' by the grower two seasons ago: the parent's attention item, never the division's.
        { label: 'C2x', firstSeen: daysAgo(365 * 2 + 90), status: 'growing', heights: curve(60, 35) },
        pastLead('C1', season(1), 155),
        { label: 'C0', firstSeen: daysAgo(95), status: 'growing', heights: curve(160, 91) },
      ],
    },
    {
      plant: { tag: 'HL-003B', genus: 'Rlc.', medium: 'sphagnum', area: 'bench', parent: 'HL-003', dividedOn: daysAgo(600) },
      leads: [pastLead('D1', season(1), 110), { label: 'D0', firstSeen: daysAgo(85), status: 'growing', heights: curve(150, 77) }],
    },
    {
      plant: { tag: 'HL-004', genus: 'Den.', medium: null, area: 'window' },
      leads: [
        pastLead('E1', season(1), 250),
        // Last measured 29 days ago: due for measuring.
        { label: 'E0', firstSeen: daysAgo(120), status: 'growing', heights: curve(260, 91, { midpoint: 80, scale: 20 }) },
        { label: 'E0b', firstSeen: daysAgo(110), status: 'dried_off', heights: curve(200, 40) },
      ],
    },
  ]);
  other = await insertEngineRecords(db, members.otherCollectionId, [
    { plant: { tag: 'OT-001' }, leads: [pastLead('Z1', season(1), 150), { label: 'Z0', firstSeen: daysAgo(90), status: 'growing', heights: curve(150, 77) }] },
  ]);
  viewer = browser(server.url, members.people.viewer.cookie);
});

afterAll(async () => {
  await server.close();
});

describe('GET /leads/:leadId/forecast', () => {
  it('answers what forecastLead gives on the same records, with the plant’s backtest figures', async () => {
    const res = await viewer.get(`${base()}/leads/${fx.leadIds['HL-001/A0']}/forecast`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const body = leadForecastSchema.parse(res.body);
    const d = fx.domain['HL-001'];
    const expected = forecastLead({ plant: d.plant, leads: d.withHistory, leadId: fx.leadIds['HL-001/A0'], today: body.today })!;
    expect(body.fit).toEqual(wire(expected.fit));
    expect(body.priorYears).toEqual(wire(expected.priorYears));
    expect(body.flags).toEqual(wire(expected.flags));
    expect(body.bloom).toEqual(wire(expected.bloom));
    const { rows: _rows, ...trust } = backtestBloomForecasts([{ plant: d.plant, leads: d.withHistory }]);
    expect(body.trust).toEqual(wire(trust));
    // The story the page shows is the domain's own, from the same forecast.
    expect(body.story).toEqual(wire(storyOf(d.own.find((h) => h.lead.id === fx.leadIds['HL-001/A0'])!, expected, body.today, 'mm')));
    expect(body.trustSentence).toBe(trustSentence(expected, plantTrust(d.plant, d.withHistory)));
    expect(body.trust.n).toBe(3);
    expect(body.lead).toMatchObject({ id: fx.leadIds['HL-001/A0'], label: 'A0', status: 'growing' });
    expect(body.fit.interval80.lowMm).toBeLessThanOrEqual(body.fit.matureHeightMm);
    expect(body.bloom.firstOpen).not.toBeNull();
  });

  it('uses the parent’s history for a division, and says its first lead was expected smaller', async () => {
    const res = await viewer.get(`${base()}/leads/${fx.leadIds['HL-003B/D0']}/forecast`);
    expect(res.status).toBe(200);
    const d = fx.domain['HL-003B'];
    const expected = forecastLead({ plant: d.plant, leads: d.withHistory, leadId: fx.leadIds['HL-003B/D0'], today: res.body.today })!;
    expect(res.body.fit).toEqual(wire(expected.fit));
    expect(res.body.priorYears).toEqual(wire(expected.priorYears));
    expect(res.body.bloom).toEqual(wire(expected.bloom));
    // History reaches back into the parent's seasons.
    expect(res.body.priorYears.earlier.map((e: { leadId: string }) => e.leadId)).toEqual(
      expect.arrayContaining([fx.leadIds['HL-003/C3'], fx.leadIds['HL-003/C2']]),
    );
    const first = await viewer.get(`${base()}/leads/${fx.leadIds['HL-003B/D1']}/forecast`);
    expect(first.body.priorYears.notes.join(' ')).toMatch(/first lead after the division/);
  });

  it('flags a stalled lead with its reason in numbers', async () => {
    const res = await viewer.get(`${base()}/leads/${fx.leadIds['HL-002/B0']}/forecast`);
    expect(res.status).toBe(200);
    const d = fx.domain['HL-002'];
    const expected = forecastLead({ plant: d.plant, leads: d.withHistory, leadId: fx.leadIds['HL-002/B0'], today: res.body.today })!;
    expect(res.body.flags).toEqual(wire(expected.flags));
    expect(res.body.flags).toHaveLength(1);
    expect(res.body.flags[0].reason).toMatch(/in \d+ days .* of last season's final size/);
  });
});

describe('GET /plants/:plantId/trend', () => {
  it('gives the mature size trend matureSizeTrend gives, inherited seasons included and the first after a division left out', async () => {
    const res = await viewer.get(`${base()}/plants/${fx.plantIds['HL-003B']}/trend`);
    expect(res.status).toBe(200);
    const body = plantTrendSchema.parse(res.body);
    const d = fx.domain['HL-003B'];
    const expected = matureSizeTrend({ plant: d.plant, plantLeads: d.withHistory, today: body.today });
    expect(body.slopeMmPerSeason).toEqual(expected.slopeMmPerSeason);
    expect(body.rSquared).toEqual(expected.rSquared);
    expect(body.excludedSeasons).toEqual(expected.excludedSeasons);
    expect(body.seasons.map(({ season, matureHeightMm, leadId }) => ({ season, matureHeightMm, leadId }))).toEqual(expected.seasons);
    expect(body.excludedSeasons).toEqual([Number(season(1).slice(0, 4))]);
    expect(body.notes.join(' ')).toMatch(/first lead after the division/);
    expect(body.slopeMmPerSeason).toBeCloseTo(10, 0);
  });

  it('lists the flags a lead carried, dated from the measurement where the engine first raised them', async () => {
    const res = await viewer.get(`${base()}/plants/${fx.plantIds['HL-002']}/trend`);
    expect(res.status).toBe(200);
    const d = fx.domain['HL-002'];
    const b0 = d.own.find((h) => h.lead.label === 'B0')!;
    const genus = genusDefaultsFor('C.');
    const flagged = b0.measurements
      .map((m) => ({ date: m.date, flags: leadFlags({ current: b0, plantLeads: d.withHistory, plant: d.plant, genusDefaults: genus, priorShapes: undefined, today: m.date }) }))
      .filter((x) => x.flags.length > 0);
    expect(flagged.length).toBeGreaterThan(0);
    const entries = res.body.flagHistory.filter((e: { leadId: string }) => e.leadId === b0.lead.id);
    expect(entries.length).toBeGreaterThan(0);
    expect(entries.map((e: { kind: string }) => e.kind)).toContain('stalled');
    // Healthy plant: no flags at any point.
    const healthy = await viewer.get(`${base()}/plants/${fx.plantIds['HL-001']}/trend`);
    expect(healthy.body.flagHistory).toEqual([]);
    expect(healthy.body.slopeMmPerSeason).toBeCloseTo(10, 0);
    // A lead the grower marked dried off.
    const den = await viewer.get(`${base()}/plants/${fx.plantIds['HL-004']}/trend`);
    expect(den.body.flagHistory).toContainEqual(expect.objectContaining({ leadId: fx.leadIds['HL-004/E0b'], kind: 'aborted', severity: 'alert' }));
  });
});

describe('GET /attention', () => {
  const expectedItems = (date: string) => {
    const owner = new Map(Object.entries(fx.leadIds).map(([key, id]) => [id, fx.plantIds[key.split('/')[0]]]));
    return attentionList(
      Object.values(fx.domain).map((d) => ({ plant: d.plant, leads: d.withHistory })),
      date,
      { seasonStartMonth: 3, units: 'mm' },
    )
      .filter((i) => owner.get(i.target.leadId) === i.target.plantId)
      .map((i) => ({ kind: i.kind, target: i.target, reason: i.reason, date: i.date, flag: i.flag ?? null, story: i.story }));
  };

  it('is the attention list the domain gives for today, each item linking to its plant and lead', async () => {
    const res = await viewer.get(`${base()}/attention`);
    expect(res.status).toBe(200);
    const body = attentionListSchema.parse(res.body);
    expect(body.date).toBe(daysAgo(0));
    expect(body.items.map(({ plantTag: _t, leadLabel: _l, ...rest }) => rest)).toEqual(wire(expectedItems(body.date)));
    const kinds = body.items.map((i) => `${i.kind} ${i.plantTag}/${i.leadLabel}`);
    expect(kinds).toContain('measure HL-004/E0');
    expect(kinds).toContain('aborted HL-004/E0b');
    expect(kinds).toContain('measure HL-003/C2x');
    expect(kinds.some((k) => k.endsWith('HL-002/B0') && /stalled|aborted/.test(k))).toBe(true);
    // Inherited leads never link to the division.
    expect(body.items.every((i) => i.target.plantId !== fx.plantIds['HL-003B'] || i.leadLabel.startsWith('D'))).toBe(true);
  });

  it('takes a date, and answers anew once the records change', async () => {
    const date = daysAgo(60);
    const res = await viewer.get(`${base()}/attention?date=${date}`);
    expect(res.status).toBe(200);
    expect(res.body.items.map(({ plantTag: _t, leadLabel: _l, ...rest }: Record<string, unknown>) => rest)).toEqual(wire(expectedItems(date)));

    const before = await viewer.get(`${base()}/attention`);
    expect(before.body.items.some((i: { kind: string; leadLabel: string }) => i.kind === 'measure' && i.leadLabel === 'E0')).toBe(true);
    // Written through the API, as a grower would: this process forgets the collection's
    // fingerprint at once, so the next answer is computed anew.
    const grower = browser(server.url, members.people.grower.cookie);
    const written = await grower.post(`${base()}/leads/${fx.leadIds['HL-004/E0']}/measurements`, { date: daysAgo(0), heightMm: 200 });
    expect(written.status, JSON.stringify(written.body)).toBe(201);
    const after = await viewer.get(`${base()}/attention`);
    expect(after.body.items.some((i: { kind: string; leadLabel: string }) => i.kind === 'measure' && i.leadLabel === 'E0')).toBe(false);
    // A changed answer has a new ETag, so a client revalidating gets the new list, not a 304.
    expect(after.headers.etag).not.toBe(before.headers.etag);
    // Keep the domain's copy in step for the tests after this one.
    const e0 = fx.domain['HL-004'].own.find((h) => h.lead.label === 'E0')!;
    (e0.measurements as unknown[]).push({ id: 'added', leadId: e0.lead.id, date: daysAgo(0), heightMm: 200, leafCount: null, sheath: 'none', rootTips: null, bulbWidthMm: null });
  });
});

describe('GET /attention as sent', () => {
  it('carries an ETag of its bytes, answers 304 to it, and gzips on request', async () => {
    const attention = () => supertest(server.url).get(`${base()}/attention`).set('Cookie', members.people.viewer.cookie);
    const first = await attention().set('Accept-Encoding', 'identity');
    expect(first.status).toBe(200);
    const etag = first.headers.etag as string;
    expect(etag).toMatch(/^"[A-Za-z0-9_-]+"$/);
    const again = await attention().set('If-None-Match', etag);
    expect(again.status).toBe(304);
    const zipped = await attention().set('Accept-Encoding', 'gzip');
    expect(zipped.headers['content-encoding']).toBe('gzip');
    expect(zipped.headers.etag).toBe(etag);
    expect(zipped.body).toEqual(first.body);
    const plain = await attention().set('Accept-Encoding', 'identity');
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.body).toEqual(first.body);
  });
});

describe('GET /calendar', () => {
  it('lists the bloom windows of current leads as forecastLead gives them, and who is likely in flower on a day', async () => {
    const res = await viewer.get(`${base()}/calendar?to=${daysAgo(-365)}`);
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const body = bloomCalendarSchema.parse(res.body);
    expect(body.inFlowerOn).toBeNull();
    const labels = body.windows.map((w) => `${w.plantTag}/${w.leadLabel}`);
    expect(labels).toEqual(expect.arrayContaining(['HL-001/A0', 'HL-003/C0', 'HL-003B/D0']));
    expect(labels).not.toContain('HL-004/E0b');
    for (const w of body.windows) {
      const d = Object.values(fx.domain).find((x) => x.plant.id === w.plantId)!;
      const f = forecastLead({ plant: d.plant, leads: d.withHistory, leadId: w.leadId, today: body.today })!;
      expect(w.firstOpen).toEqual(f.bloom.firstOpen);
      expect(w.chance).toEqual(f.bloom.chance);
      expect(w.lastFadedLikely).toEqual(f.bloom.lastFadedLikely);
      expect(w.span.start).toBe(f.bloom.firstOpen!.p10);
      expect(w.span.end >= f.bloom.firstOpen!.p90).toBe(true);
    }

    const target = body.windows.find((w) => w.leadLabel === 'A0')!;
    const on = await viewer.get(`${base()}/calendar?from=${body.from}&to=${body.to}&on=${target.firstOpen.p50}`);
    expect(on.status).toBe(200);
    const listed = bloomCalendarSchema.parse(on.body).inFlowerOn!;
    expect(listed).toContainEqual(expect.objectContaining({ leadId: target.leadId, likely: true, chance: target.chance }));
    for (const l of listed) {
      const w = body.windows.find((x) => x.leadId === l.leadId)!;
      expect(w.span.start <= target.firstOpen.p50 && target.firstOpen.p50 <= w.span.end).toBe(true);
    }
  });

  it('leaves out windows outside the range', async () => {
    const res = await viewer.get(`${base()}/calendar?from=${daysAgo(400)}&to=${daysAgo(380)}`);
    expect(res.status).toBe(200);
    expect(res.body.windows).toEqual([]);
  });
});

describe('GET /backtest', () => {
  it('gives the leave-one-season-out figures, each plant tested on its own leads with its inherited history', async () => {
    const res = await viewer.get(`${base()}/backtest`);
    expect(res.status).toBe(200);
    const body = backtestSchema.parse(res.body);
    const rows: BacktestRow[] = [];
    for (const d of Object.values(fx.domain)) {
      const own = new Set(d.own.map((h) => h.lead.id));
      rows.push(...backtestBloomForecasts([{ plant: d.plant, leads: d.withHistory }]).rows.filter((r) => own.has(r.leadId)));
    }
    const byLead = (a: { leadId: string }, b: { leadId: string }) => a.leadId.localeCompare(b.leadId);
    expect([...body.rows].sort(byLead)).toEqual(wire(rows).sort(byLead));
    // The headline figures are the forecasts made on the day each lead matured: one per season.
    const headline = rows.filter((r) => r.atMaturity);
    expect(body.n).toBe(headline.length);
    expect(body.n).toBe(3 + 3 + 3 + 1 + 1);
    expect(body.medianAbsErrorDays).toBe(median(headline.map((r) => r.errorDays)));
    expect(body.shareInside80).toBe(headline.filter((r) => r.inside80).length / headline.length);
    const naive = headline.filter((r) => r.naiveErrorDays !== null).map((r) => r.naiveErrorDays!);
    expect(body.naive).toEqual({ n: naive.length, medianAbsErrorDays: median(naive) });
    // By stage: every row counted once, at the stage the lead was at when forecast.
    expect(Object.values(body.byStage).reduce((sum, f) => sum + f.n, 0)).toBe(rows.length);
    expect(body.byStage.buds.n).toBe(rows.filter((r) => r.stage === 'buds').length);
    // Without divisions it is exactly the domain's collection backtest.
    const plain = backtestBloomForecasts(['HL-001', 'HL-002', 'HL-004'].map((t) => ({ plant: fx.domain[t].plant, leads: fx.domain[t].withHistory })));
    expect(body.rows.filter((r) => plain.rows.some((p) => p.leadId === r.leadId && p.stage === r.stage && p.asOf === r.asOf))).toHaveLength(plain.rows.length);
  });
});

describe('GET /compare', () => {
  const entry = (tag: string) => ({ plant: fx.domain[tag].plant, leads: fx.domain[tag].own as readonly BloomHistory[] });

  it('compares by medium with the tests compareGroups runs, largest group first, and warns on small groups', async () => {
    const res = await viewer.get(`${base()}/compare?by=medium`);
    expect(res.status).toBe(200);
    const body = comparisonSchema.parse(res.body);
    expect(body.groups.map((g) => g.name)).toEqual(['bark', 'no medium recorded', 'sphagnum']);
    const expected = compareGroups({
      groups: [
        { name: 'bark', plants: ['HL-001', 'HL-002', 'HL-003'].map(entry) },
        { name: 'no medium recorded', plants: ['HL-004'].map(entry) },
        { name: 'sphagnum', plants: ['HL-003B'].map(entry) },
      ],
      today: body.today,
    });
    expect(body.groups.map((g) => ({ ...g, plants: g.plants.map(({ plantTag: _t, ...p }) => p) }))).toEqual(wire(expected.groups));
    expect(body.difference).toEqual(wire({ between: ['bark', 'no medium recorded'], ...expected.difference }));
    expect(body.warnings).toEqual(expected.warnings);
    expect(body.warnings.length).toBe(3);
  });

  it('compares by area, and a division family plant by plant', async () => {
    const area = await viewer.get(`${base()}/compare?by=area`);
    expect(area.status).toBe(200);
    expect(area.body.groups.map((g: { name: string }) => g.name)).toEqual(['Shade bench', 'East window']);

    const family = await viewer.get(`${base()}/compare?by=family&plantId=${fx.plantIds['HL-003B']}`);
    expect(family.status).toBe(200);
    const body = comparisonSchema.parse(family.body);
    expect(body.groups.map((g) => g.name)).toEqual(['HL-003', 'HL-003B']);
    const expected = compareGroups({ groups: [{ name: 'HL-003', plants: [entry('HL-003')] }, { name: 'HL-003B', plants: [entry('HL-003B')] }], today: body.today });
    expect(body.groups.map((g) => ({ ...g, plants: g.plants.map(({ plantTag: _t, ...p }) => p) }))).toEqual(wire(expected.groups));
    expect(body.warnings).toEqual(expected.warnings);
  });
});

describe('access and input', () => {
  const routes = () => [
    `${base()}/leads/${fx.leadIds['HL-001/A0']}/forecast`,
    `${base()}/plants/${fx.plantIds['HL-001']}/trend`,
    `${base()}/attention`,
    `${base()}/calendar`,
    `${base()}/backtest`,
    `${base()}/compare?by=medium`,
  ];

  it('lets every member read, refuses the signed-out (401) and hides the collection from outsiders (404)', async () => {
    for (const path of routes()) {
      for (const role of ['viewer', 'grower', 'owner'] as const) {
        const res = await browser(server.url, members.people[role].cookie).get(path);
        expect(res.status, `${role} ${path}`).toBe(200);
      }
      expect((await browser(server.url).get(path)).status).toBe(401);
      const outsider = await browser(server.url, members.people.outsider.cookie).get(path);
      expect(outsider.status).toBe(404);
      expect(outsider.body.error.code).toBe('not_found');
    }
  });

  it('answers 404 for ids of another collection, unknown ids and malformed ids', async () => {
    const paths = [
      `${base()}/leads/${other.leadIds['OT-001/Z0']}/forecast`,
      `${base()}/plants/${other.plantIds['OT-001']}/trend`,
      `${base()}/compare?by=family&plantId=${other.plantIds['OT-001']}`,
      `${base()}/leads/00000000-0000-4000-8000-000000000000/forecast`,
      `${base()}/leads/not-a-lead/forecast`,
      `${base()}/plants/not-a-plant/trend`,
    ];
    for (const path of paths) {
      const res = await viewer.get(path);
      expect(res.status, path).toBe(404);
      expect(res.body.error.code).toBe('not_found');
    }
  });

  it.each([
    ['attention?date=2026-13-01', ['query.date']],
    ['attention?date=yesterday', ['query.date']],
    ['calendar?from=2026-05-01&to=2026-04-01', ['query.to']],
    ['calendar?from=2026-01-01&to=2029-01-01', ['query.to']],
    ['calendar?to=2000-01-01', ['query.to']],
    ['calendar?on=2026-02-30', ['query.on']],
    ['compare', ['query.by']],
    ['compare?by=colour', ['query.by']],
    ['compare?by=family', ['query.plantId']],
    ['compare?by=family&plantId=nope', ['query.plantId']],
  ])('refuses %s with 400 naming %j', async (path, fields) => {
    const res = await viewer.get(`${base()}/${path}`);
    expect(res.status, JSON.stringify(res.body)).toBe(400);
    expect(res.body.error.code).toBe('invalid_input');
    expect(res.body.error.details.map((d: { field: string }) => d.field)).toEqual(fields);
  });
});

describe('engine contracts', () => {
  it('refuse non-finite numbers, impossible dates and an interval that excludes its estimate', async () => {
    const res = await viewer.get(`${base()}/leads/${fx.leadIds['HL-001/A0']}/forecast`);
    const good = leadForecastSchema.parse(res.body);
    const withFit = (fit: Record<string, unknown>) => ({ ...good, fit: { ...good.fit, ...fit } });
    expect(leadForecastSchema.safeParse(withFit({ matureHeightMm: Number.NaN })).success).toBe(false);
    expect(leadForecastSchema.safeParse(withFit({ scaleDays: Number.POSITIVE_INFINITY })).success).toBe(false);
    expect(leadForecastSchema.safeParse(withFit({ maturityDate: '2026-02-30' })).success).toBe(false);
    expect(leadForecastSchema.safeParse(withFit({ interval80: { lowMm: good.fit.matureHeightMm + 1, highMm: good.fit.matureHeightMm + 2 } })).success).toBe(false);
    expect(leadForecastSchema.safeParse({ ...good, bloom: { ...good.bloom, chance: 1.2 } }).success).toBe(false);
    expect(leadForecastSchema.safeParse(JSON.parse(JSON.stringify(good))).success).toBe(true);
  });
});

describe('one story per lead across the answers', () => {
  it('every answer that speaks of a lead carries the same story: lead stories, its forecast, Today and the Calendar', async () => {
    const stories = await viewer.get(`${base()}/lead-stories`);
    expect(stories.status).toBe(200);
    expect(stories.body.stories.length).toBeGreaterThan(3);
    const byLead = new Map<string, unknown>(stories.body.stories.map((s: { leadId: string; story: unknown }) => [s.leadId, s.story]));
    for (const { leadId, story } of stories.body.stories as Array<{ leadId: string; story: { leadId: string } }>) {
      expect(story.leadId).toBe(leadId);
      const forecast = await viewer.get(`${base()}/leads/${leadId}/forecast`);
      expect(forecast.body.story, leadId).toEqual(story);
    }
    const attention = await viewer.get(`${base()}/attention`);
    for (const item of attention.body.items as Array<{ target: { leadId: string }; story: unknown; kind: string; reason: string }>) {
      expect(item.story).toEqual(byLead.get(item.target.leadId));
      if (item.kind === 'bloom') expect(item.reason).toBe((item.story as { bloom: string }).bloom);
    }
    const calendar = await viewer.get(`${base()}/calendar`);
    for (const w of calendar.body.windows as Array<{ leadId: string; story: unknown }>) expect(w.story).toEqual(byLead.get(w.leadId));
  });
});
