/**
 * The one number format of Equilight: the batch page, the PDF, the CSV, the mails and the CLI all write
 * numbers, units and equilibrium constants through these functions, so the same K reads the same
 * everywhere. Plain digits between 10⁻³ and 10⁵, otherwise m × 10ⁿ with Unicode superscripts; a missing
 * or non-finite value is an em dash. Significant digits follow the uncertainty where one is known
 * (two significant digits of the uncertainty, ISO/IEC Guide 98-3 (GUM) §7.2.6), else three.
 */

export const DASH = '—';

const SUPERSCRIPT: Record<string, string> = {
  '-': '⁻',
  '0': '⁰',
  '1': '¹',
  '2': '²',
  '3': '³',
  '4': '⁴',
  '5': '⁵',
  '6': '⁶',
  '7': '⁷',
  '8': '⁸',
  '9': '⁹',
};

/** An integer in superscript digits: −2 → "⁻²". */
export function superscript(n: number): string {
  return String(n)
    .split('')
    .map((c) => SUPERSCRIPT[c] ?? c)
    .join('');
}

function missing(value: number | null | undefined): value is null | undefined {
  return value === null || value === undefined || !Number.isFinite(value);
}

/**
 * Rounds to `digits` significant digits and returns a number (for CSV cells and JSON: no
 * 0.30000000000000004). Non-finite stays as it is.
 *
 * @example
 * roundSignificant(0.1 + 0.2, 4); // 0.3
 */
export function roundSignificant(value: number, digits = 4): number {
  if (!Number.isFinite(value) || value === 0) return value;
  return Number(value.toPrecision(Math.min(Math.max(digits, 1), 17)));
}

/**
 * Significant digits that show a value to the second significant digit of its uncertainty
 * (GUM §7.2.6), between 2 and 6; 3 when the uncertainty is unknown.
 *
 * @example
 * significantDigits(839.4, 19); // 3  (839)
 */
export function significantDigits(value: number, uncertainty: number | null | undefined): number {
  if (missing(uncertainty) || !(uncertainty > 0) || !Number.isFinite(value) || value === 0) return 3;
  const digits = Math.floor(Math.log10(Math.abs(value))) - Math.floor(Math.log10(uncertainty)) + 2;
  return Math.min(6, Math.max(2, digits));
}

/**
 * A number for a person: plain between 0.001 and 100 000, otherwise m × 10ⁿ; `digits` significant
 * digits. Null and non-finite values become a dash.
 *
 * @example
 * formatNumber(839.41); // "839"
 * formatNumber(2.412e35); // "2.41 × 10³⁵"
 */
export function formatNumber(value: number | null | undefined, digits = 3): string {
  if (missing(value)) return DASH;
  if (value === 0) return '0';
  const abs = Math.abs(value);
  if (abs >= 1e-3 && abs < 1e5) {
    const s = value.toPrecision(digits);
    return s.includes('e') ? String(Number(s)) : s;
  }
  const [mantissa, exponentText] = value.toExponential(Math.max(0, digits - 1)).split('e');
  return `${mantissa} × 10${superscript(Number(exponentText))}`;
}

/** A fraction as a percentage: 0.123 → "12.3 %". */
export function formatPercent(fraction: number | null | undefined, decimals = 1): string {
  if (missing(fraction)) return DASH;
  return `${(fraction * 100).toFixed(decimals)} %`;
}

/** Absorbance to four decimals (the resolution of the instruments). */
export function formatAbsorbance(value: number | null | undefined): string {
  if (missing(value)) return DASH;
  return value.toFixed(4);
}

/** A value with its unit, separated by a space: "4.70 × 10³ L·mol⁻¹·cm⁻¹". */
export function formatQuantity(value: number | null | undefined, unit: string, digits = 3): string {
  const text = formatNumber(value, digits);
  return text === DASH || !unit ? text : `${text} ${unit}`;
}

/** Unit of ε. */
export const EPSILON_UNIT = 'L·mol⁻¹·cm⁻¹';

/**
 * Unit of K for aA + bB ⇌ AₐB_b: M^(1−a−b), written in L and mol — L·mol⁻¹ for 1:1, L²·mol⁻² for 1:2
 * and 2:1, L³·mol⁻³ for 1:3.
 *
 * @example
 * kUnit(1, 2); // "L²·mol⁻²"
 */
export function kUnit(a: number, b: number): string {
  const n = a + b - 1;
  if (n === 0) return 'dimensionless';
  if (n === 1) return 'L·mol⁻¹';
  if (n > 0) return `L${superscript(n)}·mol${superscript(-n)}`;
  return `mol${superscript(-n)}·L${superscript(n)}`;
}

/** "1:2" → its unit of K ("" when the label is not a stoichiometry). */
export function kUnitOf(model: string): string {
  const [a, b] = model.split(':').map(Number);
  return Number.isInteger(a) && Number.isInteger(b) && a > 0 && b > 0 ? kUnit(a, b) : '';
}

/**
 * What is known of one K: a value with an interval, only a bound, or nothing (with the reason).
 * - `determined`: K with its 95 % interval (profile likelihood), within one decade.
 * - `poorly-determined`: the interval spans more than a decade; shown as the interval.
 * - `lower-bound`: the fit runs to complete binding; only a one-sided 95 % lower bound.
 * - `upper-bound`: binding too weak to see; only a one-sided 95 % upper bound.
 * - `not-converged` / `not-determined`: no number, a reason.
 */
export type KStatus =
  'determined' | 'poorly-determined' | 'lower-bound' | 'upper-bound' | 'not-converged' | 'not-determined';

/** The fields a K statement needs (a global fit result has them all). */
export interface KStatement {
  model: string;
  status: KStatus;
  k: number | null;
  /** 95 % interval; an end is null when the data do not bound it. */
  kCi95: [number | null, number | null] | null;
  kLowerBound95: number | null;
  kUpperBound95: number | null;
  /** Why there is no number (not-converged, not-determined). */
  message?: string | null;
}

function kDigits(k: number, ci: [number | null, number | null] | null): number {
  if (!ci || ci[0] === null || ci[1] === null) return 3;
  return significantDigits(k, (ci[1] - ci[0]) / 3.92);
}

/**
 * K as a person reads it, with its unit and what is known: "839 L·mol⁻¹ (95 % CI 811 to 886)",
 * "> 2.1 × 10⁶ L²·mol⁻² (95 % lower bound)", "between 140 and 6500 L·mol⁻¹ (poorly determined)",
 * "did not converge: …". The one K format of the product.
 *
 * @example
 * formatK({ model: '1:1', status: 'determined', k: 839.4, kCi95: [810.9, 886.3],
 *   kLowerBound95: null, kUpperBound95: null }); // "839 L·mol⁻¹ (95 % CI 811 to 886)"
 */
export function formatK(s: KStatement | null | undefined): string {
  if (!s) return DASH;
  const unit = kUnitOf(s.model);
  const u = unit ? ` ${unit}` : '';
  const [lo, hi] = s.kCi95 ?? [null, null];
  switch (s.status) {
    case 'determined': {
      if (s.k === null) return DASH;
      const d = kDigits(s.k, s.kCi95);
      const ci =
        lo !== null && hi !== null ? ` (95 % CI ${formatNumber(lo, d)} to ${formatNumber(hi, d)})` : '';
      return `${formatNumber(s.k, d)}${u}${ci}`;
    }
    case 'poorly-determined':
      if (lo !== null && hi !== null)
        return `between ${formatNumber(lo, 2)} and ${formatNumber(hi, 2)}${u} (poorly determined)`;
      return `${formatNumber(s.k, 2)}${u} (poorly determined)`;
    case 'lower-bound':
      return s.kLowerBound95 !== null
        ? `> ${formatNumber(s.kLowerBound95, 2)}${u} (95 % lower bound; too large to determine from these concentrations)`
        : `too large to determine from these concentrations`;
    case 'upper-bound':
      return s.kUpperBound95 !== null
        ? `< ${formatNumber(s.kUpperBound95, 2)}${u} (95 % upper bound; too small to determine from these concentrations)`
        : `too small to determine from these concentrations`;
    case 'not-converged':
      return `did not converge${s.message ? `: ${s.message}` : ''}`;
    case 'not-determined':
      return `not determined${s.message ? `: ${s.message}` : ''}`;
  }
}

/** The K value alone for a table cell ("839", "> 2.1 × 10⁶", "140 to 6500", "—"), unit in the header. */
export function formatKValue(s: KStatement | null | undefined): string {
  if (!s) return DASH;
  const [lo, hi] = s.kCi95 ?? [null, null];
  switch (s.status) {
    case 'determined':
      return formatNumber(s.k, s.k === null ? 3 : kDigits(s.k, s.kCi95));
    case 'poorly-determined':
      return lo !== null && hi !== null
        ? `${formatNumber(lo, 2)} to ${formatNumber(hi, 2)}`
        : formatNumber(s.k, 2);
    case 'lower-bound':
      return s.kLowerBound95 !== null ? `> ${formatNumber(s.kLowerBound95, 2)}` : DASH;
    case 'upper-bound':
      return s.kUpperBound95 !== null ? `< ${formatNumber(s.kUpperBound95, 2)}` : DASH;
    default:
      return DASH;
  }
}

/** The statement printed once beside K on the batch page and in reports. */
export const K_CONCENTRATION_CONSTANT_NOTE =
  'K is a concentration constant (from molar concentrations) at the batch’s temperature and medium, not a thermodynamic constant at zero ionic strength.';
