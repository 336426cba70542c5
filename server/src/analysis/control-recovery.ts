import type { ControlResult } from './batch-types';
import { formatConcentration, reportingUnitOf } from './concentration-units';
import { roundSignificant } from './number-format';
import type { ResolvedAnalysisSettings } from './options';

/** How a control or check standard compares with its nominal value. */
export interface ControlRecovery {
  /** Nominal (assigned) concentration of the control, mol/L; null when the manifest gives none. */
  nominalM: number | null;
  /** measured / nominal × 100, %; null without a nominal value above 0 or a measured concentration. */
  recoveryPct: number | null;
  /** Whether the recovery lies within the batch's limits (inclusive); null when there is no recovery. */
  withinLimits: boolean | null;
}

/**
 * Recovery of a control or check standard: R = c(measured) / c(nominal) × 100 %, and whether it lies
 * within the acceptance limits [low, high] (inclusive).
 *
 * Units: both concentrations in the same unit (mol/L here); limits and the answer in per cent.
 * Reference: Eurachem Guide, The Fitness for Purpose of Analytical Methods, 2nd ed. (2014), §6.4
 * (trueness expressed as recovery); IUPAC Harmonized guidelines for the use of recovery information in
 * analytical measurement, Pure Appl. Chem. 71 (1999) 337–348. Limits of 90–110 % are common practice
 * for a check standard, not a standard; a lab sets its own.
 *
 * A nominal value of 0 (a control meant to read nothing) has no recovery: its result stands alone.
 *
 * @example
 * controlRecovery(4.40e-5, 4.4767e-5, [90, 110]); // { nominalM: 4.4767e-5, recoveryPct: 98.3, withinLimits: true }
 */
export function controlRecovery(
  measuredM: number | null,
  nominalM: number | null | undefined,
  limitsPct: readonly [number, number],
): ControlRecovery {
  if (nominalM == null) return { nominalM: null, recoveryPct: null, withinLimits: null };
  if (!(nominalM > 0) || !Number.isFinite(nominalM) || measuredM === null || !Number.isFinite(measuredM))
    return { nominalM, recoveryPct: null, withinLimits: null };
  const recoveryPct = (measuredM / nominalM) * 100;
  // Compared at 12 significant digits, so 1.1/1 × 100 (110.00000000000001 in binary) sits on the limit.
  const r = roundSignificant(recoveryPct, 12);
  return { nominalM, recoveryPct, withinLimits: r >= limitsPct[0] && r <= limitsPct[1] };
}

/**
 * One control in a sentence, in the batch's reporting unit: "CHECK-2.5: 2.46 mg/L against 2.50 mg/L
 * nominal, recovery 98.4 % (limits 90–110 %)", ending "— out of limits" when it fails. Mails state
 * controls through it.
 *
 * @example
 * describeControl(result.controls[0], result.settings);
 */
export function describeControl(
  c: Pick<ControlResult, 'sampleId' | 'concentrationM' | 'flags'> &
    Partial<Pick<ControlResult, 'nominalM' | 'recoveryPct'>>,
  settings: Partial<
    Pick<ResolvedAnalysisSettings, 'concentrationUnit' | 'molarMassGPerMol' | 'recoveryLimitsPct'>
  >,
): string {
  const unit = reportingUnitOf(settings);
  const measured = formatConcentration(c.concentrationM, unit);
  if (c.nominalM == null) return `${c.sampleId}: ${measured} (no nominal value)`;
  const limits = settings.recoveryLimitsPct;
  return (
    `${c.sampleId}: ${measured} against ${formatConcentration(c.nominalM, unit)} nominal, ` +
    (c.recoveryPct == null ? 'no recovery' : `recovery ${c.recoveryPct.toFixed(1)} %`) +
    (limits ? ` (limits ${limits[0]}–${limits[1]} %)` : '') +
    (c.flags.includes('recovery-out-of-limits') ? ' — out of limits' : '')
  );
}
