import { AnalysisError } from './errors';
import { DASH, formatNumber } from './number-format';

/** The units a batch may report concentrations in. The analysis itself always works in mol/L. */
export const CONCENTRATION_UNITS = ['mol/L', 'mmol/L', 'µmol/L', 'mg/L', 'µg/L'] as const;
export type ConcentrationUnit = (typeof CONCENTRATION_UNITS)[number];

/** mol/L per one of each amount unit. */
const MOLAR_FACTOR: Partial<Record<ConcentrationUnit, number>> = {
  'mol/L': 1,
  'mmol/L': 1e-3,
  'µmol/L': 1e-6,
};
/** Grams per one of each mass unit. */
const GRAMS: Partial<Record<ConcentrationUnit, number>> = { 'mg/L': 1e-3, 'µg/L': 1e-6 };

/** The unit that names the mass of the analyte per litre (needs a molar mass to convert). */
export function isMassUnit(unit: ConcentrationUnit): boolean {
  return GRAMS[unit] !== undefined;
}

/** How a batch reports concentrations: the unit and, for mass units, the analyte's molar mass. */
export interface ReportingUnit {
  unit: ConcentrationUnit;
  /** g/mol; null for amount units (mol/L, mmol/L, µmol/L), where it plays no part. */
  molarMassGPerMol: number | null;
}

/** mol/L: what every result held before a batch could choose its unit. */
export const MOLAR_REPORTING: ReportingUnit = Object.freeze({ unit: 'mol/L', molarMassGPerMol: null });

/**
 * What is wrong with a unit and molar mass, in words for a person; null when they can be used. A mass
 * unit needs a positive, finite molar mass.
 *
 * @example
 * reportingUnitProblem('mg/L', null); // "mg/L needs the analyte's molar mass (g/mol)"
 */
export function reportingUnitProblem(
  unit: string,
  molarMassGPerMol: number | null | undefined,
): string | null {
  if (!(CONCENTRATION_UNITS as readonly string[]).includes(unit))
    return `unknown concentration unit "${unit}": expected one of ${CONCENTRATION_UNITS.join(', ')}`;
  if (molarMassGPerMol != null && !(molarMassGPerMol > 0 && Number.isFinite(molarMassGPerMol)))
    return 'the molar mass must be a positive number of g/mol';
  if (isMassUnit(unit as ConcentrationUnit) && molarMassGPerMol == null)
    return `${unit} needs the analyte's molar mass (g/mol)`;
  return null;
}

function checked(unit: ConcentrationUnit, molarMassGPerMol: number | null | undefined): number {
  const problem = reportingUnitProblem(unit, molarMassGPerMol);
  if (problem) throw new AnalysisError('invalid-settings', problem);
  const molar = MOLAR_FACTOR[unit];
  // mol/L per (g/L) is 1/M; per mg/L it is 10⁻³/M.
  return molar ?? GRAMS[unit]! / molarMassGPerMol!;
}

/**
 * A concentration in mol/L expressed in another unit: amount units by their SI prefix
 * (1 mmol/L = 10⁻³ mol/L), mass units through the molar mass, ρ = c·M (mass concentration = amount
 * concentration × molar mass).
 *
 * Units: `concentrationM` mol/L; `molarMassGPerMol` g/mol (needed for mg/L and µg/L only); the answer
 * in `unit`.
 * Reference: IUPAC Green Book, Quantities, Units and Symbols in Physical Chemistry, 3rd ed. (2007),
 * §2.10 (amount concentration, mass concentration) and §3.6 (SI prefixes).
 *
 * @throws AnalysisError 'invalid-settings' for a mass unit without a molar mass, or an impossible one
 * @example
 * fromMolar(1.79067e-5, 'mg/L', 55.845); // ≈ 1.0 (iron)
 * fromMolar(2.5e-4, 'µmol/L'); // 250
 */
export function fromMolar(
  concentrationM: number,
  unit: ConcentrationUnit,
  molarMassGPerMol: number | null = null,
): number {
  return concentrationM / checked(unit, molarMassGPerMol);
}

/**
 * A concentration given in `unit` as mol/L: the inverse of {@link fromMolar}, c = ρ/M for mass units.
 *
 * Units: `value` in `unit`; `molarMassGPerMol` g/mol; the answer mol/L.
 * Reference: as {@link fromMolar}.
 *
 * @throws AnalysisError 'invalid-settings' for a mass unit without a molar mass, or an impossible one
 * @example
 * toMolar(1, 'mg/L', 55.845); // ≈ 1.79067e-5
 */
export function toMolar(
  value: number,
  unit: ConcentrationUnit,
  molarMassGPerMol: number | null = null,
): number {
  return value * checked(unit, molarMassGPerMol);
}

/**
 * The reporting unit a result was computed with. Results stored before a batch could choose its unit
 * carry no unit: they report in mol/L.
 *
 * @example
 * reportingUnitOf(result.settings); // { unit: 'mg/L', molarMassGPerMol: 55.845 }
 */
export function reportingUnitOf(settings: {
  concentrationUnit?: ConcentrationUnit;
  molarMassGPerMol?: number | null;
}): ReportingUnit {
  const unit = settings.concentrationUnit ?? 'mol/L';
  const molarMassGPerMol = settings.molarMassGPerMol ?? null;
  return reportingUnitProblem(unit, molarMassGPerMol) ? MOLAR_REPORTING : { unit, molarMassGPerMol };
}

/** A concentration in mol/L in the reporting unit (null stays null). */
export function inReportingUnit(concentrationM: number | null | undefined, r: ReportingUnit): number | null {
  return concentrationM == null || !Number.isFinite(concentrationM)
    ? null
    : fromMolar(concentrationM, r.unit, r.molarMassGPerMol);
}

/**
 * A concentration for a person in the batch's reporting unit, `digits` significant digits, with its
 * unit: "2.47 mg/L". Null becomes a dash.
 *
 * @example
 * formatConcentration(4.4767e-5, { unit: 'mg/L', molarMassGPerMol: 55.845 }); // "2.50 mg/L"
 */
export function formatConcentration(
  concentrationM: number | null | undefined,
  r: ReportingUnit,
  digits = 3,
): string {
  const value = inReportingUnit(concentrationM, r);
  return value === null ? DASH : `${formatNumber(value, digits)} ${r.unit}`;
}

/** The key part a spreadsheet column carries for a unit: "M", "mM", "uM", "mg_per_L", "ug_per_L". */
export function unitKey(unit: ConcentrationUnit): string {
  return { 'mol/L': 'M', 'mmol/L': 'mM', 'µmol/L': 'uM', 'mg/L': 'mg_per_L', 'µg/L': 'ug_per_L' }[unit];
}
