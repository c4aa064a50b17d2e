import { CHANCE_LEVELS, chanceLevel, chanceWords, type ChanceLevel } from '@/domain/story';
import { formatDate } from '@/lib/dates';
import { MONTH_ABBREVIATIONS } from '@/lib/format';
import { colors } from '@/theme';

/*
 * Date arithmetic for the bloom timeline. Calendar dates are 'YYYY-MM-DD' with no time of
 * day, so everything runs in UTC days to stay clear of daylight-saving shifts.
 */

const DAY_MS = 86_400_000;
const DATE_PATTERN = /^(\d{4})-(\d{2})-(\d{2})$/;

/** Days in the timeline when the grower has not moved it (the calendar route's own default). */
export const RANGE_DAYS = 180;

export function dayNumber(date: string): number {
  const [y, m, d] = date.split('-').map(Number);
  return Date.UTC(y, m - 1, d) / DAY_MS;
}

function fromDayNumber(day: number): string {
  return new Date(day * DAY_MS).toISOString().slice(0, 10);
}

export function addDays(date: string, days: number): string {
  return fromDayNumber(dayNumber(date) + days);
}

/** The same day of the month `months` later, clamped to the month's last day (31 Jan + 1 → 28 Feb). */
export function addMonths(date: string, months: number): string {
  const [y, m, d] = date.split('-').map(Number);
  const first = new Date(Date.UTC(y, m - 1 + months, 1));
  const last = new Date(Date.UTC(first.getUTCFullYear(), first.getUTCMonth() + 1, 0)).getUTCDate();
  first.setUTCDate(Math.min(d, last));
  return first.toISOString().slice(0, 10);
}

/** True for a real calendar date written as YYYY-MM-DD (so 2027-02-30 is refused). */
export function isCalendarDate(text: string): boolean {
  const match = DATE_PATTERN.exec(text);
  if (!match) return false;
  const [, y, m, d] = match.map(Number);
  const date = new Date(Date.UTC(y, m - 1, d));
  return date.getUTCFullYear() === y && date.getUTCMonth() === m - 1 && date.getUTCDate() === d;
}

/** Where a date falls on the range, as a percentage of its width, clamped to 0–100. */
export function positionPercent(date: string, from: string, to: string): number {
  const span = Math.max(1, dayNumber(to) - dayNumber(from));
  return Math.min(100, Math.max(0, ((dayNumber(date) - dayNumber(from)) / span) * 100));
}

/** The first day of each month inside the range, for the axis. */
export function monthStarts(from: string, to: string): string[] {
  const [y, m] = from.split('-').map(Number);
  const starts: string[] = [];
  for (let i = 0; ; i++) {
    const start = new Date(Date.UTC(y, m - 1 + i, 1)).toISOString().slice(0, 10);
    if (start > to) break;
    if (start >= from) starts.push(start);
  }
  return starts;
}

/** "Jan", or "Jan 2027" with the year (see lib/format.ts on why not Intl). */
export function monthLabel(date: string, withYear: boolean): string {
  const [y, m] = date.split('-').map(Number);
  return withYear ? `${MONTH_ABBREVIATIONS[m - 1]} ${y}` : MONTH_ABBREVIATIONS[m - 1];
}

/** "6 Dec", or "6 Dec 2027" when the year differs from the reference year. */
export function shortDate(date: string, referenceYear: number): string {
  const [y, m, d] = date.split('-').map(Number);
  return y === referenceYear ? `${d} ${MONTH_ABBREVIATIONS[m - 1]}` : formatDate(date);
}


/**
 * The engine's chance bands (`chanceLevel`, src/domain/story.ts) with a colour each for the
 * Calendar's bars. The word and its dots always print beside the colour, so colour is never the
 * only sign.
 */
const LEVEL_COLOURS: Record<ChanceLevel, string> = {
  almost_certain: colors.accent,
  likely: colors.accent,
  possible: colors.warning,
  unlikely: colors.textSubtle,
  very_unlikely: colors.textSubtle,
};

export const CHANCE_BANDS = CHANCE_LEVELS.map((l, i) => {
  const upper = i === 0 ? null : CHANCE_LEVELS[i - 1].min;
  const range = upper === null ? `${Math.round(l.min * 100)}% or more` : l.min === 0 ? `under ${Math.round(upper * 100)}%` : `${Math.round(l.min * 100)}–${Math.round(upper * 100) - 1}%`;
  return { band: l.level, min: l.min, label: l.word, dots: l.dots, legend: `${l.dots} ${l.word.replace(/^./, (c) => c.toUpperCase())} (${range})`, color: LEVEL_COLOURS[l.level] };
});

export function chanceBand(chance: number) {
  const level = chanceLevel(chance).level;
  return CHANCE_BANDS.find((b) => b.band === level)!;
}

export function percent(share: number): string {
  return `${Math.round(share * 100)}%`;
}

/** "likely (78%)": the engine's one word for the chance with its figure. */
export const chanceText = chanceWords;
