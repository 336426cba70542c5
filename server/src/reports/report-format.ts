/**
 * Number formatting shared by the PDF report and the mails: four significant digits, exponent form
 * for very large or small magnitudes, an em dash for a missing value.
 */
export function formatNumber(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  const abs = Math.abs(value);
  return abs !== 0 && (abs >= 1e5 || abs < 1e-3)
    ? value.toExponential(digits - 1)
    : String(Number(value.toPrecision(digits)));
}

const SUPERSCRIPT: Record<number, string> = { 2: '²', 3: '³' };

/** The unit of K for a stoichiometry a:b, M^(1−a−b), written 1/M, 1/M², 1/M³ (empty when dimensionless). */
export function kPdfUnit(model: string): string {
  const [a, b] = model.split(':').map(Number);
  const power = (a ?? 1) + (b ?? 1) - 1;
  if (!Number.isFinite(power) || power <= 0) return '';
  return power === 1 ? '1/M' : `1/M${SUPERSCRIPT[power] ?? `^${power}`}`;
}
