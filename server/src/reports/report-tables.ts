import type { BatchAnalysisDto } from '../batches/batches.service';
import { formatK } from '../analysis/number-format';
import type { CsvCell } from './csv';

export type Table = CsvCell[][];

/** Every reading of the batch with the file it came from and what the manifest says of its position. */
export function readingsTable(a: BatchAnalysisDto): Table {
  const files = new Map(a.files.map((f) => [f.id, f]));
  const samples = new Map(a.samples.map((s) => [s.position, s]));
  const layout = new Map(a.layoutPositions.map((p) => [p.position, p]));
  const rows: Table = [
    ['file', 'sha256', 'position', 'wavelength_nm', 'absorbance', 'flag', 'sample_id', 'role'],
  ];
  for (const r of a.readings) {
    const file = files.get(r.intakeFileId);
    const sample = samples.get(r.position);
    rows.push([
      file?.originalName ?? null,
      file?.sha256 ?? null,
      r.position,
      r.wavelengthNm,
      r.absorbance,
      r.flag ?? null,
      sample?.sampleId ?? null,
      sample?.role ?? layout.get(r.position)?.role ?? null,
    ]);
  }
  return rows;
}

/** The analysis results as titled sections separated by an empty line. */
export function resultsTable(a: BatchAnalysisDto): Table {
  const r = a.result;
  const rows: Table = [];
  const section = (title: string, header: string[], body: CsvCell[][]): void => {
    if (rows.length) rows.push([]);
    rows.push([title]);
    rows.push(header);
    rows.push(...body);
  };
  section(
    'Positions',
    [
      'position',
      'sample_id',
      'role',
      'replicate_group',
      'absorbance_raw',
      'absorbance_corrected',
      'reads',
      'path_length_cm',
      'status',
      'exclusion_reason',
    ],
    r.positions.map((p) => [
      p.position,
      p.sampleId,
      p.role,
      p.replicateGroup,
      p.absorbanceRaw,
      p.absorbanceCorrected,
      p.reads,
      p.pathLengthCm,
      p.status,
      p.exclusionReason,
    ]),
  );
  const c = r.calibration;
  section(
    'Calibration',
    [
      'model',
      'n',
      'slope_per_M',
      'slope_se_per_M',
      'intercept',
      'intercept_se',
      'r2',
      'residual_sd',
      'epsilon_L_per_mol_cm',
      'epsilon_se_L_per_mol_cm',
      'lod_M',
      'loq_M',
    ],
    c
      ? [
          [
            c.model,
            c.n,
            c.slope,
            c.slopeSe,
            c.intercept,
            c.interceptSe,
            c.r2,
            c.residualSd,
            c.epsilonLPerMolCm,
            c.epsilonSe,
            c.lodM,
            c.loqM,
          ],
        ]
      : [],
  );
  section(
    'Unknowns and controls',
    [
      'sample_id',
      'kind',
      'positions',
      'n',
      'absorbance',
      'dilution_factor',
      'concentration_M',
      'se_M',
      'flags',
    ],
    [
      ...r.unknowns.map((u) => ({ u, kind: 'unknown' })),
      ...r.controls.map((u) => ({ u, kind: 'control' })),
    ].map(({ u, kind }) => [
      u.sampleId,
      kind,
      u.positions.join(' '),
      u.n,
      u.absorbance,
      u.dilutionFactor,
      u.concentrationM,
      u.seM,
      u.flags.join(' '),
    ]),
  );
  const models = r.stoichiometry?.candidates.map((cand) => cand.model) ?? [];
  section(
    'Mixtures',
    [
      'sample_id',
      'positions',
      'n',
      'a0_M',
      'b0_M',
      'mole_fraction_b',
      'absorbance',
      'product_M',
      ...models.map((m) => `K_${m}`),
    ],
    r.mixtures.map((m) => [
      m.sampleId,
      m.positions.join(' '),
      m.n,
      m.a0M,
      m.b0M,
      m.moleFractionB,
      m.absorbance,
      m.productM,
      ...models.map((model) => m.ice.find((row) => row.model === model)?.k ?? null),
    ]),
  );
  section(
    'Stoichiometry',
    [
      'model',
      'rank',
      'k_mean',
      'k_sd',
      'k_cv',
      'n_feasible',
      'n_infeasible',
      'k_status',
      'K',
      'K_unit',
      'K_se',
      'K_ci95_low',
      'K_ci95_high',
      'K_lower_bound_95',
      'K_upper_bound_95',
      'K_text',
      'epsilon_held',
      'aic',
      'delta_aic',
      'akaike_weight',
      'ruled_out',
      'reason',
    ],
    (r.stoichiometry?.candidates ?? []).map((cand) => [
      cand.model,
      cand.rank,
      cand.kMean,
      cand.kSd,
      cand.kCv,
      cand.nFeasible,
      cand.nInfeasible,
      cand.fit?.status ?? null,
      cand.fit?.k ?? null,
      cand.kUnit,
      cand.fit?.kSe ?? null,
      cand.fit?.kCi95?.[0] ?? null,
      cand.fit?.kCi95?.[1] ?? null,
      cand.fit?.kLowerBound95 ?? null,
      cand.fit?.kUpperBound95 ?? null,
      formatK(cand.fit),
      cand.fit?.epsilonFixed ?? null,
      cand.fit?.aic ?? null,
      cand.deltaAic,
      cand.akaikeWeight,
      cand.ruledOut,
      cand.reason,
    ]),
  );
  if (r.stoichiometry) {
    rows.push([]);
    rows.push(['Verdict']);
    rows.push([r.stoichiometry.verdict]);
    if (r.headline) rows.push([`K (${r.headline.model}) = ${r.headline.text}`]);
    rows.push([r.kNote]);
    rows.push([r.epsilonSource.note]);
  }
  section(
    'QC flags',
    ['severity', 'code', 'position', 'sample_id', 'value', 'threshold', 'message'],
    r.qc.map((f) => [f.severity, f.code, f.position, f.sampleId, f.value, f.threshold, f.message]),
  );
  return rows;
}
