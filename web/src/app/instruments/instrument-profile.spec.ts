import { profileSchema } from '@equilight/contracts';
import { fileNamePatternProblem, runIdFromFileName } from './instrument-profile';

describe('file-name pattern', () => {
  it('accepts a pattern with a first capture group or a group named run', () => {
    expect(fileNamePatternProblem('^run-(\\d+)\\.csv$')).toBeNull();
    expect(fileNamePatternProblem('^(?<run>[A-Z]{2}\\d{3})_')).toBeNull();
  });

  it('refuses an invalid expression and one without a group, saying why', () => {
    expect(fileNamePatternProblem('run-(\\d+')).toMatch(/^Not a valid regular expression/);
    expect(fileNamePatternProblem('^run-\\d+\\.csv$')).toMatch(/capture group/);
  });

  it('takes the run id from the named group first, else the first group', () => {
    expect(runIdFromFileName('^(plate)-(?<run>\\d+)', 'plate-0412.csv')).toBe('0412');
    expect(runIdFromFileName('^kinetics_(\\w+?)_', 'kinetics_T25a_export.csv')).toBe('T25a');
    expect(runIdFromFileName('^kinetics_(\\w+?)_', 'other.csv')).toBeNull();
    expect(runIdFromFileName('^kinetics_\\w+', 'kinetics_x.csv')).toBeNull();
  });
});

describe('the profile response schema', () => {
  it('refuses a record with an unknown kind', () => {
    expect(profileSchema.safeParse({ id: 1, name: 'x', kind: 'fluorimeter' }).success).toBe(false);
    expect(profileSchema.safeParse(null).success).toBe(false);
  });
});
