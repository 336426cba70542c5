import { fitLinear } from './linear-regression';
import { fitQuadratic } from './quadratic-regression';
import { studentTQuantile } from './student-t';

/** Mandel's fitting test: is a quadratic calibration significantly better than the straight line? */
export interface MandelTestResult {
  n: number;
  /** Residual SD of the straight line (s_y1) and of the quadratic (s_y2), absorbance. */
  residualSdLinear: number;
  residualSdQuadratic: number;
  /** Test value PW = DS²/s_y2², DS² = (n − 2)·s_y1² − (n − 3)·s_y2². */
  testValue: number;
  /** F(1, n − 3; 0.99). */
  criticalValue: number;
  /** True when PW > F: the calibration curves (not linear). */
  curved: boolean;
  /** Curvature b2 of the quadratic, absorbance per (mol/L)². */
  quadraticCoefficient: number;
}

/**
 * Mandel's fitting test of ISO 8466-1: fits the straight line and the second-degree polynomial to the
 * standards and compares the reduction in residual variance DS² = (n − 2)·s_y1² − (n − 3)·s_y2² with
 * s_y2²; PW = DS²/s_y2² > F(1, n − 3; 99 %) means the calibration is not linear in the range.
 * F(1, ν; 1 − α) = t(1 − α/2, ν)². Needs at least 5 standards (ISO 8466-1 asks for 10 levels).
 *
 * Units: absorbance and mol/L; PW dimensionless.
 * Reference: ISO 8466-1:1990 Water quality — Calibration and evaluation of analytical methods, Part 1:
 * Linear calibration function, §5.3 (Mandel J., The Statistical Analysis of Experimental Data, 1964).
 *
 * @returns null with fewer than 5 standards or fewer than 3 distinct concentrations
 * @example
 * mandelTest([0, 1, 2, 3, 4, 5], [0, 1.1, 1.9, 3.05, 3.95, 5.02])?.curved; // false
 */
export function mandelTest(
  concentrationM: readonly number[],
  absorbance: readonly number[],
): MandelTestResult | null {
  const n = concentrationM.length;
  if (n < 5 || new Set(concentrationM).size < 3) return null;
  const line = fitLinear(concentrationM, absorbance);
  const quad = fitQuadratic(concentrationM, absorbance);
  const s1 = line.residualSd;
  const s2 = quad.residualSd;
  const ds2 = (n - 2) * s1 * s1 - (n - 3) * s2 * s2;
  const t = studentTQuantile(0.995, n - 3);
  const criticalValue = t * t;
  const testValue = s2 > 0 ? ds2 / (s2 * s2) : ds2 > 0 ? Infinity : 0;
  return {
    n,
    residualSdLinear: s1,
    residualSdQuadratic: s2,
    testValue,
    criticalValue,
    curved: testValue > criticalValue,
    quadraticCoefficient: quad.coefficients[2],
  };
}
