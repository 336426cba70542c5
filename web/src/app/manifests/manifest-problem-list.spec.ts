import { TestBed } from '@angular/core/testing';
import type { ManifestProblem } from './manifest';
import { ManifestProblemList } from './manifest-problem-list';

const PROBLEMS: ManifestProblem[] = [
  { row: 5, column: 'volume_b_mL', message: 'missing volume_b_mL: a mixture needs it' },
  {
    row: 3,
    column: 'role',
    message: 'unknown role "stdandard": expected one of blank, standard, unknown, mixture, control',
  },
  { row: 5, column: 'position', message: 'duplicate position B2: already on row 4' },
  { row: 4, column: 'concentration_M', message: 'must not be negative, found -0.001' },
  { row: 7, column: 'position', message: 'expected a position such as A1…P24 or C1, C2, …, found "Q30"' },
];

describe('ManifestProblemList', () => {
  async function setup(inputs: Record<string, unknown>) {
    const fixture = TestBed.createComponent(ManifestProblemList);
    for (const [k, v] of Object.entries(inputs)) fixture.componentRef.setInput(k, v);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const items = (testId: string) =>
      [...el.querySelectorAll(`[data-testid="${testId}"]`)].map((i) =>
        (i.textContent ?? '').replace(/\s+/g, ' ').trim(),
      );
    return { fixture, el, items };
  }

  it('lists every problem with its row and column, in file order', async () => {
    const { el, items } = await setup({ problems: PROBLEMS });
    expect(el.querySelector('#problems-heading')!.textContent).toContain('5 problems to fix');
    expect(items('problem')).toEqual([
      'Row 3, column role: unknown role "stdandard": expected one of blank, standard, unknown, mixture, control',
      'Row 4, column concentration_M: must not be negative, found -0.001',
      'Row 5, column position: duplicate position B2: already on row 4',
      'Row 5, column volume_b_mL: missing volume_b_mL: a mixture needs it',
      'Row 7, column position: expected a position such as A1…P24 or C1, C2, …, found "Q30"',
    ]);
    expect(el.textContent).toContain('The layout is compared once the problems are fixed.');
  });

  it('names a whole-row problem when it has no column', async () => {
    const { items } = await setup({
      problems: [{ row: 9, column: '', message: 'the row has 4 cells, the header 11' }],
    });
    expect(items('problem')).toEqual(['Row 9, whole row: the row has 4 cells, the header 11']);
  });

  it('lists mismatches with the layout by position', async () => {
    const { el, items } = await setup({
      mismatches: [
        {
          position: 'B10',
          message: 'B10: the layout has a standard here but the manifest has no sample for it',
        },
        {
          position: 'B2',
          message: 'B2: the layout has a standard here but the manifest says unknown (UNK-4)',
        },
      ],
    });
    expect(el.querySelector('#problems-heading')!.textContent).toContain('No problems found');
    expect(el.querySelector('#mismatches-heading')!.textContent).toContain('2 mismatches with the layout');
    expect(items('mismatch')).toEqual([
      'B2: B2: the layout has a standard here but the manifest says unknown (UNK-4)',
      'B10: B10: the layout has a standard here but the manifest has no sample for it',
    ]);
  });

  it('says so when everything matches', async () => {
    const { el } = await setup({});
    expect(el.textContent).toContain('No problems found');
    expect(el.textContent).toContain('No mismatches: every position matches the layout');
  });

  it('reports the picked problem when selectable', async () => {
    const { fixture, el } = await setup({ problems: PROBLEMS, selectable: true });
    const picked: ManifestProblem[] = [];
    fixture.componentInstance.problemSelected.subscribe((p) => picked.push(p));
    el.querySelectorAll<HTMLButtonElement>('button[data-testid="problem"]')[1].click();
    expect(picked).toEqual([PROBLEMS[3]]);
  });
});
