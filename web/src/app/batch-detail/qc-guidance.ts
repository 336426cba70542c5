import type { QcCode, QcFlag } from '@equilight/analysis';

/** What a QC flag means and what a person can do about it, in plain words. */
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
};

export const SEVERITY_DISPLAY: Record<QcFlag['severity'], { label: string; icon: string; rank: number }> = {
  error: { label: 'Error', icon: 'error', rank: 0 },
  warning: { label: 'Warning', icon: 'warning', rank: 1 },
  info: { label: 'Note', icon: 'info', rank: 2 },
};

export function guidanceFor(code: string): QcGuidance {
  return (
    QC_GUIDANCE[code as QcCode] ?? {
      title: code,
      meaning: 'A check of the analysis raised this flag.',
      action: 'Read the message and review the positions involved.',
    }
  );
}
