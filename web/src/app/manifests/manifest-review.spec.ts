import { HttpErrorResponse } from '@angular/common/http';
import type { ManifestCheck } from './manifest';
import { NOT_CHECKED, changedReview, checkedReview, refusedReview } from './manifest-review';

const CHECK: ManifestCheck = {
  source: 'form',
  fileName: null,
  layoutId: 4,
  layoutVersion: 2,
  samples: [{ position: 'A1', sampleId: 'BLK-1', role: 'blank' }],
  problems: [{ row: 3, column: 'role', message: 'unknown role "blnk"' }],
  mismatches: [],
};

const refusal = (code: string, details: unknown) =>
  new HttpErrorResponse({ status: 422, error: { error: { code, message: 'refused', details } } });

describe('manifest review', () => {
  it('marks a checked list stale after an edit, once, and leaves an unchecked one alone', () => {
    expect(changedReview(NOT_CHECKED)).toBe(NOT_CHECKED);
    const checked = checkedReview(CHECK);
    expect(checked).toMatchObject({ checked: true, stale: false, problems: CHECK.problems });
    const stale = changedReview(checked);
    expect(stale).toMatchObject({ checked: true, stale: true, result: CHECK });
    expect(changedReview(stale)).toBe(stale);
  });

  it('offers to save anyway only when the server refused for mismatches alone, until the next edit', () => {
    const mismatch = { position: 'B1', message: 'standard in the layout, unknown in the manifest' };
    const offered = refusedReview(
      checkedReview(CHECK),
      refusal('manifest_mismatch', { mismatches: [mismatch] }),
    );
    expect(offered).toMatchObject({ problems: [], mismatches: [mismatch], offerAccept: true, result: CHECK });
    expect(changedReview(offered)).toMatchObject({ offerAccept: false, stale: true });

    const problem = { row: 5, column: 'position', message: 'Z99 is not on a 96-well plate' };
    expect(
      refusedReview(NOT_CHECKED, refusal('invalid_manifest', { problems: [problem], mismatches: [] })),
    ).toMatchObject({ problems: [problem], checked: true, offerAccept: false });
    const other = new HttpErrorResponse({
      status: 409,
      error: { error: { code: 'conflict', message: 'taken' } },
    });
    expect(refusedReview(offered, other)).toBe(offered);
  });
});
