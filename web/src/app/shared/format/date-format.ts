/**
 * The app's one date style on screen: ISO 8601 date and 24-hour time to the minute, in the viewer's time
 * zone ("2031-05-02 08:11"); the same pattern for Angular's date pipe where a template uses it. Exports
 * and the API keep full ISO 8601 with its offset.
 */
export const DATE_TIME_PATTERN = 'yyyy-MM-dd HH:mm';

const two = (n: number): string => String(n).padStart(2, '0');

/** "2031-05-02 08:11" in local time; a dash for nothing or a value that is not a date. */
export function formatDateTime(value: string | Date | null | undefined): string {
  if (value === null || value === undefined) return '—';
  const d = value instanceof Date ? value : new Date(value);
  if (Number.isNaN(d.getTime())) return '—';
  return `${d.getFullYear()}-${two(d.getMonth() + 1)}-${two(d.getDate())} ${two(d.getHours())}:${two(d.getMinutes())}`;
}
