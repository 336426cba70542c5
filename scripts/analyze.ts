/**
 * Command-line front end of the analysis module.
 *
 *   npm run analyze -- --readings <file> --manifest <file> [--wavelength 447] [--path-cm 1]
 *                      [--plate 96|384|cuvette] [--mc <draws>] [--seed <n>] [--json]
 *
 * Reads a long-table readings CSV and a manifest CSV (the default formats), runs analyzeBatch and
 * prints a summary, or one JSON object with --json. A file that cannot be read prints one line naming
 * the file, row and column, and exits with code 2.
 */
import { readFile } from 'node:fs/promises';
import { basename } from 'node:path';
import { parseArgs } from 'node:util';
import { analyzeBatch, AnalysisError, BatchResult } from '../server/src/analysis';
import { parseInstrumentFile, parseManifestCsv, ParseError, type PlateFormat } from '../server/src/parsers';

const USAGE =
  'usage: npm run analyze -- --readings <file> --manifest <file> [--wavelength <nm>] [--path-cm <cm>] ' +
  '[--plate 96|384|cuvette] [--mc <draws>] [--seed <n>] [--json]';

class UsageError extends Error {}

function numberOption(name: string, text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (!Number.isFinite(v)) throw new UsageError(`--${name} needs a number, got "${text}"`);
  return v;
}

async function readInput(path: string): Promise<Buffer> {
  try {
    return await readFile(path);
  } catch (e) {
    throw new UsageError(
      `${path}: cannot be read (${(e as NodeJS.ErrnoException).code ?? (e as Error).message})`,
    );
  }
}

/** Plate format from the manifest positions: all `C…` is a cuvette sequence; beyond H/12 is a 384 plate. */
function guessPlateFormat(positions: readonly string[]): PlateFormat {
  if (positions.length > 0 && positions.every((p) => /^C\d+$/i.test(p))) return 'cuvette';
  const beyond96 = positions.some((p) => {
    const m = /^([A-Za-z])(\d+)$/.exec(p);
    return m !== null && (m[1].toUpperCase() > 'H' || Number(m[2]) > 12);
  });
  return beyond96 ? 384 : 96;
}

/** The JSON shape of the CLI: snake_case keys as documented for scripts and reports. */
export function toCliJson(r: BatchResult): Record<string, unknown> {
  const cal = r.calibration;
  const qcWarnings = r.qc.filter((f) => f.severity !== 'info').map((f) => f.message);
  return {
    wavelength_nm: r.wavelengthNm,
    path_length_cm: r.pathLengthCm,
    blank: { n: r.blank.n, mean_absorbance: r.blank.meanAbsorbance, sd: r.blank.sd },
    calibration: cal && {
      slope: cal.slope,
      intercept: cal.intercept,
      slopeSE: cal.slopeSe,
      interceptSE: cal.interceptSe,
      r2: cal.r2,
      epsilon: cal.epsilonLPerMolCm,
      lod: cal.lodM,
      loq: cal.loqM,
      n: cal.n,
    },
    unknowns: r.unknowns.map((u) => ({
      sample_id: u.sampleId,
      concentration_M: u.concentrationM,
      se_M: u.seM,
      flags: u.flags,
    })),
    mixtures: r.mixtures.map((m) => ({
      sample_id: m.sampleId,
      a0_M: m.a0M,
      b0_M: m.b0M,
      product_M: m.productM,
    })),
    stoichiometry: (r.stoichiometry?.candidates ?? []).map((c) => ({
      model: c.model,
      K_mean: c.kMean,
      K_sd: c.kSd,
      K_cv: c.kCv,
      aic: c.fit?.aic ?? null,
      fitK: c.fit?.k ?? null,
      fitK_ci95: c.fit?.kCi95 ?? null,
      fitEpsilon: c.fit?.epsilonLPerMolCm ?? null,
      rank: c.rank,
      ruled_out: c.ruledOut,
      reason: c.reason,
    })),
    best: r.stoichiometry?.best ?? null,
    ambiguous: r.stoichiometry?.ambiguous ?? false,
    verdict: r.stoichiometry?.verdict ?? null,
    uncertainty: r.uncertainty && {
      model: r.uncertainty.model,
      K_rel_sd_propagated: r.uncertainty.propagation?.lnKSd ?? null,
      K_mc_ci95: r.uncertainty.monteCarlo?.kCi95 ?? null,
      mc_draws: r.uncertainty.monteCarlo?.draws ?? 0,
    },
    job: r.job && {
      max_mole_fraction_b: r.job.maxMoleFractionB,
      nearest_model: r.job.nearestModel,
      n: r.job.n,
    },
    benesi_hildebrand: r.benesiHildebrand && {
      applicable: r.benesiHildebrand.applicable,
      K: r.benesiHildebrand.result?.k ?? null,
      epsilon: r.benesiHildebrand.result?.epsilonLPerMolCm ?? null,
      ratio_to_fit: r.benesiHildebrand.kRatioToGlobalFit,
    },
    qc: r.qc,
    warnings: [...r.warnings, ...qcWarnings],
  };
}

const g = (v: number | null | undefined, digits = 4): string =>
  v === null || v === undefined ? '—' : v.toPrecision(digits);

function summary(r: BatchResult): string {
  const out: string[] = [];
  out.push(
    `Wavelength ${r.wavelengthNm ?? '—'} nm, path ${r.pathLengthCm} cm; blank ${g(r.blank.meanAbsorbance, 3)} (n = ${r.blank.n})`,
  );
  const c = r.calibration;
  if (c) {
    out.push(
      `Calibration (${c.model}, n = ${c.n}): A = ${g(c.slope, 5)}·c ${c.intercept >= 0 ? '+' : '−'} ${g(Math.abs(c.intercept), 3)}; ` +
        `R² = ${c.r2.toFixed(5)}; ε = ${g(c.epsilonLPerMolCm, 5)} ± ${g(c.epsilonSe, 2)} L/(mol·cm); ` +
        `LOD ${g(c.lodM, 3)} M, LOQ ${g(c.loqM, 3)} M`,
    );
  } else out.push('Calibration: none');
  for (const u of r.unknowns) {
    out.push(
      `  ${u.sampleId}: ${g(u.concentrationM)} ± ${g(u.seM, 2)} M (×${u.dilutionFactor}${u.flags.length ? `; ${u.flags.join(', ')}` : ''})`,
    );
  }
  if (r.mixtures.length) out.push(`Mixtures: ${r.mixtures.length}`);
  for (const s of r.stoichiometry?.candidates ?? []) {
    const ci = s.fit?.kCi95 ? ` [${g(s.fit.kCi95[0], 3)}, ${g(s.fit.kCi95[1], 3)}]` : '';
    out.push(
      `  ${s.rank}. ${s.model}: fit K = ${g(s.fit?.k ?? null)}${ci}, ε = ${g(s.fit?.epsilonLPerMolCm ?? null)}, ` +
        `AIC ${g(s.fit?.aic ?? null, 5)}; per-mixture K ${g(s.kMean)} (CV ${s.kCv === null ? '—' : (s.kCv * 100).toFixed(1) + ' %'})`,
    );
  }
  if (r.stoichiometry) out.push(`Verdict: ${r.stoichiometry.verdict}`);
  const u = r.uncertainty;
  if (u?.propagation)
    out.push(`Uncertainty of K (${u.model}): ±${(u.propagation.lnKSd * 100).toFixed(1)} % (first order)`);
  if (u?.monteCarlo)
    out.push(
      `  Monte Carlo (${u.monteCarlo.draws} draws): 95 % [${g(u.monteCarlo.kCi95[0])}, ${g(u.monteCarlo.kCi95[1])}]`,
    );
  if (r.job?.maxMoleFractionB != null)
    out.push(
      `Job's plot: maximum at x_B = ${r.job.maxMoleFractionB.toFixed(3)} (nearest ${r.job.nearestModel})`,
    );
  const bh = r.benesiHildebrand;
  if (bh?.result?.k != null)
    out.push(
      `Benesi–Hildebrand (1:1): K = ${g(bh.result.k)} (×${g(bh.kRatioToGlobalFit, 3)} of the global fit)`,
    );
  for (const f of r.qc) out.push(`QC ${f.severity}: ${f.message}`);
  for (const w of r.warnings) out.push(`Warning: ${w}`);
  return out.join('\n');
}

async function main(): Promise<number> {
  const { values } = parseArgs({
    options: {
      readings: { type: 'string' },
      manifest: { type: 'string' },
      wavelength: { type: 'string' },
      'path-cm': { type: 'string' },
      plate: { type: 'string' },
      mc: { type: 'string' },
      seed: { type: 'string' },
      json: { type: 'boolean', default: false },
    },
    strict: true,
  });
  if (!values.readings || !values.manifest) throw new UsageError(USAGE);
  const wavelengthNm = numberOption('wavelength', values.wavelength);
  const pathLengthCm = numberOption('path-cm', values['path-cm']);
  const draws = numberOption('mc', values.mc) ?? 0;
  const seed = numberOption('seed', values.seed) ?? 1;
  if (values.plate !== undefined && !['96', '384', 'cuvette'].includes(values.plate)) {
    throw new UsageError(`--plate must be 96, 384 or cuvette, got "${values.plate}"`);
  }

  const manifestName = basename(values.manifest);
  const manifest = await parseManifestCsv(await readInput(values.manifest), manifestName);
  if (manifest.problems.length > 0) {
    const p = manifest.problems[0];
    const more = manifest.problems.length > 1 ? ` (and ${manifest.problems.length - 1} more problems)` : '';
    throw new UsageError(`${manifestName} row ${p.row}, column "${p.column}": ${p.message}${more}`);
  }
  const plateFormat: PlateFormat =
    values.plate === undefined
      ? guessPlateFormat(manifest.samples.map((s) => s.position))
      : values.plate === 'cuvette'
        ? 'cuvette'
        : (Number(values.plate) as 96 | 384);
  const run = await parseInstrumentFile(await readInput(values.readings), basename(values.readings), {
    plateFormat,
  });
  const result = analyzeBatch(run.readings, manifest.samples, {
    wavelengthNm: wavelengthNm ?? null,
    pathLengthCm,
    monteCarlo: { draws, seed },
  });
  process.stdout.write((values.json ? JSON.stringify(toCliJson(result), null, 2) : summary(result)) + '\n');
  return 0;
}

main().then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    if (e instanceof ParseError || e instanceof UsageError) {
      process.stderr.write(`analyze: ${e.message}\n`);
      process.exitCode = 2;
    } else if (e instanceof AnalysisError) {
      process.stderr.write(`analyze: ${e.message}\n`);
      process.exitCode = 1;
    } else if (
      e instanceof TypeError &&
      (e as NodeJS.ErrnoException).code === 'ERR_PARSE_ARGS_UNKNOWN_OPTION'
    ) {
      process.stderr.write(`analyze: ${(e as Error).message}\n${USAGE}\n`);
      process.exitCode = 2;
    } else {
      process.stderr.write(`analyze: unexpected error: ${(e as Error).stack ?? String(e)}\n`);
      process.exitCode = 1;
    }
  },
);
