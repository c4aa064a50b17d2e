import { formatLength, fromMm, type LengthUnit } from '@/lib/units';
import type { PlantTrendResponse } from '@/shared/schemas/engine';

/**
 * Below this share of season-to-season variation explained, a slope is not called a trend:
 * the seasons scatter more than they move (a plain reading of r², chosen, not sourced).
 */
export const TREND_MIN_R_SQUARED = 0.5;

/** The trend in words: "Mature leads are growing about 12 mm a season (r² 0.81)". */
export function trendSentence(trend: PlantTrendResponse, units: LengthUnit): string {
  if (trend.slopeMmPerSeason === null) return 'Not enough mature leads yet to see a trend (it takes two seasons).';
  const slope = trend.slopeMmPerSeason;
  const size = formatLength(Math.abs(slope), units);
  const fit = trend.rSquared === null ? '' : ` (r² ${trend.rSquared.toFixed(2)})`;
  if (Math.abs(fromMm(slope, units)) < (units === 'mm' ? 1 : 0.1)) return `Mature leads have stayed about the same size${fit}.`;
  if (trend.rSquared !== null && trend.rSquared < TREND_MIN_R_SQUARED) {
    return `No clear trend: mature leads vary from season to season more than they grow or shrink${fit}.`;
  }
  return `Mature leads are ${slope > 0 ? 'growing' : 'shrinking'} by about ${size} a season${fit}.`;
}
