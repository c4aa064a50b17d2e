/**
 * The self-check by stage: leave-one-season-out backtests of the first-flower forecast, reported
 * by the stage each lead was at when it was forecast (growing, bulb mature, sheath, buds), on the
 * demo collection and on generated collections of other seeds, against the targets of the
 * forecast's trust work. Run alone with `tsx scripts/bench/self-check.ts`, or as part of
 * `npm run bench`.
 *
 * The collections come from `db/seed/generate.ts`, whose noise model is written down there
 * (`NOISE_MODEL`): the engine is measured against it, never the other way round.
 */
import { FORECAST_STAGES, type BacktestFigures } from '../../src/domain';
import { DEMO_SEED, generateCollection, NOISE_MODEL } from '../../db/seed/generate';
import { collectionBacktest, todayUtc } from '../../server/routes/engine';
import { buildEngineData } from '../../server/services/engine-data';

/** Targets by stage: median error at most `maxMedianDays` (where set), 75–85% inside the 80% window, at least 30% better than "same day as last season". */
export const SELF_CHECK_TARGETS = {
  maxMedianDays: { buds: 7, sheath: 21 } as Partial<Record<(typeof FORECAST_STAGES)[number], number>>,
  inside80: [0.75, 0.85] as const,
  betterThanNaive: 0.3,
};
export const SELF_CHECK_SEEDS = [1, 2, 3];

export interface SelfCheckLine {
  collection: string;
  stage: string;
  figures: BacktestFigures;
  /** Model's median error against the naive one's, as a share saved (0.3 = 30% smaller). */
  gain: number | null;
  misses: string[];
}

function judge(stage: (typeof FORECAST_STAGES)[number], f: BacktestFigures): { gain: number | null; misses: string[] } {
  const misses: string[] = [];
  const gain = f.medianAbsErrorDays !== null && f.naive.medianAbsErrorDays ? 1 - f.medianAbsErrorDays / f.naive.medianAbsErrorDays : null;
  if (f.n === 0) return { gain, misses: ['no seasons'] };
  const max = SELF_CHECK_TARGETS.maxMedianDays[stage];
  if (max !== undefined && f.medianAbsErrorDays !== null && f.medianAbsErrorDays > max) misses.push(`median ${f.medianAbsErrorDays} > ${max} days`);
  const [lo, hi] = SELF_CHECK_TARGETS.inside80;
  if (f.shareInside80 !== null && (f.shareInside80 < lo || f.shareInside80 > hi)) misses.push(`inside ${Math.round(f.shareInside80 * 100)}% not 75–85%`);
  if (gain !== null && gain < SELF_CHECK_TARGETS.betterThanNaive) misses.push(`only ${Math.round(gain * 100)}% better than naive`);
  return { gain, misses };
}

/** The self-check lines for the demo collection and the generated seeds on `today`. */
export function selfCheckLines(today: string): SelfCheckLine[] {
  const lines: SelfCheckLine[] = [];
  const add = (label: string, g: ReturnType<typeof generateCollection>) => {
    const b = collectionBacktest(buildEngineData({ plants: g.plants, leads: g.leads, measurements: g.measurements, blooms: g.bloomRecords }));
    for (const stage of FORECAST_STAGES) lines.push({ collection: label, stage, figures: b.byStage[stage], ...judge(stage, b.byStage[stage]) });
  };
  add('demo (40 plants × 4 seasons)', generateCollection({ seed: DEMO_SEED, today, plants: 40, seasons: 4 }));
  for (const seed of SELF_CHECK_SEEDS) {
    add(`seed ${seed} (150 plants × 10 seasons)`, generateCollection({ seed, today, plants: 150, seasons: 10, leadsPerPlantPerSeason: 2, measurementsPerLead: 15, idNamespace: 11 }));
  }
  return lines;
}

export function printSelfCheck(lines: readonly SelfCheckLine[]): void {
  const pct = (v: number | null) => (v === null ? '–' : `${Math.round(v * 100)}%`);
  console.log(`  noise model of the generated collections: ${NOISE_MODEL}`);
  console.log('  collection                         stage     n     median  naive   better  inside80  targets');
  for (const l of lines) {
    const f = l.figures;
    console.log(
      `  ${l.collection.padEnd(34)} ${l.stage.padEnd(8)} ${String(f.n).padStart(5)}  ${String(f.medianAbsErrorDays ?? '–').padStart(5)} d  ${String(f.naive.medianAbsErrorDays ?? '–').padStart(4)} d  ${pct(l.gain).padStart(6)}  ${pct(f.shareInside80).padStart(8)}  ${l.misses.length ? `MISSED: ${l.misses.join('; ')}` : 'met'}`,
    );
  }
}

if (require.main === module) {
  const today = process.argv[2] ?? todayUtc();
  console.log(`Self-check by stage on ${today}`);
  printSelfCheck(selfCheckLines(today));
}
