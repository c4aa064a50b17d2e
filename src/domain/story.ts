/**
 * A lead's story: the one set of sentences every screen and mail shows for a lead, written from
 * the engine's own figures (`forecastLead`), so Today, Plants, the plant page, the Lead page, the
 * Calendar, Rounds and the weekly digest never say a lead two ways.
 *
 * Pure (no clock: `today` is given). Dates are written in the app's own format ("14 Mar 2027"),
 * lengths in the collection's unit.
 */
import { formatDate, formatLength, fromMm, MONTH_NAMES, type LengthUnit } from './words';
import { STAGE_LABELS, type BloomStage } from './bloom-stage';
import type { DateWindow } from './bloom-timing';
import type { BloomForecast, ForecastStage } from './bloom-window';
import { daysBetween } from './dates';
import type { LeadForecast } from './lead-forecast';
import type { Lead } from './types';

/** A window wider than this many days (10th to 90th percentile) is timing too uncertain to plan with (chosen: about a season). */
export const UNCERTAIN_WINDOW_DAYS = 90;
/**
 * Days ahead of or behind last season are told only while this lead is under this share of
 * last season's final size: near the top of the curve a few millimetres take weeks, and "95% of
 * its size, 92 days behind" reads as nonsense (chosen).
 */
export const PACE_UNTIL_SHARE = 0.9;

export type ChanceLevel = 'almost_certain' | 'likely' | 'possible' | 'unlikely' | 'very_unlikely';

/** Chance bands: the lowest chance of each, its word and a shape cue (filled dots), so colour is never the only sign. */
export const CHANCE_LEVELS: ReadonlyArray<{ level: ChanceLevel; min: number; word: string; dots: string }> = [
  { level: 'almost_certain', min: 0.95, word: 'almost certain', dots: '●●●●' },
  { level: 'likely', min: 0.7, word: 'likely', dots: '●●●○' },
  { level: 'possible', min: 0.4, word: 'possible', dots: '●●○○' },
  { level: 'unlikely', min: 0.15, word: 'unlikely', dots: '●○○○' },
  { level: 'very_unlikely', min: 0, word: 'very unlikely', dots: '○○○○' },
];

/** The one mapping from a chance (0–1) to its band: legend, Calendar, Today, the Lead card and the digest use it. */
export function chanceLevel(chance: number): (typeof CHANCE_LEVELS)[number] {
  return CHANCE_LEVELS.find((l) => chance >= l.min) ?? CHANCE_LEVELS[CHANCE_LEVELS.length - 1];
}

/** "likely (78%)": the word with its figure. */
export function chanceWords(chance: number): string {
  return `${chanceLevel(chance).word} (${Math.round(chance * 100)}%)`;
}


/** "April to July 2027", "November 2026 to March 2027", "June 2027". */
export function monthSpan(from: string, to: string): string {
  const [fy, fm] = [Number(from.slice(0, 4)), Number(from.slice(5, 7))];
  const [ty, tm] = [Number(to.slice(0, 4)), Number(to.slice(5, 7))];
  if (fy === ty && fm === tm) return `${MONTH_NAMES[fm - 1]} ${fy}`;
  if (fy === ty) return `${MONTH_NAMES[fm - 1]} to ${MONTH_NAMES[tm - 1]} ${ty}`;
  return `${MONTH_NAMES[fm - 1]} ${fy} to ${MONTH_NAMES[tm - 1]} ${ty}`;
}

/** True when the window is too wide to plan with (UNCERTAIN_WINDOW_DAYS). */
export function uncertainWindow(w: DateWindow): boolean {
  return daysBetween(w.p10, w.p90) > UNCERTAIN_WINDOW_DAYS;
}

/** A window in words: "about 19 Dec 2026 (80%: 12 Dec – 30 Dec 2026)", or the months when uncertain. */
export function windowWords(w: DateWindow): string {
  if (uncertainWindow(w)) return `sometime from ${monthSpan(w.p10, w.p90)} — timing uncertain`;
  if (w.p10 === w.p90) return `about ${formatDate(w.p50)}`;
  const shortFrom = w.p10.slice(0, 4) === w.p90.slice(0, 4) ? formatDate(w.p10).replace(/ \d{4}$/, '') : formatDate(w.p10);
  return `about ${formatDate(w.p50)} (80%: ${shortFrom} – ${formatDate(w.p90)})`;
}

export type ChipTone = 'ok' | 'warning' | 'alert' | 'neutral' | 'bloom';

export interface LeadStory {
  leadId: string;
  /** The lead's state in a word or two, with its tone: a flag, an ended lead, or its stage. */
  chip: { label: string; tone: ChipTone };
  stage: BloomStage;
  stageLabel: string;
  /** Size against last season, each figure named (same age; final size), and the pace. */
  size: string | null;
  /** Growth: where the curve says it is heading, or that it has matured. */
  growth: string | null;
  /** The stall or abort flag in words, when there is one. */
  flag: string | null;
  /** When and whether it flowers. */
  bloom: string;
  chance: { value: number; level: ChanceLevel; word: string; dots: string } | null;
  /** The figures behind the sentences, for screens that lay them out. */
  figures: {
    ageDays: number | null;
    heightMm: number | null;
    /** This lead ÷ last season's lead at the same age. */
    ofLastSeasonAtSameAge: number | null;
    /** This lead ÷ last season's final size. */
    ofLastSeasonFinal: number | null;
    lastSeasonFinalMm: number | null;
    /** Days ahead (positive) or behind last season, while that still means something (PACE_UNTIL_SHARE). */
    daysAhead: number | null;
    timing: BloomForecast['timing'];
    uncertain: boolean;
  };
}

/** Held-out figures of the plant at one stage, as the self-check reports them. */
export interface StageTrust {
  n: number;
  medianAbsErrorDays: number | null;
  shareInside80: number | null;
  naive: { n: number; medianAbsErrorDays: number | null };
}

const pct = (x: number) => `${Math.round(x * 100)}%`;
const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

const STAGE_TRUST_NAMES: Record<ForecastStage, string> = {
  growing: 'while the lead was still growing',
  mature: 'once the bulb had matured',
  sheath: 'once the sheath showed',
  buds: 'once buds were seen',
};

/** The self-check's figures at one stage in words. */
export function trustWords(stage: ForecastStage | null, figures: StageTrust | null): string {
  if (stage === null) return 'Nothing left to forecast for this lead.';
  if (!figures || figures.n === 0 || figures.medianAbsErrorDays === null) return 'Not enough history yet to check forecasts for this plant at this stage.';
  const days = Math.round(figures.medianAbsErrorDays);
  let text = `Over ${plural(figures.n, 'past season')}, this plant's forecasts made ${STAGE_TRUST_NAMES[stage]} were off by a median of ${plural(days, 'day')}`;
  if (figures.shareInside80 !== null) {
    const inside = Math.round(figures.shareInside80 * figures.n);
    text += inside === figures.n ? `; ${figures.n === 1 ? 'it' : figures.n === 2 ? 'both' : `all ${figures.n}`} fell inside the window` : `; ${inside} of ${figures.n} fell inside the window`;
  }
  text += '.';
  if (figures.naive.medianAbsErrorDays !== null && figures.naive.n > 0) {
    const naive = Math.round(figures.naive.medianAbsErrorDays);
    text += ` Expecting last season's date would have been off by ${plural(naive, 'day')}.`;
  }
  return text;
}

function chipOf(lead: Pick<Lead, 'status'>, forecast: LeadForecast): LeadStory['chip'] {
  const aborted = forecast.flags.find((f) => f.kind === 'aborted');
  const stalled = forecast.flags.find((f) => f.kind === 'stalled');
  if (lead.status === 'dried_off') return { label: 'Dried off', tone: 'alert' };
  if (lead.status === 'rotted') return { label: 'Rotted', tone: 'alert' };
  if (lead.status === 'removed') return { label: 'Removed', tone: 'neutral' };
  if (aborted) return { label: 'Aborted', tone: 'alert' };
  if (stalled) return { label: 'Stalled', tone: 'warning' };
  const b = forecast.bloom;
  if (b.timing === 'late') return { label: 'Late to flower', tone: 'warning' };
  if (b.timing === 'unlikely') return { label: 'Not flowering this season', tone: 'neutral' };
  if (b.stage === 'in_flower') return { label: 'In flower', tone: 'bloom' };
  return { label: STAGE_LABELS[b.stage], tone: b.stage === 'growing' ? 'ok' : 'neutral' };
}

function sizeOf(forecast: LeadForecast, units: LengthUnit, matured: boolean): { text: string | null; figures: Pick<LeadStory['figures'], 'ofLastSeasonAtSameAge' | 'ofLastSeasonFinal' | 'lastSeasonFinalMm' | 'daysAhead'> } {
  const p = forecast.priorYears;
  const last = p.lastSeason;
  const final = last?.finalHeightMm ?? null;
  const sameAge = last?.sizeRatio ?? null;
  const ofFinal = p.shareOfLastSeasonFinal;
  const paceMeans = ofFinal === null || ofFinal < PACE_UNTIL_SHARE;
  const daysAhead = !matured && paceMeans ? (last?.daysAhead ?? null) : null;
  const figures = { ofLastSeasonAtSameAge: matured ? null : sameAge, ofLastSeasonFinal: ofFinal, lastSeasonFinalMm: final, daysAhead };
  if (p.heightMm === null || p.ageDays === null) return { text: 'Not measured yet.', figures };
  const height = formatLength(p.heightMm, units);
  if (!last || final === null) return { text: `${height} at day ${p.ageDays}; no lead of an earlier season to compare.`, figures };
  const finalText = `${pct(ofFinal ?? p.heightMm / final)} of last season's final size (${formatLength(final, units)})`;
  if (matured) return { text: `Mature at ${height}: ${finalText}.`, figures };
  let text =
    sameAge !== null
      ? `${height} at day ${p.ageDays}: ${pct(sameAge)} of last season's lead at the same age and ${finalText}`
      : `${height} at day ${p.ageDays}: ${finalText}`;
  if (daysAhead !== null) {
    text += daysAhead > 0 ? `; about ${plural(daysAhead, 'day')} ahead of it` : daysAhead < 0 ? `; about ${plural(-daysAhead, 'day')} behind it` : '; level with it';
  } else if (!paceMeans) {
    text += '; near last season’s final size';
  }
  if (p.verdict === 'expected_smaller' && p.notes.length) text += ` (${p.notes[0]})`;
  return { text: `${text}.`, figures };
}

function growthOf(lead: Pick<Lead, 'status'>, forecast: LeadForecast, units: LengthUnit, today: string, matured: boolean): string | null {
  if (lead.status !== 'growing' || matured || forecast.flags.length) return null;
  const fit = forecast.fit;
  const size = formatLength(fit.matureHeightMm, units);
  if (fit.method === 'insufficient') {
    return fit.n === 0 ? null : `Too few measurements to fit its own curve yet; leads like it usually reach about ${size}.`;
  }
  const range = `${fromMm(fit.interval80.lowMm, units)}–${formatLength(fit.interval80.highMm, units)}`;
  if (fit.maturityDate < today) {
    return `Past the date its curve put maturity at (${formatDate(fit.maturityDate)}) and still growing; heading for about ${size} (80%: ${range}).`;
  }
  return `Likely mature around ${formatDate(fit.maturityDate)} at about ${size} (80%: ${range}).`;
}

/** Sentence for what the bulb stage still waits on, when timing is uncertain. */
const WAITING_ON: Partial<Record<BloomStage, string>> = {
  growing: 'until the bulb matures',
  bulb_mature: 'until buds show',
  sheath_forming: 'until buds show in the sheath',
  sheath_empty: 'until buds show in the sheath',
  sheath_dry: 'until buds show',
};

/** For an empty or dry sheath, what it means, said with the timing. */
function sheathNote(b: BloomForecast): string {
  if (b.stage === 'sheath_empty' && b.stageDate) return ` The sheath looked empty on ${formatDate(b.stageDate)}: it may still bud later, or wait for next season.`;
  if (b.stage === 'sheath_dry' && b.stageDate) return ` The sheath was dry on ${formatDate(b.stageDate)}: some plants bloom from a dry sheath months later.`;
  return '';
}

function bloomOf(lead: Pick<Lead, 'season'>, forecast: LeadForecast): string {
  return bloomTiming(lead, forecast) + (forecast.bloom.timing === 'forecast' || forecast.bloom.timing === 'late' ? sheathNote(forecast.bloom) : '');
}

function bloomTiming(lead: Pick<Lead, 'season'>, forecast: LeadForecast): string {
  const b = forecast.bloom;
  const w = b.firstOpen;
  const flowers = b.expectedFlowers.count > 0 ? `, about ${plural(b.expectedFlowers.count, 'flower')}` : '';
  switch (b.timing) {
    case 'record':
      if (b.stage === 'faded') return `Flowered from ${formatDate(w!.p50)}${b.lastFadedLikely ? `; faded ${formatDate(b.lastFadedLikely)}` : ''}.`;
      return `In flower since ${formatDate(w!.p50)}${b.lastFadedLikely ? `; likely to fade about ${formatDate(b.lastFadedLikely)}` : ''}.`;
    case 'forecast': {
      const uncertain = uncertainWindow(w!);
      const when = uncertain ? `First flower ${windowWords(w!)}${WAITING_ON[b.stage] ? ` ${WAITING_ON[b.stage]}` : ''}` : `First flower ${windowWords(w!)}`;
      return `${when}; flowering ${chanceWords(b.chance)}${flowers}.`;
    }
    case 'late': {
      const late = b.late!;
      return `Late: its record made ${formatDate(late.likelyWas)} likely, ${plural(late.daysLate, 'day')} ago. If it still flowers, ${windowWords(w!).replace(/^about/, 'most likely about').replace(/^sometime/, 'sometime')}; chance now ${chanceWords(b.chance)}, falling each day it stays closed.`;
    }
    case 'unlikely':
      return `Probably not flowering this season: not open yet and past ${formatDate(b.latestPlausible)}, the latest date its record makes plausible (chance ${chanceWords(b.chance)}).`;
    case 'none':
    default:
      if (b.stage === 'lost') return `No bloom expected: ${b.chanceReasons[0] ?? 'the lead was lost'}.`;
      if (b.notes.some((n) => n.startsWith('a lead of the'))) return `A lead of the ${lead.season} season: no flowering recorded.`;
      return 'No bloom forecast until the lead is measured.';
  }
}

/** The story of one lead on `today` from its forecast. */
export function leadStory(input: { lead: Pick<Lead, 'id' | 'status' | 'season'>; forecast: LeadForecast; today: string; units: LengthUnit }): LeadStory {
  const { lead, forecast, today, units } = input;
  const b = forecast.bloom;
  const matured = lead.status !== 'growing' || (b.stage !== 'growing' && b.stage !== 'lost');
  const size = sizeOf(forecast, units, matured);
  const flagged = forecast.flags[0];
  const flag = flagged ? `${flagged.kind === 'aborted' ? 'Aborted' : 'Stalled'}: ${flagged.reason}.` : null;
  const showChance = b.timing === 'forecast' || b.timing === 'late' || b.timing === 'unlikely';
  return {
    leadId: lead.id,
    chip: chipOf(lead, forecast),
    stage: b.stage,
    stageLabel: STAGE_LABELS[b.stage],
    size: size.text,
    growth: growthOf(lead, forecast, units, today, matured),
    flag,
    bloom: bloomOf(lead, forecast),
    chance: showChance ? { value: b.chance, ...pick(chanceLevel(b.chance)) } : null,
    figures: {
      ageDays: forecast.priorYears.ageDays,
      heightMm: forecast.priorYears.heightMm,
      ...size.figures,
      timing: b.timing,
      uncertain: b.firstOpen !== null && b.timing !== 'record' && uncertainWindow(b.firstOpen),
    },
  };
}

function pick(l: (typeof CHANCE_LEVELS)[number]) {
  return { level: l.level, word: l.word, dots: l.dots };
}
