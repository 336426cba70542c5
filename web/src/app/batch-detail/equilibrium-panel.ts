import { ChangeDetectionStrategy, Component, computed, input, linkedSignal } from '@angular/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import {
  type BatchResult,
  type CandidateResult,
  crossCheckNotes,
  type GlobalFitResult,
  type IceRow,
  intervalsOverlap,
  type KStatus,
  type MixtureResult,
} from '@equilight/analysis';
import { jobChart, moleRatioChart } from '../shared/chart/chart-data';
import {
  DASH,
  EPSILON_UNIT,
  formatAbsorbance,
  formatK,
  formatKValue,
  formatNumber,
  formatPercent,
  formatQuantity,
  kUnitOf,
  significantDigits,
} from '../shared/format/number-format';
import { ScatterChart } from '../shared/chart/scatter-chart';
import { TableScroll } from '../shared/table-scroll/table-scroll';

export interface IceTable {
  mixture: MixtureResult;
  row: IceRow | null;
  a: number;
  b: number;
}

/** The per-mixture ICE table under one candidate: initial, change (−a·x, −b·x, +x), equilibrium. */
export function iceTablesFor(mixtures: readonly MixtureResult[], model: string): IceTable[] {
  const [a, b] = model.split(':').map(Number);
  return mixtures.map((mixture) => ({
    mixture,
    row: mixture.ice.find((r) => r.model === model) ?? null,
    a,
    b,
  }));
}

/** What is known of a K, in words, with an icon so colour is never the only cue. */
export const K_STATUS_DISPLAY: Record<KStatus, { label: string; icon: string }> = {
  determined: { label: 'determined', icon: 'check_circle' },
  'poorly-determined': { label: 'poorly determined', icon: 'unfold_more' },
  'lower-bound': { label: 'lower bound', icon: 'north' },
  'upper-bound': { label: 'upper bound', icon: 'south' },
  'not-converged': { label: 'did not converge', icon: 'sync_problem' },
  'not-determined': { label: 'not determined', icon: 'help_outline' },
};

/** K of one fit for a table cell: the value (or bound, or interval) with its unit; a failed fit has none. */
export function kCell(fit: GlobalFitResult | null): string {
  const value = formatKValue(fit);
  if (!fit || value === DASH) return DASH;
  return `${value} ${fit.kUnit || kUnitOf(fit.model)}`;
}

/** The interval or bound behind a K cell, in words ("95 % CI 613 to 629", "one-sided 95 % lower bound"). */
export function kIntervalText(fit: GlobalFitResult | null): string {
  if (!fit) return 'no global fit';
  const [lo, hi] = fit.kCi95 ?? [null, null];
  switch (fit.status) {
    case 'determined': {
      if (fit.k === null || lo === null || hi === null) return 'no interval';
      // The digits formatK uses: two significant digits of the standard uncertainty (GUM §7.2.6).
      const d = significantDigits(fit.k, (hi - lo) / 3.92);
      return `95 % CI ${formatNumber(lo, d)} to ${formatNumber(hi, d)}`;
    }
    case 'poorly-determined':
      return '95 % interval, wider than a decade';
    case 'lower-bound':
      return 'one-sided 95 % lower bound';
    case 'upper-bound':
      return 'one-sided 95 % upper bound';
    default:
      return fit.message || 'no K';
  }
}

export interface CandidateRow {
  model: string;
  rank: number;
  kUnit: string;
  k: string;
  interval: string;
  quickInterval: string | null;
  status: { label: string; icon: string };
  deltaAic: string;
  spread: string;
  /** How many mixtures the spread rests on, and how many are impossible under this candidate. */
  mixtures: string | null;
  verdict: 'best' | 'possible' | 'ruled out';
  reason: string;
  freeFit: { k: string; epsilon: string | null; agreement: 'agrees' | 'disagrees' | null } | null;
  notes: string[];
}

function freeFitCell(held: GlobalFitResult, free: GlobalFitResult): CandidateRow['freeFit'] {
  const k = kCell(free);
  const eps = free.epsilonLPerMolCm;
  // A fit that gave no K gives no ε worth reading either, and nothing to agree or disagree with.
  const failed = free.status === 'not-converged' || free.status === 'not-determined';
  return {
    k: k === DASH ? K_STATUS_DISPLAY[free.status].label : `K ${k}`,
    epsilon:
      failed || eps === null
        ? null
        : `ε ${formatQuantity(eps, EPSILON_UNIT, significantDigits(eps, free.epsilonSe))}`,
    agreement:
      failed || held.status === 'not-converged' || held.status === 'not-determined'
        ? null
        : intervalsOverlap(held, free)
          ? 'agrees'
          : 'disagrees',
  };
}

function candidateRow(c: CandidateResult, best: string | null): CandidateRow {
  const fit = c.fit;
  const quick = fit?.kCi95Jacobian ?? null;
  // The free-ε cross-check has its own cell; its sentence in the notes would say it twice.
  const crossCheck = fit && c.freeFit ? new Set(crossCheckNotes(fit, c.freeFit)) : new Set<string>();
  return {
    model: c.model,
    rank: c.rank,
    kUnit: c.kUnit,
    k: kCell(fit),
    interval: kIntervalText(fit),
    quickInterval:
      quick && fit?.status === 'determined'
        ? `${formatNumber(quick[0])} to ${formatNumber(quick[1])} ${c.kUnit}`
        : null,
    status: fit ? K_STATUS_DISPLAY[fit.status] : { label: 'no fit', icon: 'remove' },
    deltaAic: c.deltaAic === null ? DASH : c.deltaAic.toFixed(1),
    spread: c.kCv === null ? DASH : `CV ${formatPercent(c.kCv)}`,
    mixtures:
      c.kCv === null
        ? null
        : `${c.nFeasible} mixtures` + (c.nInfeasible ? `, ${c.nInfeasible} impossible` : ''),
    verdict: c.ruledOut ? 'ruled out' : c.model === best ? 'best' : 'possible',
    reason: c.reason,
    freeFit: fit && c.freeFit ? freeFitCell(fit, c.freeFit) : null,
    notes: c.warnings.filter((w) => !crossCheck.has(w)),
  };
}

/** Candidates in the order the batch's settings list them (1:1, 1:2, 2:1, …), so rows never jump. */
export function candidatesInSettingsOrder(result: BatchResult): CandidateResult[] {
  const all = result.stoichiometry?.candidates ?? [];
  const order = result.settings.candidates;
  const listed = order.map((m) => all.find((c) => c.model === m)).filter((c): c is CandidateResult => !!c);
  return [...listed, ...all.filter((c) => !order.includes(c.model))];
}

/**
 * The batch's K (headline, ε source, the concentration-constant note), the candidate stoichiometries in
 * a fixed order with their fits and cross-checks, uncertainty, Job's and mole-ratio plots,
 * Benesi–Hildebrand and the ICE tables.
 */
@Component({
  selector: 'eq-equilibrium-panel',
  imports: [TableScroll, ScatterChart, MatFormFieldModule, MatSelectModule, MatIconModule],
  templateUrl: './equilibrium-panel.html',
  styleUrls: ['./panels.scss', './equilibrium-panel.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EquilibriumPanel {
  readonly result = input.required<BatchResult>();

  protected readonly stoichiometry = computed(() => this.result().stoichiometry);
  protected readonly headline = computed(() => this.result().headline);
  protected readonly headlineStatus = computed(() => {
    const h = this.headline();
    return h ? K_STATUS_DISPLAY[h.status] : null;
  });
  protected readonly epsilon = computed(() => {
    const e = this.result().epsilonSource;
    const value = e.epsilonLPerMolCm;
    if (value === null) return { note: e.note, value: null };
    const d = significantDigits(value, e.epsilonSe);
    const se = e.epsilonSe ? ` ± ${formatNumber(e.epsilonSe, 2)}` : '';
    return { note: e.note, value: `${formatNumber(value, d)}${se} ${EPSILON_UNIT}` };
  });
  protected readonly candidates = computed<CandidateResult[]>(() => this.stoichiometry()?.candidates ?? []);
  protected readonly rows = computed(() => {
    const best = this.stoichiometry()?.best ?? null;
    return candidatesInSettingsOrder(this.result()).map((c) => candidateRow(c, best));
  });
  /** Propagation is meaningful only around a determined K; a bound or a failed fit has no ± to give. */
  protected readonly uncertainty = computed(() =>
    this.headline()?.status === 'determined' ? this.result().uncertainty : null,
  );
  /** The candidate whose ICE tables are shown: the best one until a person picks another. */
  protected readonly chosen = linkedSignal<string | null>(() => {
    const s = this.stoichiometry();
    return s?.best ?? s?.candidates[0]?.model ?? this.result().settings.candidates[0] ?? null;
  });
  protected readonly chosenCandidate = computed(
    () => this.candidates().find((c) => c.model === this.chosen()) ?? null,
  );
  protected readonly ice = computed(() => {
    const m = this.chosen();
    return m ? iceTablesFor(this.result().mixtures, m) : [];
  });
  protected readonly job = computed(() => {
    const r = this.result();
    return r.job ? jobChart(r.job, r.mixtures) : null;
  });
  protected readonly moleRatio = computed(() => {
    const r = this.result();
    return r.moleRatio ? moleRatioChart(r.moleRatio, r.mixtures) : null;
  });
  /** The Benesi–Hildebrand cross-check in one sentence. */
  protected readonly benesiHildebrand = computed(() => {
    const bh = this.result().benesiHildebrand;
    if (!bh) return '';
    if (!bh.applicable || !bh.result) return `Not applied: ${bh.reason}.`;
    const r = bh.result;
    const ratio =
      bh.kRatioToGlobalFit === null ? '' : `; ${bh.kRatioToGlobalFit.toFixed(2)} × the global 1:1 fit`;
    return (
      `K = ${this.plusMinus(r.k, r.kSe, kUnitOf('1:1'))} from ${r.n} mixtures with ${r.excessReactant} in ` +
      `excess (R² ${r.r2.toFixed(4)})${ratio}.`
    );
  });
  /** The analysis's own disagreement notes (QC list), shown beside the plot they concern. */
  protected readonly jobDisagrees = computed(() => this.qcMessage('job-disagrees'));
  protected readonly moleRatioDisagrees = computed(() => this.qcMessage('mole-ratio-disagrees'));
  protected readonly fitsDisagree = computed(() => this.qcMessage('k-fits-disagree'));

  protected readonly fmt = formatNumber;
  protected readonly pct = formatPercent;
  protected readonly abs = formatAbsorbance;
  protected readonly unit = kUnitOf;
  protected readonly formatK = formatK;
  protected readonly quantity = formatQuantity;
  protected readonly statusWord = (s: KStatus) => K_STATUS_DISPLAY[s].label;

  /** A value ± its uncertainty with the unit, digits following the uncertainty. */
  protected plusMinus(value: number | null, sd: number | null, unit: string): string {
    if (value === null) return DASH;
    const d = significantDigits(value, sd);
    const pm = sd === null ? '' : ` ± ${formatNumber(sd, 2)}`;
    return `${formatNumber(value, d)}${pm} ${unit}`;
  }

  protected range(pair: [number, number] | null | undefined, unit: string): string {
    return pair ? `${formatNumber(pair[0])} to ${formatNumber(pair[1])}${unit ? ` ${unit}` : ''}` : DASH;
  }

  protected coefficient(n: number): string {
    return n === 1 ? '' : String(n);
  }

  private qcMessage(code: string): string | null {
    return this.result().qc.find((f) => f.code === code)?.message ?? null;
  }
}
