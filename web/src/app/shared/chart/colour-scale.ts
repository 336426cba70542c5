/**
 * Viridis, the perceptually uniform colour map of matplotlib (van der Walt & Smith, 2015; CC0),
 * as nine control points at t = 0, 1/8, …, 1. Lightness rises monotonically from dark violet to
 * yellow, so equal steps of absorbance read as equal steps of colour, also in greyscale and for the
 * common colour-vision deficiencies.
 */
export const VIRIDIS_NAME = 'viridis';
export const VIRIDIS_CONTROL_POINTS: readonly string[] = [
  '#440154',
  '#472d7b',
  '#3b528b',
  '#2c728e',
  '#21918c',
  '#28ae80',
  '#5ec962',
  '#addc30',
  '#fde725',
];

type Rgb = [number, number, number];

function hexToRgb(hex: string): Rgb {
  const n = Number.parseInt(hex.slice(1), 16);
  return [(n >> 16) & 255, (n >> 8) & 255, n & 255];
}

const STOPS: readonly Rgb[] = VIRIDIS_CONTROL_POINTS.map(hexToRgb);

const toHex = (rgb: Rgb): string =>
  `#${rgb.map((c) => Math.round(c).toString(16).padStart(2, '0')).join('')}`;

/** The colour at t ∈ [0, 1] (clamped), linear between neighbouring control points. */
export function viridis(t: number): string {
  const x = Number.isFinite(t) ? Math.min(1, Math.max(0, t)) : 0;
  const scaled = x * (STOPS.length - 1);
  const i = Math.min(STOPS.length - 2, Math.floor(scaled));
  const f = scaled - i;
  const [a, b] = [STOPS[i], STOPS[i + 1]];
  return toHex([0, 1, 2].map((k) => a[k] + (b[k] - a[k]) * f) as Rgb);
}

/** WCAG relative luminance of an sRGB hex colour. */
export function relativeLuminance(hex: string): number {
  const lin = hexToRgb(hex).map((c) => {
    const s = c / 255;
    return s <= 0.03928 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2];
}

/** Black or white, whichever has the higher contrast on the background. */
export function textColourOn(background: string): '#000000' | '#ffffff' {
  const l = relativeLuminance(background);
  return (l + 0.05) / 0.05 >= 1.05 / (l + 0.05) ? '#000000' : '#ffffff';
}

/** Range of a colour scale, in absorbance units. */
export interface ScaleRange {
  min: number;
  max: number;
}

/** The range of the finite values, widened a little when every value is the same. */
export function scaleRange(values: readonly (number | null)[]): ScaleRange | null {
  const finite = values.filter((v): v is number => v !== null && Number.isFinite(v));
  if (finite.length === 0) return null;
  const min = Math.min(...finite);
  const max = Math.max(...finite);
  return max > min ? { min, max } : { min: min - 0.05, max: max + 0.05 };
}

export function colourFor(value: number, range: ScaleRange): string {
  return viridis((value - range.min) / (range.max - range.min));
}

/** A CSS gradient through the control points, for the legend. */
export function legendGradient(): string {
  return `linear-gradient(to right, ${VIRIDIS_CONTROL_POINTS.join(', ')})`;
}
