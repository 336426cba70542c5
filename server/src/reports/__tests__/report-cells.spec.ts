import type { QcFlag } from '../../analysis';
import { decimals, measured, minute, num, ownFindings } from '../report-cells';

const flag = (code: QcFlag['code'], position: string | null, sampleId: string | null): QcFlag => ({
  code,
  severity: 'warning',
  message: '',
  position,
  sampleId,
  value: null,
  threshold: null,
});

describe('report cells', () => {
  it('when a moment is written in a report then it is ISO 8601 in UTC to the minute', () => {
    // ISO 8601-1:2019 §5.4.2 extended format, reduced to minutes, "Z" for UTC (from memory)
    const text = minute('2026-03-14T09:30:45.123Z');
    expect(text).toBe('2026-03-14T09:30Z');
    expect(text).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}Z$/);
    expect(minute('2026-03-14T11:30:00+02:00')).toBe('2026-03-14T09:30Z');
    expect(minute(null)).toBe('—');
  });

  it('when a value has a standard error then the spreadsheet value keeps two significant digits of the error (GUM §7.2.6)', () => {
    // JCGM 100:2008 (GUM) §7.2.6: quote the uncertainty to two significant digits and the value to the
    // same decimal place: 839.41 with u = 19 → 839; 0.0012347 with u = 0.000021 → 0.001235 (worked by hand).
    expect(measured(839.41, 19).value).toBe(839);
    expect(measured(0.0012347, 0.000021).value).toBe(0.001235);
    // Without an error: four significant digits, never binary noise.
    expect(measured(0.1 + 0.2, null).value).toBe(0.3);
    expect(num(0.1 + 0.2).value).toBe(0.3);
    expect(decimals(0.12345678, 4)).toEqual({ text: '0.1235', value: 0.1235 });
    expect(num(null)).toEqual({ text: '—', value: null });
  });

  it("when a finding names a replicate group's positions then every one of them, and its sample, own it", () => {
    const qc = [
      flag('replicate-cv-high', 'C10 C11', 'SMP-017'),
      flag('saturated-reading', 'C12', null),
      flag('k-not-constant', null, null),
    ];
    expect(ownFindings(qc, null, ['C11']).map((f) => f.code)).toEqual(['replicate-cv-high']);
    expect(ownFindings(qc, 'SMP-017', []).map((f) => f.code)).toEqual(['replicate-cv-high']);
    expect(ownFindings(qc, 'SMP-018', ['C12', 'C13']).map((f) => f.code)).toEqual(['saturated-reading']);
    expect(ownFindings(qc, null, ['C1'])).toEqual([]);
  });
});
