import { Pipe, type PipeTransform } from '@angular/core';

const SUPERSCRIPT = '⁰¹²³⁴⁵⁶⁷⁸⁹';

/** A concentration such as 0.000128 as "1.28 × 10⁻⁴" (significant digits given); 0 stays "0". */
export function scientific(value: number | null | undefined, digits = 3): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  if (value === 0) return '0';
  const [mantissa, exponentText] = value.toExponential(Math.max(0, digits - 1)).split('e');
  const exponent = Number(exponentText);
  if (exponent === 0) return mantissa;
  const sup = String(Math.abs(exponent))
    .split('')
    .map((d) => SUPERSCRIPT[Number(d)])
    .join('');
  return `${mantissa} × 10${exponent < 0 ? '⁻' : ''}${sup}`;
}

@Pipe({ name: 'scientific' })
export class ScientificPipe implements PipeTransform {
  transform(value: number | null | undefined, digits = 3): string {
    return scientific(value, digits);
  }
}
