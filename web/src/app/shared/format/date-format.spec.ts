import { formatDate } from '@angular/common';
import { DATE_TIME_PATTERN, formatDateTime } from './date-format';

describe('formatDateTime', () => {
  it('writes ISO 8601 date and 24-hour time to the minute, in local time, as Angular formats the pattern', () => {
    for (const iso of ['2031-05-02T08:11:59.900Z', '2031-12-31T23:59:00Z', '2032-01-01T00:00:00+05:30']) {
      // Angular's own formatter (a general-purpose library) reads the same pattern the same way.
      expect(formatDateTime(iso)).toBe(formatDate(iso, DATE_TIME_PATTERN, 'en-US'));
    }
    expect(formatDateTime(new Date(2031, 4, 2, 8, 5))).toBe('2031-05-02 08:05');
  });

  it('writes a dash for nothing or something that is not a date', () => {
    expect(formatDateTime(null)).toBe('—');
    expect(formatDateTime(undefined)).toBe('—');
    expect(formatDateTime('yesterday-ish')).toBe('—');
  });
});
