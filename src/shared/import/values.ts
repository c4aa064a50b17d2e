/**
 * Reading a spreadsheet's cells: dates in the usual written forms, lengths with or without a
 * unit, counts and sheath states. Pure; every function answers either a value or a reason the
 * grower can act on.
 */
import type { LengthUnit } from './fields';

export type DateOrder = 'dmy' | 'mdy';
export type Read<T> = { ok: true; value: T } | { ok: false; reason: string };

const ok = <T>(value: T): Read<T> => ({ ok: true, value });
const fail = <T>(reason: string): Read<T> => ({ ok: false, reason });

/** 1 in = 25.4 mm exactly (international yard and pound agreement, 1959). */
export const MM_PER_INCH = 25.4;
export const MM_PER: Record<LengthUnit, number> = { mm: 1, cm: 10, in: MM_PER_INCH };

const ISO = /^(\d{4})[-/.](\d{1,2})[-/.](\d{1,2})(?:[T ]\d{1,2}:\d{2}(?::\d{2}(?:\.\d+)?)?Z?)?$/;
const DAY_MONTH = /^(\d{1,2})[/.-](\d{1,2})[/.-](\d{2}|\d{4})(?: \d{1,2}:\d{2}(?::\d{2})?)?$/;

function daysInMonth(year: number, month: number): number {
  if (month === 2) return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0 ? 29 : 28;
  return [4, 6, 9, 11].includes(month) ? 30 : 31;
}

const pad = (n: number) => String(n).padStart(2, '0');

function calendar(year: number, month: number, day: number, text: string): Read<string> {
  if (month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month)) return fail(`"${text}" is not a real date`);
  return ok(`${year}-${pad(month)}-${pad(day)}`);
}

/**
 * A two-digit year: this century unless that would be after `latestYear` (then the last).
 * A record from "98" is from 1998; one from "24", 2024.
 */
export function fullYear(twoDigits: number, latestYear: number): number {
  const year = 2000 + twoDigits;
  return year > latestYear ? year - 100 : year;
}

/**
 * The day and month parts of a date written D/M/Y or M/D/Y (slash, dot or dash), or null for
 * any other form. ISO dates (year first) are never ambiguous and answer null.
 */
export function dayMonthParts(text: string): { first: number; second: number } | null {
  const m = DAY_MONTH.exec(text.trim());
  return m ? { first: Number(m[1]), second: Number(m[2]) } : null;
}

/**
 * Reads a date cell: ISO `YYYY-MM-DD` (also with / or . and an ignored time of day), or day and
 * month first in `order` with a 2- or 4-digit year. Without an order, a date whose day and month
 * could swap is refused with a reason; one that cannot (25/03/2024, 05/05/2024) is read anyway.
 */
export function parseSheetDate(text: string, order: DateOrder | null, latestYear: number): Read<string> {
  const t = text.trim();
  const iso = ISO.exec(t);
  if (iso) return calendar(Number(iso[1]), Number(iso[2]), Number(iso[3]), t);
  const m = DAY_MONTH.exec(t);
  if (!m) return fail(`"${t}" is not a date; write it as 2024-03-25, 25/03/2024 or 03/25/2024`);
  const a = Number(m[1]);
  const b = Number(m[2]);
  const year = m[3].length === 2 ? fullYear(Number(m[3]), latestYear) : Number(m[3]);
  let use = order;
  if (!use) {
    if (a > 12 && b <= 12) use = 'dmy';
    else if (b > 12 && a <= 12) use = 'mdy';
    else if (a === b) use = 'dmy';
    else return fail(`"${t}" could be day/month or month/day; choose the file's date order`);
  }
  const [day, month] = use === 'dmy' ? [a, b] : [b, a];
  const read = calendar(year, month, day, t);
  if (!read.ok && month > 12) return fail(`"${t}" is not a real date as ${use === 'dmy' ? 'day/month/year' : 'month/day/year'}`);
  return read;
}

export interface DateOrderEvidence {
  /** Dates that can only be day first (first part above 12). */
  dayFirst: number;
  /** Dates that can only be month first (second part above 12). */
  monthFirst: number;
  /** Dates that read both ways and mean different days (03/04/2024). */
  either: number;
}

export const noEvidence = (): DateOrderEvidence => ({ dayFirst: 0, monthFirst: 0, either: 0 });

/** Adds one date cell to the evidence for the file's date order. */
export function weighDateOrder(evidence: DateOrderEvidence, text: string): void {
  const parts = dayMonthParts(text);
  if (!parts) return;
  const { first, second } = parts;
  if (first > 12 && second <= 12) evidence.dayFirst += 1;
  else if (second > 12 && first <= 12) evidence.monthFirst += 1;
  else if (first !== second && first <= 12 && second <= 12) evidence.either += 1;
}

/**
 * The order a file's dates are written in. The grower's choice always wins. Otherwise a file
 * whose dates all read one way only is that way; one with no day/month dates needs none; and
 * a file where every such date reads both ways (or where both kinds appear) needs the grower
 * to choose: `needsChoice`.
 */
export function resolveDateOrder(evidence: DateOrderEvidence, chosen: DateOrder | null | undefined): { order: DateOrder | null; detected: DateOrder | null; needsChoice: boolean } {
  const detected = evidence.dayFirst > 0 && evidence.monthFirst === 0 ? 'dmy' : evidence.monthFirst > 0 && evidence.dayFirst === 0 ? 'mdy' : null;
  if (chosen) return { order: chosen, detected, needsChoice: false };
  if (detected) return { order: detected, detected, needsChoice: false };
  const needsChoice = evidence.either > 0 || (evidence.dayFirst > 0 && evidence.monthFirst > 0);
  return { order: null, detected: null, needsChoice };
}

const LENGTH = /^(\d+(?:[.,]\d+)?|[.,]\d+)\s*(mm|millimet(?:re|er)s?|cm|centimet(?:re|er)s?|in|inch|inches|"|″)?$/i;

function cellUnit(word: string | undefined): LengthUnit | null {
  if (!word) return null;
  const w = word.toLowerCase();
  if (w.startsWith('mm') || w.startsWith('milli')) return 'mm';
  if (w.startsWith('cm') || w.startsWith('centi')) return 'cm';
  return 'in';
}

/** A decimal written with a point, or with a comma before one or two digits ("4,5"). */
function decimal(text: string): number | null {
  const t = text.replace(/^,/, '0,');
  if (/,\d{3}$/.test(t)) return null;
  const n = Number(t.replace(',', '.'));
  return Number.isFinite(n) ? n : null;
}

/**
 * A length cell in millimetres, rounded to 0.01 mm (inches × 25.4 leave float noise). A unit in
 * the cell ("12 cm", '4.5"') wins over `unit`, the column's or the file's; with neither, the
 * answer asks for the unit (`needsUnit`).
 */
export function parseLength(text: string, unit: LengthUnit | null): Read<number> & { needsUnit?: boolean } {
  const t = text.trim();
  const m = LENGTH.exec(t);
  const n = m ? decimal(m[1]) : null;
  if (!m || n === null) return fail(`"${t}" is not a length; write a number, optionally with mm, cm or in`);
  const use = cellUnit(m[2]) ?? unit;
  if (!use) return { ok: false, reason: `"${t}" has no unit; choose the file's height unit`, needsUnit: true };
  return ok(Math.round(n * MM_PER[use] * 100) / 100);
}

/** A whole number from 0 to `max` ("3", "3.0"); `what` names it in the reason. */
export function parseCount(text: string, what: string, max: number): Read<number> {
  const t = text.trim();
  const n = /^\d+(?:\.0+)?$/.test(t) ? Number(t) : NaN;
  if (/^-\d/.test(t)) return fail(`${what} cannot be negative`);
  if (!Number.isInteger(n)) return fail(`${what} is a whole number, not "${t}"`);
  if (n > max) return fail(`${what} above ${max} is not plausible`);
  return ok(n);
}

export const SHEATH_STATES = ['none', 'forming', 'empty', 'budded', 'dry'] as const;
export type SheathState = (typeof SHEATH_STATES)[number];

/** A sheath state, in any letter case. */
export function parseSheath(text: string): Read<SheathState> {
  const t = text.trim().toLowerCase();
  const hit = SHEATH_STATES.find((s) => s === t);
  return hit ? ok(hit) : fail(`"${text.trim()}" is not a sheath state; use none, forming, empty, budded or dry`);
}
