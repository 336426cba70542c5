import { formatFileSize } from './file-size-pipe';

describe('formatFileSize', () => {
  it('always names the unit, in decimal steps of 1000', () => {
    expect(formatFileSize(0)).toBe('0 B');
    expect(formatFileSize(999)).toBe('999 B');
    expect(formatFileSize(1000)).toBe('1.00 kB');
    expect(formatFileSize(12_400)).toBe('12.4 kB');
    expect(formatFileSize(812_345)).toBe('812 kB');
    expect(formatFileSize(3_070_000)).toBe('3.07 MB');
    expect(formatFileSize(10 * 1000 ** 3)).toBe('10.0 GB');
  });

  it('steps up a unit instead of showing 1000 of the smaller one', () => {
    expect(formatFileSize(999_960)).toBe('1.00 MB');
  });

  it('shows a dash for a count that is not a size', () => {
    expect(formatFileSize(-1)).toBe('—');
    expect(formatFileSize(Number.NaN)).toBe('—');
  });
});
