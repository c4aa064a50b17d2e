/**
 * Pure calendar-date helpers for 'YYYY-MM-DD' strings. Dates become whole day numbers by integer
 * calendar arithmetic (equal to UTC midnights; no Date object, no host time zone), so time
 * zones and daylight-saving changes never shift a date.
 */
import type { IsoDate } from './types';

const DAYS_IN_MONTH = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];

function isLeapYear(y: number): boolean {
  return (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
}

function digits(s: string, from: number, to: number): number {
  let v = 0;
  for (let i = from; i < to; i++) {
    const c = s.charCodeAt(i) - 48;
    if (c < 0 || c > 9) return -1;
    v = v * 10 + c;
  }
  return v;
}

/*
 * Days from the civil (proleptic Gregorian) date to 1970-01-01 and back, by exact integer
 * arithmetic over 400-year eras (H. Hinnant, "chrono-compatible low-level date algorithms").
 */
function daysFromCivil(y: number, m: number, d: number): number {
  const yy = m <= 2 ? y - 1 : y;
  const era = Math.floor(yy / 400);
  const yoe = yy - era * 400;
  const doy = Math.floor((153 * (m + (m > 2 ? -3 : 9)) + 2) / 5) + d - 1;
  const doe = yoe * 365 + Math.floor(yoe / 4) - Math.floor(yoe / 100) + doy;
  return era * 146097 + doe - 719468;
}

function civilFromDays(z0: number): [number, number, number] {
  const z = z0 + 719468;
  const era = Math.floor(z / 146097);
  const doe = z - era * 146097;
  const yoe = Math.floor((doe - Math.floor(doe / 1460) + Math.floor(doe / 36524) - Math.floor(doe / 146096)) / 365);
  const doy = doe - (365 * yoe + Math.floor(yoe / 4) - Math.floor(yoe / 100));
  const mp = Math.floor((5 * doy + 2) / 153);
  const d = doy - Math.floor((153 * mp + 2) / 5) + 1;
  const m = mp < 10 ? mp + 3 : mp - 9;
  return [yoe + era * 400 + (m <= 2 ? 1 : 0), m, d];
}

/*
 * Parsed straight from the characters every time: cheaper than looking the string up in a memo
 * (which has to hash it), most of all on the first read of freshly loaded records.
 */
function parse(date: string): number | null {
  if (typeof date !== 'string' || date.length !== 10 || date.charCodeAt(4) !== 45 || date.charCodeAt(7) !== 45) return null; // 45: '-'
  const y = digits(date, 0, 4);
  const m = digits(date, 5, 7);
  const d = digits(date, 8, 10);
  if (y < 0 || m < 1 || m > 12 || d < 1) return null;
  const dim = m === 2 && isLeapYear(y) ? 29 : DAYS_IN_MONTH[m - 1];
  if (d > dim) return null;
  return daysFromCivil(y, m, d);
}

/**
 * Parses 'YYYY-MM-DD' to a day number (days since 1970-01-01 in the proleptic Gregorian
 * calendar). Throws on a malformed or impossible date (e.g. '2026-02-30').
 */
export function toDayNumber(date: IsoDate): number {
  const n = parse(date);
  if (n === null) throw new RangeError(`not a calendar date: ${date}`);
  return n;
}

/** Day number (days since 1970-01-01) back to 'YYYY-MM-DD'. Non-integers are rounded. */
export function fromDayNumber(day: number): IsoDate {
  const [y, m, d] = civilFromDays(Math.round(day));
  return `${String(y).padStart(4, '0')}-${m < 10 ? '0' : ''}${m}-${d < 10 ? '0' : ''}${d}`;
}

/** Day number of a valid 'YYYY-MM-DD' calendar date, null for anything else (never throws). */
export function dayNumberOrNull(date: string): number | null {
  return parse(date);
}

/** True when the string is a valid 'YYYY-MM-DD' calendar date. */
export function isIsoDate(date: string): boolean {
  return parse(date) !== null;
}

/** Whole days from `from` to `to` (positive when `to` is later). */
export function daysBetween(from: IsoDate, to: IsoDate): number {
  return toDayNumber(to) - toDayNumber(from);
}

/** The date `days` days after `date` (negative goes back). Fractional days are rounded. */
export function addDays(date: IsoDate, days: number): IsoDate {
  return fromDayNumber(toDayNumber(date) + Math.round(days));
}

/**
 * Day of the growth season: days since the season start (1st of `seasonStartMonth`, 1–12)
 * on or before `date`. Used for the naive "same day of the season as last year" forecast.
 */
export function dayOfSeason(date: IsoDate, seasonStartMonth = 1): number {
  const day = toDayNumber(date);
  const y = Number(date.slice(0, 4));
  let start = daysFromCivil(y, seasonStartMonth, 1);
  if (start > day) start = daysFromCivil(y - 1, seasonStartMonth, 1);
  return day - start;
}

/** The growth year a date falls in, for a collection whose season starts in `startMonth` (1–12). */
export function seasonOf(date: IsoDate, startMonth: number): number {
  const y = digits(date, 0, 4);
  return digits(date, 5, 7) >= startMonth ? y : y - 1;
}

/**
 * The same month and day `years` later (earlier when negative); 29 February becomes 28 February
 * in a common year. How a past season's date is carried to another season.
 */
export function shiftYears(date: IsoDate, years: number): IsoDate {
  const y = Number(date.slice(0, 4)) + years;
  let md = date.slice(5);
  if (md === '02-29' && !(y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0))) md = '02-28';
  return `${String(y).padStart(4, '0')}-${md}`;
}

/** Day number of `shiftYears(date, years)` without building the string (date must be valid). */
export function shiftedDayNumber(date: IsoDate, years: number): number {
  const y = digits(date, 0, 4) + years;
  const m = digits(date, 5, 7);
  let d = digits(date, 8, 10);
  if (m === 2 && d === 29 && !isLeapYear(y)) d = 28;
  return daysFromCivil(y, m, d);
}

/** Compares two ISO dates; negative when a is earlier. Lexical order equals date order. */
export function compareDates(a: IsoDate, b: IsoDate): number {
  return a < b ? -1 : a > b ? 1 : 0;
}
