import { Pipe, type PipeTransform } from '@angular/core';
import { DASH } from './number-format';

/**
 * The app's one way to show a moment: the reader's own locale (the browser's language), the date in its
 * medium form and the time to the minute ("2 Dec 2026, 09:30" in en-GB, "Dec 2, 2026, 9:30 AM" in en-US).
 * The API, CSV, XLSX and PDF keep ISO 8601; only the screen uses this.
 */
export type DateShown = 'date-time' | 'date' | 'time';

const OPTIONS: Record<DateShown, Intl.DateTimeFormatOptions> = {
  'date-time': { dateStyle: 'medium', timeStyle: 'short' },
  date: { dateStyle: 'medium' },
  time: { timeStyle: 'short' },
};

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatter(shown: DateShown, locale?: string, timeZone?: string): Intl.DateTimeFormat {
  const key = `${shown}|${locale ?? ''}|${timeZone ?? ''}`;
  let f = formatters.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat(locale, { ...OPTIONS[shown], ...(timeZone ? { timeZone } : {}) });
    formatters.set(key, f);
  }
  return f;
}

/**
 * A moment (ISO 8601 text, a Date or epoch milliseconds) as people read it; "—" when there is none or
 * it is not a date. `locale` and `timeZone` default to the browser's (tests pass them).
 */
export function formatDateTime(
  value: string | number | Date | null | undefined,
  shown: DateShown = 'date-time',
  locale?: string,
  timeZone?: string,
): string {
  if (value === null || value === undefined || value === '') return DASH;
  const date = value instanceof Date ? value : new Date(value);
  if (Number.isNaN(date.getTime())) return DASH;
  return formatter(shown, locale, timeZone).format(date);
}

/**
 * Makes the browser's date formatters, one per call, in idle moments at start: each costs 5–10 ms (the
 * first loads the locale's calendar data), which would otherwise lengthen the first render that shows a
 * date. Returns how many are left to make, so the caller can ask for another idle moment.
 */
export function warmDateFormat(): number {
  const shown = (Object.keys(OPTIONS) as DateShown[]).filter((s) => !formatters.has(`${s}||`));
  if (shown.length) formatter(shown[0]!).format(0);
  return Math.max(0, shown.length - 1);
}

/** `{{ at | eqDate }}`, `{{ at | eqDate: 'date' }}`, `{{ at | eqDate: 'time' }}`: see `formatDateTime`. */
@Pipe({ name: 'eqDate' })
export class DateTimePipe implements PipeTransform {
  transform(value: string | number | Date | null | undefined, shown: DateShown = 'date-time'): string {
    return formatDateTime(value, shown);
  }
}
