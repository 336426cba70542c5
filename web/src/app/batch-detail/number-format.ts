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

export function superscript(n: number): string {
  return String(n)
    .split('')
    .map((c) => SUPERSCRIPT[c] ?? c)
    .join('');
}

export const DASH = '—';

/**
 * A number for a person: plain between 0.001 and 100 000, otherwise m × 10ⁿ; `digits` significant
 * figures. Null and non-finite values become a dash.
 */
export function formatNumber(value: number | null | undefined, digits = 3): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return DASH;
  if (value === 0) return '0';
  const abs = Math.abs(value);
  if (abs >= 1e-3 && abs < 1e5) {
    const s = value.toPrecision(digits);
    return s.includes('e') ? String(Number(s)) : s;
  }
  const exp = Math.floor(Math.log10(abs));
  let mantissa = Number((value / 10 ** exp).toPrecision(digits));
  let e = exp;
  if (Math.abs(mantissa) >= 10) {
    mantissa /= 10;
    e += 1;
  }
  return `${mantissa.toFixed(Math.max(0, digits - 1))} × 10${superscript(e)}`;
}

/** A fraction as a percentage with one decimal. */
export function formatPercent(fraction: number | null | undefined, decimals = 1): string {
  if (fraction === null || fraction === undefined || !Number.isFinite(fraction)) return DASH;
  return `${(fraction * 100).toFixed(decimals)} %`;
}

/** Absorbance to four decimals (instrument resolution). */
export function formatAbsorbance(value: number | null | undefined): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return DASH;
  return value.toFixed(4);
}

/** Unit of K for aA + bB ⇌ AₐB_b: M^(1−a−b), written in L and mol. */
export function kUnit(a: number, b: number): string {
  const n = a + b - 1;
  if (n === 0) return 'dimensionless';
  if (n === 1) return 'L·mol⁻¹';
  if (n > 0) return `L${superscript(n)}·mol${superscript(-n)}`;
  return `mol${superscript(-n)}·L${superscript(n)}`;
}

/** "1:2" → its unit of K. */
export function kUnitOf(model: string): string {
  const [a, b] = model.split(':').map(Number);
  return Number.isFinite(a) && Number.isFinite(b) ? kUnit(a, b) : '';
}
