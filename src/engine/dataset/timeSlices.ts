// Turning a node's time value into its slice key, and ordering slices in time.
//
// Accepted values: YYYY, YYYY-MM, YYYY-MM-DD, or a date-time starting with YYYY-MM-DD
// followed by "T" or a space (the calendar date as written decides the slice, so an offset
// such as "+02:00" never moves a node into a neighbouring day); with granularity "step", an
// integer. A value coarser than the granularity (e.g. "2021" for months) is an error.
import type { SliceGranularity } from './types';

export const SLICE_GRANULARITIES: readonly SliceGranularity[] = ['year', 'quarter', 'month', 'week', 'day', 'step'];

export interface SliceKey {
  key: string;
  /** Sort position: slices compare by this number. */
  order: number;
}

export type SliceParse = SliceKey | { error: string };

/** How fine a date value is: 0 year, 1 month, 2 day (date-times count as days). */
export type DatePrecision = 0 | 1 | 2;

export interface ParsedDate {
  year: number;
  month: number; // 1-12, 1 when absent
  day: number; // 1-31, 1 when absent
  precision: DatePrecision;
}

const DATE_PATTERN = /^(\d{4})(?:-(\d{2})(?:-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,]\d+)?)?(?:Z|[+-]\d{2}(?::?\d{2})?)?)?)?)?$/;

export function parseIsoDate(value: string): ParsedDate | { error: string } {
  const m = DATE_PATTERN.exec(value.trim());
  if (!m) return { error: `'${value}' is not an ISO-8601 date (YYYY, YYYY-MM, YYYY-MM-DD or a date-time)` };
  const year = Number(m[1]);
  const month = m[2] === undefined ? 1 : Number(m[2]);
  const day = m[3] === undefined ? 1 : Number(m[3]);
  if (month < 1 || month > 12) return { error: `'${value}' has month ${month}: months run from 01 to 12` };
  if (day < 1 || day > daysInMonth(year, month))
    return { error: `'${value}' is not a calendar date: ${year}-${pad2(month)} has ${daysInMonth(year, month)} days` };
  if (m[4] !== undefined) {
    const hour = Number(m[4]);
    const minute = Number(m[5]);
    const second = m[6] === undefined ? 0 : Number(m[6]);
    if (hour > 24 || minute > 59 || second > 60) return { error: `'${value}' has an invalid time of day` };
  }
  const precision: DatePrecision = m[3] !== undefined ? 2 : m[2] !== undefined ? 1 : 0;
  return { year, month, day, precision };
}

const REQUIRED_PRECISION: Record<Exclude<SliceGranularity, 'step'>, DatePrecision> = { year: 0, quarter: 1, month: 1, week: 2, day: 2 };

/** Slice of one time value at the given granularity. */
export function sliceOf(value: string, granularity: SliceGranularity): SliceParse {
  if (granularity === 'step') {
    const text = value.trim();
    if (!/^[+-]?\d+$/.test(text)) return { error: `'${value}' is not an integer step (granularity "step")` };
    const step = Number(text);
    if (!Number.isSafeInteger(step)) return { error: `step '${value}' is too large` };
    return { key: String(step), order: step };
  }
  const date = parseIsoDate(value);
  if ('error' in date) return date;
  if (date.precision < REQUIRED_PRECISION[granularity]) {
    return {
      error: `'${value}' is coarser than the granularity "${granularity}": give at least ${REQUIRED_PRECISION[granularity] === 2 ? 'YYYY-MM-DD' : 'YYYY-MM'}`,
    };
  }
  return dateSlice(date, granularity);
}

export function dateSlice(date: ParsedDate, granularity: Exclude<SliceGranularity, 'step'>): SliceKey {
  const { year, month, day } = date;
  switch (granularity) {
    case 'year':
      return { key: String(year).padStart(4, '0'), order: year };
    case 'quarter': {
      const quarter = Math.floor((month - 1) / 3) + 1;
      return { key: `${String(year).padStart(4, '0')}-Q${quarter}`, order: year * 4 + quarter - 1 };
    }
    case 'month':
      return { key: `${String(year).padStart(4, '0')}-${pad2(month)}`, order: year * 12 + month - 1 };
    case 'week': {
      const { isoYear, week } = isoWeek(year, month, day);
      return { key: `${String(isoYear).padStart(4, '0')}-W${pad2(week)}`, order: isoYear * 53 + week - 1 };
    }
    case 'day': {
      return { key: `${String(year).padStart(4, '0')}-${pad2(month)}-${pad2(day)}`, order: daysFromCivil(year, month, day) };
    }
  }
}

/** ISO 8601 week date: weeks start on Monday; week 1 holds the year's first Thursday. */
export function isoWeek(year: number, month: number, day: number): { isoYear: number; week: number } {
  const days = daysFromCivil(year, month, day);
  const weekday = ((((days + 3) % 7) + 7) % 7) + 1; // 1970-01-01 was a Thursday; Monday = 1
  const thursday = days + 4 - weekday;
  let isoYear = year;
  if (thursday < daysFromCivil(year, 1, 1)) isoYear = year - 1;
  else if (thursday >= daysFromCivil(year + 1, 1, 1)) isoYear = year + 1;
  return { isoYear, week: Math.floor((thursday - daysFromCivil(isoYear, 1, 1)) / 7) + 1 };
}

/** Days since 1970-01-01 in the proleptic Gregorian calendar (no Date quirks for years < 100). */
export function daysFromCivil(year: number, month: number, day: number): number {
  const y = month <= 2 ? year - 1 : year;
  const era = Math.floor(y / 400);
  const yearOfEra = y - era * 400;
  const dayOfYear = Math.floor((153 * (month + (month > 2 ? -3 : 9)) + 2) / 5) + day - 1;
  const dayOfEra = yearOfEra * 365 + Math.floor(yearOfEra / 4) - Math.floor(yearOfEra / 100) + dayOfYear;
  return era * 146097 + dayOfEra - 719468;
}

/** Caches parses: many nodes share a time value. */
export class SliceParser {
  private readonly cache = new Map<string, SliceParse>();
  constructor(readonly granularity: SliceGranularity) {}

  parse(value: string): SliceParse {
    let result = this.cache.get(value);
    if (result === undefined) {
      result = sliceOf(value, this.granularity);
      if (this.cache.size < 1_000_000) this.cache.set(value, result);
    }
    return result;
  }
}

/** Sorts distinct slice keys in time order. */
export function sortSlices(slices: Iterable<SliceKey>): SliceKey[] {
  return [...slices].sort((a, b) => a.order - b.order);
}

function daysInMonth(year: number, month: number): number {
  if (month === 2) return (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0 ? 29 : 28;
  return [4, 6, 9, 11].includes(month) ? 30 : 31;
}

function pad2(n: number): string {
  return n < 10 ? `0${n}` : String(n);
}
