/** Labels below this size or from this size up are written with an exponent when ticks are compact. */
const SMALL = 1e-2;
const LARGE = 1e4;
const MAX_DIGITS = 15;

function label(value: number, digits: number, compact: boolean): string {
  const abs = Math.abs(value);
  if (compact && value !== 0 && (abs < SMALL || abs >= LARGE)) return value.toExponential(digits - 1);
  return String(Number(value.toPrecision(digits + 2)));
}

/**
 * The labels of an axis's ticks, with as few significant digits as keep every label distinct: two
 * significant digits for exponent labels ("3.2e-3"), four for the others, and one more each round
 * until no two ticks read the same (ticks 0.00320 and 0.00325 become "3.20e-3" and "3.25e-3").
 */
export function tickLabels(values: readonly number[], compact = true): string[] {
  let labels: string[] = [];
  for (let digits = 2; digits <= MAX_DIGITS; digits++) {
    labels = values.map((v) => label(v, digits, compact));
    if (new Set(labels).size === new Set(values).size) return labels;
  }
  return labels;
}
