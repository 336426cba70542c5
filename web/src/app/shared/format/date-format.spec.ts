import { DateTimePipe, formatDateTime } from './date-format';

describe('formatDateTime', () => {
  const at = '2026-12-02T09:30:45.000Z';

  // Expected strings: the CLDR medium date and short time patterns of each locale (from memory), as
  // Node's ICU writes them; spaces ICU puts before "AM" may be narrow no-break spaces.
  const plain = (s: string) => s.replace(/[\u202f\u00a0]/g, ' ');

  it('when the reader is British then the date reads day month year and the time 24-hour, to the minute', () => {
    expect(plain(formatDateTime(at, 'date-time', 'en-GB', 'UTC'))).toBe('2 Dec 2026, 09:30');
  });

  it('when the reader is American then month first and a 12-hour clock', () => {
    expect(plain(formatDateTime(at, 'date-time', 'en-US', 'UTC'))).toBe('Dec 2, 2026, 9:30 AM');
  });

  it('when the reader is German then the date uses dots', () => {
    expect(plain(formatDateTime(at, 'date-time', 'de-DE', 'UTC'))).toBe('02.12.2026, 09:30');
  });

  it('when only the date or the time is asked for then only that is written', () => {
    expect(plain(formatDateTime(at, 'date', 'en-GB', 'UTC'))).toBe('2 Dec 2026');
    expect(plain(formatDateTime(at, 'time', 'en-GB', 'Europe/Berlin'))).toBe('10:30');
  });

  it('when there is no date or it does not parse then a dash is shown', () => {
    expect(formatDateTime(null)).toBe('—');
    expect(formatDateTime(undefined)).toBe('—');
    expect(formatDateTime('')).toBe('—');
    expect(formatDateTime('not a date')).toBe('—');
  });

  it('when the pipe is used then it writes what the function writes, in the browser locale', () => {
    expect(new DateTimePipe().transform(at)).toBe(formatDateTime(at));
    expect(new DateTimePipe().transform(at)).not.toContain('T09');
  });
});
