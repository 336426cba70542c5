// Invented test data: the fixture batch of analysis-fixture.ts re-made from other chosen "true" values
// (a K too large to measure at these concentrations, a K the data barely bound, a calibration that
// bends at the top) or analysed with a fit held to too few iterations. Not measurements.
import type { AnalysisSettings, Reading } from '@equilight/analysis';
import type { BatchAnalysis } from './batch-analysis';
import { FIXTURE_EPSILON, fixtureAnalysis, fixtureReadings, fixtureSamples } from './analysis-fixture';

const BLANK = 0.041;
const WAVELENGTH_NM = 590;

const ripple = (i: number) => 0.0018 * Math.sin(i * 2.3 + 0.4);

function complex(a0: number, b0: number, k: number): number {
  const s = a0 + b0 + 1 / k;
  return (s - Math.sqrt(s * s - 4 * a0 * b0)) / 2;
}

/**
 * Readings of the fixture's positions for a 1:1 complex of constant `k` (L/mol); `curvature` bends the
 * standards' absorbance down as A − curvature·A², as a detector leaving its linear range would.
 */
export function variantReadings(k: number, curvature = 0): Reading[] {
  return fixtureSamples().map((s, i) => {
    let a = BLANK;
    if (s.role === 'standard') {
      const linear = FIXTURE_EPSILON * (s.concentrationM ?? 0);
      a += linear - curvature * linear * linear;
    }
    if (s.role === 'unknown') a += FIXTURE_EPSILON * 1.7e-4;
    if (s.role === 'mixture') {
      const a0 = ((s.stockAM ?? 0) * (s.volumeAMl ?? 0)) / (s.totalVolumeMl ?? 1);
      const b0 = ((s.stockBM ?? 0) * (s.volumeBMl ?? 0)) / (s.totalVolumeMl ?? 1);
      a += FIXTURE_EPSILON * complex(a0, b0, k);
    }
    return {
      position: s.position,
      wavelengthNm: WAVELENGTH_NM,
      absorbance: Number((a + ripple(i)).toFixed(4)),
    };
  });
}

/** K = 10⁹ L/mol: binding is complete at these millimolar mixtures, so the fit gives a lower bound. */
export function lowerBoundAnalysis(): BatchAnalysis {
  return fixtureAnalysis({ readings: variantReadings(1e9) });
}

/** K = 10⁸ L/mol: nearly complete binding, so the 95 % interval spans several decades. */
export function poorlyDeterminedAnalysis(): BatchAnalysis {
  return fixtureAnalysis({ readings: variantReadings(1e8) });
}

/** The standards bend at the top (A − 0.15·A²): Mandel's test finds the calibration curved. */
export function curvedCalibrationAnalysis(): BatchAnalysis {
  return fixtureAnalysis({ readings: variantReadings(620, 0.15) });
}

/** The fixture batch with the global fits allowed a single iteration: they stop before converging. */
export function notConvergedAnalysis(): BatchAnalysis {
  const base = fixtureAnalysis();
  const settings: AnalysisSettings = { ...base.settings, fit: { maxIterations: 1 } };
  return fixtureAnalysis({ settings });
}

/** The fixture batch without its mixtures: a plain calibration batch (blanks, standards, unknowns). */
export function calibrationOnlyAnalysis(): BatchAnalysis {
  const samples = fixtureSamples().filter((s) => s.role !== 'mixture');
  return fixtureAnalysis({ samples, readings: fixtureReadings(samples) });
}

/** The fixture batch with the unknown WQ-41's second replicate (C10) read 30 % high: its replicates disagree. */
export function replicateSpreadAnalysis(): BatchAnalysis {
  const readings = fixtureReadings().map((r) =>
    r.position === 'C10' ? { ...r, absorbance: Number(((r.absorbance ?? 0) * 1.3).toFixed(4)) } : r,
  );
  return fixtureAnalysis({ readings });
}
