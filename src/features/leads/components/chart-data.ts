/** What the lead chart draws, in the collection's display unit; built from plain numbers. */
export interface LeadChartData {
  /** Heights the grower measured, by day since the lead was first seen. */
  measured: Array<{ day: number; height: number; date: string; leafCount: number | null; rootTips: number | null; sheath: string }>;
  /** The fitted curve and its 80% band, sampled by day. */
  curve: Array<{ day: number; fit: number; lo: number; hi: number }>;
  /** Last season's lead of the same plant at the same ages. */
  lastSeason: Array<{ day: number; height: number }>;
  /** Sheath and bloom events on the time axis. */
  events: Array<{ day: number; label: string }>;
  unit: string;
}

export interface ChartRow extends Record<string, unknown> {
  day: number;
  measured: number | null;
  fit: number | null;
  lo: number | null;
  hi: number | null;
  last: number | null;
}

/** Merges the series into one row per day, as the chart library wants. */
export function chartRows(data: LeadChartData): ChartRow[] {
  const rows = new Map<number, ChartRow>();
  const row = (day: number) => {
    let r = rows.get(day);
    if (!r) {
      r = { day, measured: null, fit: null, lo: null, hi: null, last: null };
      rows.set(day, r);
    }
    return r;
  };
  for (const m of data.measured) row(m.day).measured = m.height;
  for (const c of data.curve) Object.assign(row(c.day), { fit: c.fit, lo: c.lo, hi: c.hi });
  for (const l of data.lastSeason) row(l.day).last = l.height;
  return [...rows.values()].sort((a, b) => a.day - b.day);
}
