import { AnalysisError } from './errors';

/**
 * Path length of a flat-bottomed cylindrical well from its fill volume: l = V/(π·(d/2)²).
 * 1 µL = 1 mm³, so l comes out in mm and is divided by 10 for cm. The meniscus is ignored (it
 * shortens the centre path slightly; the water-peak method measures the real path).
 *
 * Units: fill volume µL, well diameter mm, result cm.
 * Reference: volume of a right circular cylinder.
 *
 * @param fillVolumeUl liquid volume in the well, µL
 * @param wellDiameterMm inner diameter at the liquid surface, mm
 * @example
 * pathLengthFromFillVolume(200, 6.96); // ≈ 0.526 cm
 */
export function pathLengthFromFillVolume(fillVolumeUl: number, wellDiameterMm: number): number {
  if (!(fillVolumeUl > 0) || !(wellDiameterMm > 0)) {
    throw new AnalysisError('invalid-input', 'fill volume and well diameter must be positive');
  }
  const radiusMm = wellDiameterMm / 2;
  return fillVolumeUl / (Math.PI * radiusMm * radiusMm) / 10;
}
