import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { fixtureAnalysis, fixtureBatch } from './analysis-fixture';
import { describeEdits, hasEdits, NO_EDITS, settingsPatch, whatIfSettings } from './what-if';
import { runWhatIf } from './what-if-compute';
import { WhatIfPanel } from './what-if-panel';

describe('what-if: a constant baseline in the fits', () => {
  it('is an edit the analysis gets, the banner names and the save sends', () => {
    const batch = fixtureBatch();
    const e = { ...NO_EDITS, fitBaseline: true };
    expect(hasEdits(e)).toBe(true);
    expect(whatIfSettings({ fitBaseline: false }, e).fitBaseline).toBe(true);
    expect(describeEdits(e)).toEqual(['Constant baseline fitted']);
    expect(settingsPatch(batch.settings, e)).toEqual({ fitBaseline: true });
  });

  it('runs the real analysis with the baseline fitted (invented batch)', () => {
    const a = fixtureAnalysis();
    const plain = runWhatIf(a.readings, a.samples, a.settings, { ...NO_EDITS, candidates: ['1:1'] });
    const fitted = runWhatIf(a.readings, a.samples, a.settings, {
      ...NO_EDITS,
      candidates: ['1:1'],
      fitBaseline: true,
    });
    expect(plain.result?.stoichiometry?.candidates[0].fit?.baseline).toBeNull();
    expect(fitted.result?.settings.fitBaseline).toBe(true);
    expect(fitted.result?.stoichiometry?.candidates[0].fit?.baseline).toEqual(expect.any(Number));
  });

  it('the panel shows the checkbox and emits its new state', async () => {
    TestBed.configureTestingModule({
      providers: [{ provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    const fixture = TestBed.createComponent(WhatIfPanel);
    fixture.componentRef.setInput('positions', []);
    fixture.componentRef.setInput('exclusions', []);
    fixture.componentRef.setInput('candidates', ['1:1']);
    fixture.componentRef.setInput('pathLengthCm', 1);
    const emitted: boolean[] = [];
    fixture.componentInstance.fitBaselineChange.subscribe((v) => emitted.push(v));
    await fixture.whenStable();
    // The analysis fields render in an idle moment after the rest of the panel.
    await new Promise((resolve) => setTimeout(resolve, 5));
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const box = el.querySelector<HTMLInputElement>('[data-testid="what-if-baseline"] input[type="checkbox"]');
    expect(box).not.toBeNull();
    expect(el.querySelector('[data-testid="what-if-baseline"]')?.textContent).toContain(
      'Fit a constant baseline',
    );
    expect(box?.checked).toBe(false);
    box?.click();
    expect(emitted).toEqual([true]);

    fixture.componentRef.setInput('readOnly', true);
    await fixture.whenStable();
    expect(box?.disabled).toBe(true);
  });
});
