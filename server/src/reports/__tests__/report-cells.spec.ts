import type { QcFlag } from '../../analysis';
import { decimals, measured, num, ownFindings } from '../report-cells';

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
