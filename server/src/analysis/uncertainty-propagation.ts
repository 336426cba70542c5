import { mixtureInitialConcentrations } from './dilution';
import { equilibriumSensitivity, solveEquilibrium } from './equilibrium-solve';
import { GlobalFitResult } from './global-fit';
import { invertSpd } from './linear-algebra';
import { InputUncertainties, isMadeUpToVolume, MixtureMeasurement } from './mixture-measurement';
import { Stoichiometry } from './stoichiometry-model';

/** First-order (GUM) uncertainty of a globally fitted K. */
export interface KPropagation {
  model: string;
  k: number;
  /** Standard uncertainty of ln K (= relative standard uncertainty of K). */
  lnKSd: number;
  /** Standard uncertainty of K, M^(1−a−b). */
  kSd: number;
  /** Share of the variance of ln K from each source (sums to 1). */
  contributions: { absorbance: number; pipette: number; flask: number; stock: number; epsilon: number };
  /** The absorbance SD that was used (given, or the fit's residual SD). */
  absorbanceSdUsed: number;
}

/**
 * Linear propagation of input uncertainties to the fitted ln K. At the least-squares solution a
 * change δy of the observations moves the parameters by δθ = (JᵀJ)⁻¹Jᵀ·δy (Gauss–Newton); a change of
 * an input z that moves A₀ or B₀ acts as δy = −(∂A/∂A₀·∂A₀/∂z + ∂A/∂B₀·∂B₀/∂z)·δz, with
 * ∂A/∂A₀ = ε·l·∂x/∂A₀ from the implicit equilibrium. Then u²(ln K) = Σ_z (∂ln K/∂z)²·u²(z).
 * Pipetted volumes, made-up totals and absorbances are independent per mixture; each distinct stock
 * concentration is one input shared by every mixture that uses it. When ε is held at the batch's own
 * value, it is one more input: δy = −l·x·δε, with the fit's u(ε).
 *
 * Units: volumes mL, concentrations mol/L, relative SDs as fractions, absorbance SD dimensionless.
 * Reference: JCGM 100:2008 (GUM) §5.1.2, law of propagation of uncertainty; sensitivity of least-squares
 * estimates: Seber G.A.F. & Wild C.J., Nonlinear Regression (Wiley, 1989), §2.1.
 *
 * @param mixtures recipes and absorbances, in the order of the fit
 * @param model candidate of the fit
 * @param fit converged global fit of those mixtures
 * @param u input uncertainties
 * @example
 * propagateKUncertainty(mixtures, parseStoichiometry('1:1'), fit, { pipetteRelSd: 0.004, flaskRelSd: 0.001,
 *   stockRelSd: 0.005, absorbanceSd: 0.002 }).lnKSd; // e.g. 0.03 (3 % in K)
 */
export function propagateKUncertainty(
  mixtures: readonly MixtureMeasurement[],
  model: Stoichiometry,
  fit: GlobalFitResult,
  u: InputUncertainties,
): KPropagation | null {
  if (fit.k === null || fit.epsilonLPerMolCm === null || !fit.converged) return null;
  const n = mixtures.length;
  const k = fit.k;
  const eps = fit.epsilonLPerMolCm;
  const fitBaseline = fit.baseline !== null;
  const held = fit.epsilonFixed;
  const p = (held ? 1 : 2) + (fitBaseline ? 1 : 0);
  // Jacobian of the model at the solution and the sensitivities to A₀, B₀.
  const jac: number[][] = [];
  const dA0: number[] = [];
  const dB0: number[] = [];
  const dEps: number[] = [];
  const conc = mixtures.map((m) => mixtureInitialConcentrations(m));
  for (let i = 0; i < n; i++) {
    const l = mixtures[i].pathLengthCm;
    const s = solveEquilibrium(k, conc[i].a0M, conc[i].b0M, model);
    const sens = equilibriumSensitivity(s, model);
    const row = [eps * l * sens.dProductDLnK];
    if (!held) row.push(l * s.productM);
    if (fitBaseline) row.push(1);
    jac.push(row);
    dEps.push(l * s.productM);
    dA0.push(eps * l * sens.dProductDA0);
    dB0.push(eps * l * sens.dProductDB0);
  }
  const jtj: number[][] = Array.from({ length: p }, () => new Array<number>(p).fill(0));
  for (let i = 0; i < n; i++)
    for (let j = 0; j < p; j++) for (let c = 0; c < p; c++) jtj[j][c] += jac[i][j] * jac[i][c];
  const inv = invertSpd(jtj);
  if (!inv) return null;
  // Row 0 of (JᵀJ)⁻¹Jᵀ: ∂ln K/∂y_i.
  const g = jac.map((row) => row.reduce((s, v, j) => s + inv[0][j] * v, 0));
  const absorbanceSd = u.absorbanceSd ?? fit.residualSd ?? 0;
  let vAbs = 0;
  let vPip = 0;
  let vFlask = 0;
  const stockA = new Map<number, number>();
  const stockB = new Map<number, number>();
  for (let i = 0; i < n; i++) {
    const m = mixtures[i];
    const { a0M, b0M, totalVolumeMl: t } = conc[i];
    const reps = m.replicates ?? 1;
    vAbs += (g[i] * absorbanceSd) ** 2 / reps;
    // ∂A₀/∂V and ∂B₀/∂V: with a made-up total V_T is independent; otherwise V_T = V_A + V_B.
    const flask = isMadeUpToVolume(m);
    const da0dVa = flask ? a0M / m.volumeAMl : a0M * (1 / m.volumeAMl - 1 / t);
    const db0dVa = flask ? 0 : -b0M / t;
    const da0dVb = flask ? 0 : -a0M / t;
    const db0dVb = flask ? b0M / m.volumeBMl : b0M * (1 / m.volumeBMl - 1 / t);
    const effect = (da0: number, db0: number): number => -g[i] * (dA0[i] * da0 + dB0[i] * db0);
    if (m.volumeAMl > 0) vPip += (effect(da0dVa, db0dVa) * u.pipetteRelSd * m.volumeAMl) ** 2;
    if (m.volumeBMl > 0) vPip += (effect(da0dVb, db0dVb) * u.pipetteRelSd * m.volumeBMl) ** 2;
    if (flask) vFlask += (effect(-a0M / t, -b0M / t) * u.flaskRelSd * t) ** 2;
    // Stocks: ∂A₀/∂ln c_A = A₀; accumulate per distinct stock (shared input).
    stockA.set(m.stockAM, (stockA.get(m.stockAM) ?? 0) + effect(a0M, 0) * u.stockRelSd);
    stockB.set(m.stockBM, (stockB.get(m.stockBM) ?? 0) + effect(0, b0M) * u.stockRelSd);
  }
  const epsilonEffect = held ? -g.reduce((sum, gi, i) => sum + gi * dEps[i], 0) * (fit.epsilonSe ?? 0) : 0;
  const vEps = epsilonEffect * epsilonEffect;
  let vStock = 0;
  for (const v of stockA.values()) vStock += v * v;
  for (const v of stockB.values()) vStock += v * v;
  const total = vAbs + vPip + vFlask + vStock + vEps;
  const lnKSd = Math.sqrt(total);
  const share = (v: number): number => (total > 0 ? v / total : 0);
  return {
    model: model.label,
    k,
    lnKSd,
    kSd: k * lnKSd,
    contributions: {
      absorbance: share(vAbs),
      pipette: share(vPip),
      flask: share(vFlask),
      stock: share(vStock),
      epsilon: share(vEps),
    },
    absorbanceSdUsed: absorbanceSd,
  };
}
