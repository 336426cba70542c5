import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { toObservable, toSignal } from '@angular/core/rxjs-interop';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import type {
  AnalysisSettings,
  ReactantSpectrumSetting,
  Reading,
  SampleDefinition,
} from '@equilight/analysis';
import { debounceTime, distinctUntilChanged, map, of, scan, startWith, switchMap } from 'rxjs';
import { K_STATUS_DISPLAY } from './equilibrium-panel';
import { formatNumber } from '../shared/format/number-format';
import { ResidualMap } from './residual-map';
import { ScatterChart } from '../shared/chart/scatter-chart';
import type { SpectraOutcome } from './spectra-compute';
import {
  DEFAULT_SPECTRA_OPTIONS,
  REACTANT_CHOICES,
  type SpectraOptions,
  candidateRows,
  hasSpectra,
  nmText,
  overlayChart,
  residualGrid,
  screeChart,
  shownFit,
  speciesChart,
  spectraHeadline,
  spectraSettings,
} from './spectra-model';
import { WhatIfRunner } from './what-if-runner';
import { TableScroll } from '../shared/table-scroll/table-scroll';

/** Quiet time after the last change before the whole-spectrum analysis runs again (it takes ~0.1–1 s). */
export const SPECTRA_DEBOUNCE_MS = 250;

interface SpectraState {
  running: boolean;
  outcome: SpectraOutcome | null;
}
const INITIAL_STATE: SpectraState = { running: true, outcome: null };

/**
 * The Spectra section: every mixture's spectrum, the singular values with the noise level, K of each
 * candidate fitted to all wavelengths (with its profile-likelihood interval and AIC ranking), the
 * recovered species spectra with standard errors and the residual map. Computed in the what-if worker from
 * the batch's readings with the page's settings (and what-if edits) and the section's own options.
 */
@Component({
  selector: 'eq-spectra-panel',
  imports: [
    TableScroll,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    ResidualMap,
    ScatterChart,
  ],
  templateUrl: './spectra-panel.html',
  styleUrls: ['./panels.scss', './spectra-panel.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SpectraPanel {
  private readonly runner = inject(WhatIfRunner);

  readonly readings = input.required<readonly Reading[]>();
  readonly samples = input.required<readonly SampleDefinition[]>();
  /** The batch's analysis settings with the page's what-if edits on top. */
  readonly settings = input.required<AnalysisSettings>();

  protected readonly options = signal<SpectraOptions>(DEFAULT_SPECTRA_OPTIONS);
  /** The candidate whose species spectra and residuals are shown; null = the best. */
  protected readonly chosenModel = signal<string | null>(null);
  protected readonly rangeError = signal<string | null>(null);
  protected readonly reactantChoices = REACTANT_CHOICES;

  protected readonly visible = computed(() => hasSpectra(this.readings()));

  private readonly request = computed(() =>
    this.visible()
      ? {
          readings: this.readings(),
          samples: this.samples(),
          settings: spectraSettings(this.settings(), this.options()),
        }
      : null,
  );

  /**
   * `running` while the worker computes; the latest answer stays on screen (dimmed) while a newer one is
   * computed, which is calmer than a blank.
   */
  private readonly state = toSignal(
    toObservable(this.request).pipe(
      debounceTime(SPECTRA_DEBOUNCE_MS),
      // What-if edits that do not touch the whole-spectrum fit (a single wavelength, ε) cost nothing.
      distinctUntilChanged(
        (a, b) =>
          a?.readings === b?.readings &&
          a?.samples === b?.samples &&
          JSON.stringify(a?.settings) === JSON.stringify(b?.settings),
      ),
      switchMap((r) =>
        r
          ? this.runner.runSpectra(r.readings, r.samples, r.settings).pipe(
              map((outcome): SpectraState => ({ running: false, outcome })),
              startWith<SpectraState>({ running: true, outcome: null }),
            )
          : of<SpectraState>({ running: false, outcome: null }),
      ),
      scan(
        (prev: SpectraState, next: SpectraState): SpectraState => ({
          running: next.running,
          outcome: next.outcome ?? (next.running ? prev.outcome : null),
        }),
        INITIAL_STATE,
      ),
    ),
    { initialValue: INITIAL_STATE },
  );
  protected readonly outcome = computed(() => this.state().outcome);
  protected readonly running = computed(() => this.state().running);
  protected readonly result = computed(() => this.outcome()?.result ?? null);
  protected readonly error = computed(() => this.outcome()?.error ?? null);

  protected readonly headline = computed(() => {
    const r = this.result();
    return r ? spectraHeadline(r) : null;
  });
  protected readonly rows = computed(() => {
    const r = this.result();
    return r ? candidateRows(r) : [];
  });
  protected readonly fit = computed(() => {
    const r = this.result();
    return r ? shownFit(r, this.chosenModel()) : null;
  });
  protected readonly overlay = computed(() => {
    const r = this.result();
    return r ? overlayChart(r) : null;
  });
  protected readonly scree = computed(() => {
    const r = this.result();
    return r ? screeChart(r) : null;
  });
  protected readonly species = computed(() => {
    const r = this.result();
    const f = this.fit();
    return r && f ? speciesChart(f, r.wavelengthsNm) : null;
  });
  protected readonly residuals = computed(() => {
    const r = this.result();
    const f = this.fit();
    return r && f ? residualGrid(r, f) : null;
  });
  protected readonly range = computed(() => {
    const w = this.result()?.wavelengthsNm ?? [];
    return w.length ? `${nmText(w[0])}–${nmText(w[w.length - 1])} nm` : '';
  });

  protected readonly statusDisplay = K_STATUS_DISPLAY;
  protected readonly fmt = formatNumber;

  protected setRange(fromText: string, toText: string): void {
    const parse = (t: string): number | null | undefined => {
      if (t.trim() === '') return null;
      const v = Number(t);
      return Number.isFinite(v) && v > 0 ? v : undefined;
    };
    const fromNm = parse(fromText);
    const toNm = parse(toText);
    if (fromNm === undefined || toNm === undefined) {
      this.rangeError.set('A wavelength is a positive number of nm, or empty for every wavelength.');
      return;
    }
    if (fromNm !== null && toNm !== null && fromNm >= toNm) {
      this.rangeError.set('The range starts before it ends: “from” must be below “to”.');
      return;
    }
    this.rangeError.set(null);
    this.options.update((o) => (o.fromNm === fromNm && o.toNm === toNm ? o : { ...o, fromNm, toNm }));
  }

  protected setNonNegative(nonNegativeSpectra: boolean): void {
    this.options.update((o) => ({ ...o, nonNegativeSpectra }));
  }

  protected setReactant(which: 'reactantA' | 'reactantB', value: ReactantSpectrumSetting): void {
    this.options.update((o) => ({ ...o, [which]: value }));
  }

  protected choose(model: string): void {
    this.chosenModel.set(model);
  }
}
