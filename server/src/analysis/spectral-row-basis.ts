import { Matrix, QrDecomposition } from 'ml-matrix';
import { AnalysisError } from './errors';

/**
 * An orthonormal basis Q (vectors over the wavelengths) of the row space of an absorbance matrix Y and of any
 * extra spectra, from ml-matrix's Householder QR of [Yᵀ | spectra]. Every row of Y lies in span(Q), so for
 * any matrix P acting on the mixtures ‖P·Y‖ = ‖P·Y·Q‖: a least-squares problem over w wavelengths shrinks
 * exactly to one over r ≤ mixtures + spectra columns (the exact data reduction used in global analysis of
 * spectra); the spectra themselves are E = Ê·Qᵀ.
 *
 * Units: Q dimensionless (orthonormal); the inputs absorbance and L·mol⁻¹·cm⁻¹.
 * Reference: Golub & Van Loan, Matrix Computations, 4th ed., §5.2 (Householder QR); Henry E.R. & Hofrichter
 * J. (1992) Methods Enzymol. 210, 129 (reduction of spectral data sets).
 *
 * @param absorbance Y, mixtures × wavelengths
 * @param spectra extra vectors over the same wavelengths to include (e.g. held species spectra)
 * @returns r basis vectors, each of length w (r = mixtures + spectra; the w unit vectors when that is not smaller)
 * @throws AnalysisError 'invalid-input' for a ragged matrix or a spectrum of the wrong length
 * @example
 * spectralRowBasis([[1, 0, 0], [0, 2, 0]]); // two unit vectors over 3 wavelengths spanning the rows
 */
export function spectralRowBasis(
  absorbance: readonly (readonly number[])[],
  spectra: readonly (readonly number[])[] = [],
): number[][] {
  const rows = [...absorbance, ...spectra];
  const w = rows.length > 0 ? rows[0].length : 0;
  if (w === 0 || rows.some((r) => r.length !== w))
    throw new AnalysisError('invalid-input', 'every row needs a value at every wavelength');
  if (rows.length >= w)
    return Array.from({ length: w }, (_, c) => Array.from({ length: w }, (_, j) => (j === c ? 1 : 0)));
  const stacked = new Matrix(w, rows.length);
  rows.forEach((row, c) => row.forEach((v, j) => stacked.set(j, c, v)));
  const q = new QrDecomposition(stacked).orthogonalMatrix;
  return Array.from({ length: rows.length }, (_, c) => Array.from({ length: w }, (_, j) => q.get(j, c)));
}
