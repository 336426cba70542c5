import type { QcCode } from './batch-types';

/**
 * The one table of QC codes in plain words: what each finding means and what a person can do about it.
 * The batch page and the PDF report say a QC code through it rather than the bare code.
 */
export interface QcGuidance {
  title: string;
  meaning: string;
  action: string;
}

export const QC_GUIDANCE: Record<QcCode, QcGuidance> = {
  'above-linear-range': {
    title: 'Above the linear range',
    meaning:
      'The absorbance is higher than the ceiling set for this batch, where the detector and Beer–Lambert law are no longer proportional.',
    action:
      'Dilute the sample and read it again, or exclude the position if a repeat is not possible. Raise the ceiling only if the instrument was validated for it.',
  },
  'negative-absorbance': {
    title: 'Negative after blank correction',
    meaning: 'The reading is below the mean blank: the blank is too high, or the sample reads lower than it.',
    action:
      'Check the blank wells or cuvettes for bubbles, scratches or a wrong reagent; exclude a faulty blank and see whether the rest recovers.',
  },
  'replicate-cv-high': {
    title: 'Replicates disagree',
    meaning: 'The coefficient of variation of a replicate group is above the limit set for this batch.',
    action:
      'Look at the group on the map: one position far from the others usually has a pipetting or bubble problem. Exclude it with a reason, or repeat the group.',
  },
  'calibration-r2-low': {
    title: 'Calibration not straight enough',
    meaning: 'R² of the calibration is below the minimum, so concentrations read from it are less reliable.',
    action:
      'Look at the residual plot for one standard far from the line or a curve at the top; exclude an outlier with a reason or prepare the standards again.',
  },
  'calibration-outlier': {
    title: 'Standard off the line',
    meaning:
      'This standard lies further from the fitted line than the rest allow (studentised residual beyond the limit).',
    action: 'Check how it was prepared; exclude it with a reason if it was a preparation error.',
  },
  'no-calibration': {
    title: 'No calibration',
    meaning:
      'Too few usable standards to fit a line, so no concentrations or ε could be computed from this batch.',
    action:
      'Wait for the remaining files, check the standards in the manifest, or take ε from another batch in the what-if panel.',
  },
  'below-lod': {
    title: 'Below the detection limit',
    meaning: 'The concentration is below the LOD: the signal cannot be told apart from the blank.',
    action: 'Report it as "not detected" (below the LOD), or use a less diluted sample or a longer path.',
  },
  'below-loq': {
    title: 'Below the quantitation limit',
    meaning:
      'The concentration is between the LOD and the LOQ: detected, but not precise enough to quantify.',
    action: 'Report it as detected but below the LOQ, or concentrate the sample and read it again.',
  },
  'saturated-reading': {
    title: 'Saturated reading',
    meaning: 'The instrument reported an over-range value here; it is treated as missing, never as a number.',
    action: 'Dilute the sample and read it again.',
  },
  'missing-reading': {
    title: 'Missing reading',
    meaning: 'A position of the layout has no reading at the analysed wavelength yet.',
    action:
      'If more files are expected it will fill in by itself; otherwise check the instrument export and the wavelength chosen.',
  },
  'candidate-impossible': {
    title: 'Stoichiometry impossible for a mixture',
    meaning:
      'Under this candidate a reactant would go negative at equilibrium, so the mixture cannot have that composition.',
    action:
      'Usually nothing to do: it argues against that candidate. Check the stock concentrations and volumes if every candidate is impossible.',
  },
  'k-not-constant': {
    title: 'K not constant',
    meaning:
      'For every candidate the per-mixture K varies more than the allowed CV, so no stoichiometry explains the data well.',
    action:
      'Look for a mixture with a wrong recipe or reading, check the wavelength and ε, and consider other candidates or species that absorb at this wavelength.',
  },
  'fit-not-converged': {
    title: 'Fit did not converge',
    meaning: 'The global fit of K and ε stopped before it settled, so its K and interval are not reported.',
    action:
      'Check for excluded or missing mixtures; with too few mixtures, or binding that is complete in all of them, K cannot be determined.',
  },
  'stoichiometry-ambiguous': {
    title: 'Stoichiometry ambiguous',
    meaning:
      'Two candidates fit almost equally well (ΔAIC below the limit); the data cannot choose between them.',
    action: "Add mixtures that separate the candidates, such as a Job's series or a wider excess range.",
  },
  'calibration-curvature': {
    title: 'Calibration curves',
    meaning:
      "Mandel's fitting test (ISO 8466-1) finds a quadratic significantly better than the straight line: the response bends within the range of the standards.",
    action:
      'Narrow the working range (drop the highest standards, dilute samples into the lower part) or check for stray light and saturation at the top.',
  },
  'k-poorly-determined': {
    title: 'K poorly determined',
    meaning: 'The 95 % interval of K spans more than a decade: these mixtures constrain K only loosely.',
    action:
      'Use the Planner to choose concentrations near 1/K where the complex is about half formed, and add replicates.',
  },
  'k-lower-bound': {
    title: 'K too large to determine',
    meaning:
      'Binding is complete at these concentrations, so the data show the stoichiometry but only a lower bound for K.',
    action:
      'To measure K, redesign the mixtures at lower concentrations (or use a competing reagent); the Planner predicts which concentrations would show partial binding.',
  },
  'k-fits-disagree': {
    title: 'Held and fitted ε disagree',
    meaning:
      "K with ε held at the batch's value and K with ε fitted from the mixtures disagree beyond their intervals.",
    action:
      'Check that the standards are of the complex itself and were read at the same wavelength and path length, or that a typed ε applies to this medium.',
  },
  'job-disagrees': {
    title: "Job's plot points elsewhere",
    meaning:
      "The maximum of the Job's plot suggests a different stoichiometry from the one the global fits choose.",
    action:
      'Look at both plots: a rounded maximum (moderate K) shifts the intersection; a sharp one that disagrees calls for checking the stock concentrations.',
  },
  'mole-ratio-disagrees': {
    title: 'Mole-ratio break points elsewhere',
    meaning:
      'The break of the mole-ratio plot suggests a different stoichiometry from the one the global fits choose.',
    action:
      'Check the stock concentrations and volumes of the series, and whether the break is sharp enough to read.',
  },
  'recovery-out-of-limits': {
    title: 'Recovery out of limits',
    meaning:
      'A control or check standard read back further from its nominal concentration than the acceptance limits set on this batch allow, so the other concentrations of the batch may be biased as well.',
    action:
      'Check how the control was prepared and whether it is within its shelf life; look at the calibration. Repeat the run before reporting its results, or record why they stand.',
  },
};

/** The guidance for a code; an unknown code (from a later engine) gets a generic one. */
export function guidanceFor(code: string): QcGuidance {
  return (
    QC_GUIDANCE[code as QcCode] ?? {
      title: code,
      meaning: 'A check of the analysis raised this flag.',
      action: 'Read the message and review the positions involved.',
    }
  );
}
