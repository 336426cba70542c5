import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import type { BatchResult } from '@equilight/analysis';
import { fixtureAnalysis } from './analysis-fixture';
import {
  lowerBoundAnalysis,
  notConvergedAnalysis,
  poorlyDeterminedAnalysis,
} from './analysis-variants-fixture';
import { moleRatioChart } from '../shared/chart/chart-data';
import { EquilibriumPanel } from './equilibrium-panel';
import { EPSILON_UNIT, formatKValue, formatNumber } from '../shared/format/number-format';
import { ScatterChart } from '../shared/chart/scatter-chart';
import { ScatterChartStub } from '../shared/chart/scatter-chart-stub';

const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

async function render(result: BatchResult): Promise<HTMLElement> {
  TestBed.configureTestingModule({
    providers: [{ provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
  });
  TestBed.overrideComponent(EquilibriumPanel, {
    remove: { imports: [ScatterChart] },
    add: { imports: [ScatterChartStub] },
  });
  const fixture = TestBed.createComponent(EquilibriumPanel);
  fixture.componentRef.setInput('result', result);
  await fixture.whenStable();
  return fixture.nativeElement as HTMLElement;
}

const kCells = (el: HTMLElement) =>
  [...el.querySelectorAll('[data-testid="candidate-k"]')].map((c) => text(c));

describe('equilibrium panel (real analyses of invented batches)', () => {
  it('states the batch K once with its unit and interval, the concentration-constant note once, and the ε source', async () => {
    const { result } = fixtureAnalysis();
    const el = await render(result);
    expect(text(el.querySelector('[data-testid="k-headline-text"]'))).toBe(result.headline!.text);
    expect(result.headline!.text).toMatch(/^\d+(\.\d+)? L·mol⁻¹ \(95 % CI [\d.]+ to [\d.]+\)$/);
    // Invented data made from K = 620 L/mol: the interval holds it.
    const [lo, hi] = result.headline!.kCi95 as [number, number];
    expect(lo).toBeLessThan(620);
    expect(hi).toBeGreaterThan(620);
    expect(text(el.querySelector('[data-testid="k-headline-status"]'))).toContain('determined');
    const note = el.textContent!.split('concentration constant').length - 1;
    expect(note).toBe(1);
    expect(text(el.querySelector('[data-testid="k-note"]'))).toContain(result.kNote);
    expect(text(el.querySelector('[data-testid="epsilon-value"]'))).toMatch(
      new RegExp(`^14\\d\\d(\\.\\d)? ± [\\d.]+ ${EPSILON_UNIT}$`),
    );
    expect(text(el.querySelector('[data-testid="epsilon-note"]'))).toBe(result.epsilonSource.note);
    // The long verdict is at the top of the page behind "Details", not repeated here.
    expect(el.querySelector('[data-testid="verdict-detail"]')).toBeNull();
    expect(text(el)).not.toContain(result.stoichiometry!.verdict);
  });

  it('lists the candidates in the order of the settings, not by rank, with the rank as a column', async () => {
    const { result } = fixtureAnalysis({ batch: {} });
    const reordered: BatchResult = {
      ...result,
      settings: { ...result.settings, candidates: ['2:1', '1:1', '1:2'] },
    };
    const el = await render(reordered);
    const rows = [...el.querySelectorAll('[data-testid="candidates-table"] tbody tr[data-model]')];
    expect(rows.map((r) => r.getAttribute('data-model'))).toEqual(['2:1', '1:1', '1:2']);
    const ranks = rows.map((r) => text(r.querySelector('[data-testid="candidate-rank"]')));
    const byModel = new Map(result.stoichiometry!.candidates.map((c) => [c.model, String(c.rank)]));
    expect(ranks).toEqual(['2:1', '1:1', '1:2'].map((m) => byModel.get(m)));
    expect(ranks[1]).toBe('1');

    // The default settings order (1:1, 1:2, 2:1) whatever the ranking.
    TestBed.resetTestingModule();
    const el2 = await render(result);
    const models = [...el2.querySelectorAll('[data-testid="candidates-table"] tbody tr[data-model]')].map(
      (r) => r.getAttribute('data-model'),
    );
    expect(models).toEqual(result.settings.candidates);
  });

  it('shows each candidate’s K with its unit and interval, ΔAIC, the ruled-out reason, and the free-ε cross-check beside it', async () => {
    const { result } = fixtureAnalysis();
    const el = await render(result);
    const oneToOne = result.stoichiometry!.candidates.find((c) => c.model === '1:1')!;
    const row = el.querySelector('[data-testid="candidates-table"] [data-model="1:1"]')!;
    expect(text(row.querySelector('[data-testid="candidate-k"]'))).toBe(
      `${formatKValue(oneToOne.fit)} L·mol⁻¹`,
    );
    expect(text(row.querySelector('[data-testid="candidate-interval"]'))).toMatch(
      /^95 % CI [\d.]+ to [\d.]+$/,
    );
    // The same interval digits as the headline text (one format).
    expect(result.headline!.text).toContain(
      text(row.querySelector('[data-testid="candidate-interval"]')).replace('95 % CI ', ''),
    );
    const free = text(row.querySelector('[data-testid="candidate-free-fit"]'));
    expect(oneToOne.freeFit).not.toBeNull();
    expect(free).toContain(`K ${formatKValue(oneToOne.freeFit)} L·mol⁻¹`);
    expect(free).toMatch(new RegExp(`ε 14\\d\\d(\\.\\d)? ${EPSILON_UNIT}`));
    expect(free).toContain('agrees with the held-ε fit');

    const ruledOut = el.querySelector('[data-model="1:2"]')!;
    const twoFit = result.stoichiometry!.candidates.find((c) => c.model === '1:2')!;
    expect(text(ruledOut)).toContain('ruled out');
    expect(text(ruledOut.querySelector('[data-testid="candidate-reason"]'))).toBe(twoFit.reason);
    expect(text(ruledOut)).toContain(twoFit.deltaAic!.toFixed(1));
    expect(text(ruledOut.querySelector('[data-testid="candidate-k"]'))).toContain('L²·mol⁻²');
    // The candidate's own notes are there, without repeating the cross-check sentence.
    const notes = text(el.querySelector('[data-notes-for="1:2"] [data-testid="candidate-notes"]'));
    for (const w of twoFit.warnings.filter((n) => !n.includes('cross-check'))) expect(notes).toContain(w);
    expect(notes).not.toContain('with ε fitted too (cross-check)');
  });

  it('a K that is only a lower bound reads as "> …", with no propagated ± and no bare number', async () => {
    const { result } = lowerBoundAnalysis();
    expect(result.headline!.status).toBe('lower-bound');
    // Invented data made from K = 10⁹ L/mol: the bound lies below it.
    expect(result.headline!.kLowerBound95!).toBeLessThan(1e9);
    const el = await render(result);
    const headline = text(el.querySelector('[data-testid="k-headline-text"]'));
    expect(headline).toBe(
      `> ${formatNumber(result.headline!.kLowerBound95, 2)} L·mol⁻¹ (95 % lower bound; too large to determine from these concentrations)`,
    );
    expect(text(el.querySelector('[data-testid="k-headline-status"]'))).toContain('lower bound');
    const row = el.querySelector('[data-model="1:1"]')!;
    expect(text(row.querySelector('[data-testid="candidate-k"]'))).toMatch(
      /^> [\d.]+ × 10[⁰¹²³⁴⁵⁶⁷⁸⁹]+ L·mol⁻¹$/,
    );
    expect(text(row.querySelector('[data-testid="candidate-status"]'))).toContain('lower bound');
    expect(text(row.querySelector('[data-testid="candidate-interval"]'))).toBe('one-sided 95 % lower bound');
    expect(el.querySelector('[data-testid="uncertainty"]')).toBeNull();
    expect(text(el.querySelector('[data-testid="uncertainty-none"]'))).toContain('K is lower bound');
  });

  it('a poorly determined K is shown as its interval, never as a value ± a percentage', async () => {
    const { result } = poorlyDeterminedAnalysis();
    expect(result.headline!.status).toBe('poorly-determined');
    const [lo, hi] = result.headline!.kCi95 as [number, number];
    // More than a decade wide, and it holds the K the invented data were made from (10⁸ L/mol).
    expect(Math.log10(hi / lo)).toBeGreaterThan(1);
    expect(lo).toBeLessThan(1e8);
    expect(hi).toBeGreaterThan(1e8);
    const el = await render(result);
    const interval = `${formatNumber(lo, 2)} and ${formatNumber(hi, 2)} L·mol⁻¹`;
    expect(text(el.querySelector('[data-testid="k-headline-text"]'))).toBe(
      `between ${interval} (poorly determined)`,
    );
    const row = el.querySelector('[data-model="1:1"]')!;
    expect(text(row.querySelector('[data-testid="candidate-k"]'))).toBe(
      `${formatNumber(lo, 2)} to ${formatNumber(hi, 2)} L·mol⁻¹`,
    );
    expect(text(row.querySelector('[data-testid="candidate-status"]'))).toContain('poorly determined');
    for (const k of [text(el.querySelector('[data-testid="k-headline-text"]')), ...kCells(el)]) {
      expect(k).not.toContain('±');
      expect(k).not.toContain('%');
    }
    expect(el.querySelector('[data-testid="uncertainty"]')).toBeNull();
  });

  it('a fit that did not converge shows words and no number, for the headline, the candidates and the cross-check', async () => {
    const { result } = notConvergedAnalysis();
    expect(result.headline!.status).toBe('not-converged');
    const el = await render(result);
    const headline = text(el.querySelector('[data-testid="k-headline-text"]'));
    expect(headline).toMatch(/^did not converge/);
    expect(headline).toBe(result.headline!.text);
    for (const cell of kCells(el)) expect(cell).toBe('—');
    for (const status of el.querySelectorAll('[data-testid="candidate-status"]'))
      expect(text(status)).toContain('did not converge');
    for (const free of el.querySelectorAll('[data-testid="candidate-free-fit"]')) {
      expect(text(free)).toContain('did not converge');
      expect(text(free)).not.toContain('ε');
      expect(text(free)).not.toContain('agrees');
    }
    expect(el.querySelector('[data-testid="uncertainty"]')).toBeNull();
  });

  it("shows the mole-ratio cross-check beside Job's, with a plot each, and no disagreement it cannot support", async () => {
    const { result } = fixtureAnalysis();
    const el = await render(result);
    const job = el.querySelector('[data-testid="job-check"]')!;
    const mr = el.querySelector('[data-testid="mole-ratio-check"]')!;
    expect(job.querySelector('canvas[role="img"]')).not.toBeNull();
    expect(mr.querySelector('canvas[role="img"]')).not.toBeNull();
    expect(text(job.querySelector('[data-testid="job-nearest"]'))).toBe(result.job!.nearestModel);
    expect(text(mr.querySelector('[data-testid="mole-ratio-break"]'))).toBe(
      formatNumber(result.moleRatio!.breakRatio),
    );
    // In this invented batch the ligand-excess series holds no combining ratio (B stays in excess): its
    // break names no stoichiometry, so it raises no disagreement either.
    expect(result.moleRatio!.nearestModel).toBeNull();
    expect(text(mr.querySelector('[data-testid="mole-ratio-nearest"]'))).toBe('—');
    expect(result.qc.some((f) => f.code === 'mole-ratio-disagrees')).toBe(false);
    expect(mr.querySelector('[data-testid="mole-ratio-disagrees"]')).toBeNull();
    expect(job.querySelector('[data-testid="job-disagrees"]')).toBeNull();
  });

  it('shows propagation only for a determined K, with the ε share beside the others', async () => {
    const { result } = fixtureAnalysis();
    const el = await render(result);
    const shares = text(el.querySelector('[data-testid="uncertainty-shares"]'));
    expect(shares).toMatch(/absorbance \d+ % · pipette \d+ % · flask \d+ % · stock \d+ % · ε \d+ %/);
    const c = result.uncertainty!.propagation!.contributions;
    // The shares of a variance sum to 1 (GUM §5.1.2: the combined variance is their sum).
    expect(c.absorbance + c.pipette + c.flask + c.stock + c.epsilon).toBeCloseTo(1, 9);
    expect(shares).toContain(`ε ${Math.round(c.epsilon * 100)} %`);
  });
});

describe('mole-ratio chart', () => {
  it('plots the series by varied ÷ fixed ratio and draws the two lines meeting at the break', () => {
    const { result } = fixtureAnalysis();
    const mr = result.moleRatio!;
    const chart = moleRatioChart(mr, result.mixtures);
    expect(chart.series[0].points).toHaveLength(mr.sampleIds.length);
    const rising = chart.series.find((s) => s.label === 'Rising line')!;
    const plateau = chart.series.find((s) => s.label === 'Plateau')!;
    expect(rising.points[1].x).toBe(mr.breakRatio);
    expect(plateau.points[0].x).toBe(mr.breakRatio);
    expect(rising.points[1].y).toBeCloseTo(plateau.points[0].y, 6);
    expect(chart.xTitle).toBe(`Mole ratio ${mr.varied}₀/${mr.fixed}₀`);
  });
});
