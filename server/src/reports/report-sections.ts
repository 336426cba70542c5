import {
  type CandidateResult,
  type ControlResult,
  type UnknownResult,
  DASH,
  EPSILON_UNIT,
  formatK,
  formatKValue,
  formatNumber,
  guidanceFor,
  inReportingUnit,
  kUnitOf,
  reportingUnitOf,
  roundSignificant,
  unitKey,
} from '../analysis';
import type { BatchAnalysisDto } from '../batches/batches.service';
import type { ReportCell, ReportSection } from './report-model';
import {
  PDF,
  SHEETS,
  col,
  count,
  decimals,
  findingsCell,
  fraction,
  measured,
  minute,
  missing,
  num,
  ownFindings,
  right,
  text,
} from './report-cells';

/** The result sections of a batch report, each from the batch's analysis result. */

export function positionsSection(a: BatchAnalysisDto): ReportSection {
  const qc = a.result.qc;
  return {
    title: 'Positions',
    details: [],
    figures: [],
    notes: [],
    in: SHEETS,
    tables: [
      {
        title: 'Positions',
        columns: [
          col('position', 'Position', 40),
          col('sample_id', 'Sample', 60),
          col('role', 'Role', 40),
          col('replicate_group', 'Group', 40),
          col('absorbance_raw', 'A raw', 40, right),
          col('absorbance_corrected', 'A corrected', 40, right),
          col('reads', 'Reads', 30, right),
          col('path_length_cm', 'Path', 30, { ...right, unit: 'cm' }),
          col('status', 'Status', 40),
          col('exclusion_reason', 'Exclusion reason', 80),
          col('qc', 'QC', 80),
        ],
        rows: a.result.positions.map((p) => [
          text(p.position),
          text(p.sampleId),
          text(p.role),
          text(p.replicateGroup),
          decimals(p.absorbanceRaw, 4),
          decimals(p.absorbanceCorrected, 4),
          count(p.reads),
          num(p.pathLengthCm, 6),
          text(p.status),
          text(p.exclusionReason),
          findingsCell(ownFindings(qc, null, [p.position]).map((f) => f.code)),
        ]),
      },
    ],
  };
}

export function calibrationSection(a: BatchAnalysisDto): ReportSection {
  const c = a.result.calibration;
  const extrapolated = (cell: ReportCell, yes: boolean): ReportCell =>
    yes ? { ...cell, text: `${cell.text} (extrapolated)` } : cell;
  const withSe = (v: number, se: number | null): ReportCell => {
    const cell = measured(v, se);
    return missing(se) ? cell : { ...cell, text: `${cell.text} ± ${formatNumber(se, 2)}` };
  };
  const pdfOnly = { in: PDF };
  const sheetsOnly = { in: SHEETS };
  return {
    title: 'Calibration',
    details: [],
    figures: c ? [{ kind: 'calibration', calibration: c }] : [],
    notes: c
      ? []
      : [{ text: 'No calibration: the batch has too few usable standards.', style: 'muted', in: PDF }],
    tables: [
      {
        title: 'Calibration',
        pdfLayout: 'quantities',
        columns: [
          col('model', 'Model', 0, sheetsOnly),
          col('n', 'Standards used', 0, right),
          col('slope_per_M', 'Slope ± SE', 0, { unit: 'L·mol⁻¹', ...right }),
          col('slope_se_per_M', 'Slope SE', 0, { unit: 'L·mol⁻¹', ...sheetsOnly }),
          col('intercept', 'Intercept ± SE', 0, { unit: 'absorbance' }),
          col('intercept_se', 'Intercept SE', 0, { unit: 'absorbance', ...sheetsOnly }),
          col('r2', 'R²', 0),
          col('residual_sd', 'Residual SD', 0, { unit: 'absorbance' }),
          col('epsilon_L_per_mol_cm', 'ε ± SE', 0, { unit: EPSILON_UNIT }),
          col('epsilon_se_L_per_mol_cm', 'ε SE', 0, { unit: EPSILON_UNIT, ...sheetsOnly }),
          col('lod_M', 'LOD', 0, { unit: 'mol/L' }),
          col('loq_M', 'LOQ', 0, { unit: 'mol/L' }),
          col('linearity', 'Linearity (Mandel, ISO 8466-1)', 0, pdfOnly),
        ],
        rows: c
          ? [
              [
                text(c.model),
                count(c.n),
                withSe(c.slope, c.slopeSe),
                num(c.slopeSe, 2),
                withSe(c.intercept, c.interceptSe),
                num(c.interceptSe, 2),
                decimals(c.r2, 6, 5),
                num(c.residualSd, 3),
                withSe(c.epsilonLPerMolCm, c.epsilonSe),
                num(c.epsilonSe, 2),
                extrapolated(num(c.lodM, 3), c.lodExtrapolated),
                extrapolated(num(c.loqM, 3), c.loqExtrapolated),
                text(
                  c.linearity
                    ? `PW ${formatNumber(c.linearity.testValue)} vs F ${formatNumber(c.linearity.criticalValue)}: ${c.linearity.curved ? 'curved' : 'linear'}`
                    : 'needs 5 standards',
                ),
              ],
            ]
          : [],
        // Without a calibration the PDF says so in a note; the spreadsheets keep the empty table.
        in: c ? undefined : SHEETS,
      },
    ],
  };
}

export function unknownsSection(a: BatchAnalysisDto): ReportSection {
  const r = a.result;
  // Values in the batch's reporting unit; the result itself holds mol/L.
  const unit = reportingUnitOf(r.settings);
  const inUnit = (m: number | null | undefined): number | null => inReportingUnit(m, unit);
  const key = unitKey(unit.unit);
  // Nominal value and recovery only when a control has a nominal value (results from before have none).
  const recovery = r.controls.some((c) => c.nominalM != null);
  const rows: { u: UnknownResult | ControlResult; kind: string }[] = [
    ...r.unknowns.map((u) => ({ u, kind: 'unknown' })),
    ...r.controls.map((u) => ({ u, kind: 'control' })),
  ];
  return {
    title: 'Unknowns and controls',
    details: [],
    figures: [],
    notes: recovery
      ? [
          {
            text: `Recovery = measured / nominal × 100 %; acceptance limits ${r.settings.recoveryLimitsPct.join('–')} %.`,
            style: 'muted',
          },
        ]
      : [],
    tables: [
      {
        title: 'Unknowns and controls',
        columns: [
          col('sample_id', 'Sample', recovery ? 72 : 90),
          col('kind', 'Kind', 48),
          col('positions', 'Positions', 60, { in: SHEETS }),
          col('n', 'n', 22, right),
          col('absorbance', 'Absorbance', 60, right),
          col('dilution_factor', 'Dilution', 44, right),
          col(`concentration_${key}`, 'c', 70, { unit: unit.unit, ...right }),
          col(`se_${key}`, 'SE', 60, { unit: unit.unit, ...right }),
          ...(recovery
            ? [
                col(`nominal_${key}`, 'Nominal', 84, { unit: unit.unit, ...right }),
                col('recovery_pct', 'Recovery', 68, { unit: '%', ...right }),
              ]
            : []),
          col('flags', 'QC', recovery ? 84 : 105),
        ],
        rows: rows.map(({ u, kind }) => [
          text(u.sampleId),
          text(kind),
          text(u.positions.join(' ')),
          count(u.n),
          decimals(u.absorbance, 4, 4),
          num(u.dilutionFactor, 6),
          measured(inUnit(u.concentrationM), inUnit(u.seM)),
          num(inUnit(u.seM), 2, 2),
          ...(recovery
            ? [
                num(inUnit('nominalM' in u ? u.nominalM : null), 6),
                decimals('recoveryPct' in u ? u.recoveryPct : null, 1),
              ]
            : []),
          findingsCell([...u.flags, ...ownFindings(r.qc, u.sampleId, u.positions).map((f) => f.code)]),
        ]),
      },
    ],
  };
}

export function mixturesSection(a: BatchAnalysisDto): ReportSection {
  const r = a.result;
  const models = r.stoichiometry?.candidates.map((c) => c.model) ?? [];
  return {
    title: 'Mixtures',
    details: [],
    figures: [],
    notes: [],
    tables: [
      {
        title: 'Mixtures',
        columns: [
          col('sample_id', 'Sample', 62),
          col('positions', 'Positions', 50, { in: SHEETS }),
          col('n', 'n', 20, { in: SHEETS, ...right }),
          col('a0_M', 'A₀', 50, { unit: 'M', ...right }),
          col('b0_M', 'B₀', 50, { unit: 'M', ...right }),
          col('mole_fraction_b', 'x(B)', 32, right),
          col('absorbance', 'Absorbance', 54, right),
          col('product_M', 'Complex', 56, { unit: 'M', ...right }),
          ...models.map((m) => col(`K_${m}`, `K ${m}`, 48, { unit: kUnitOf(m), ...right })),
          col('flags', 'QC', 80, { in: SHEETS }),
        ],
        rows: r.mixtures.map((m) => [
          text(m.sampleId),
          text(m.positions.join(' ')),
          count(m.n),
          num(m.a0M, 6),
          num(m.b0M, 6),
          decimals(m.moleFractionB, 4, 3),
          decimals(m.absorbance, 4, 4),
          num(m.productM, 4),
          ...models.map((model): ReportCell => {
            const row = m.ice.find((ice) => ice.model === model);
            if (!row) return { text: DASH, value: null };
            return row.feasible ? num(row.k, 4) : { text: 'impossible', value: null };
          }),
          findingsCell([...m.flags, ...ownFindings(r.qc, m.sampleId, m.positions).map((f) => f.code)]),
        ]),
        empty: 'No mixtures.',
      },
    ],
  };
}

export function iceSection(a: BatchAnalysisDto): ReportSection {
  const r = a.result;
  return {
    title: 'ICE tables',
    details: [],
    figures: [],
    notes: r.mixtures.length
      ? [
          {
            text: 'Initial, change, equilibrium for a A + b B forming the complex (a:b): x = A/(ε·l) is the complex measured, [A] = A₀ − a·x, [B] = B₀ − b·x, K = x/([A]^a·[B]^b). A candidate is impossible for a mixture where a reactant would go to zero or below.',
            style: 'muted',
            in: PDF,
          },
        ]
      : [],
    tables: [
      {
        title: 'ICE tables',
        columns: [
          col('sample_id', 'Sample', 62),
          col('model', 'Model', 34),
          col('a0_M', 'A₀', 50, { unit: 'M', ...right }),
          col('b0_M', 'B₀', 50, { unit: 'M', ...right }),
          col('complex_M', 'x', 50, { unit: 'M', ...right }),
          col('a_eq_M', '[A]', 50, { unit: 'M', ...right }),
          col('b_eq_M', '[B]', 50, { unit: 'M', ...right }),
          col('K', 'K', 56, right),
          col('K_unit', 'K unit', 44),
          col('feasible', 'Feasible', 40),
        ],
        rows: r.mixtures.flatMap((m) =>
          m.ice.map((row) => [
            text(m.sampleId),
            text(row.model),
            num(m.a0M, 6),
            num(m.b0M, 6),
            num(row.productM, 4),
            num(row.aFreeM, 4),
            num(row.bFreeM, 4),
            row.feasible ? num(row.k, 4) : { text: 'impossible', value: null },
            text(kUnitOf(row.model)),
            { text: row.feasible ? 'yes' : 'no', value: row.feasible },
          ]),
        ),
        empty: 'No mixtures, so no ICE tables.',
      },
    ],
  };
}

export function jobSection(a: BatchAnalysisDto): ReportSection {
  const job = a.result.job;
  if (!job)
    return {
      title: "Job's method",
      details: [],
      figures: [],
      tables: [],
      notes: [
        {
          text: "No Job's series among the mixtures (at least the minimum number at one total concentration).",
          style: 'muted',
          in: PDF,
        },
      ],
    };
  const members = new Set(job.sampleIds);
  return {
    title: "Job's method",
    details: [],
    figures: [{ kind: 'job', job, mixtures: a.result.mixtures.filter((m) => members.has(m.sampleId)) }],
    notes: [{ text: job.message.charAt(0).toUpperCase() + job.message.slice(1) }],
    tables: [
      {
        title: "Job's method",
        pdfLayout: 'quantities',
        columns: [
          col('n', 'Mixtures in the series', 0, right),
          col('total_concentration_M', 'A₀ + B₀', 0, { unit: 'M', ...right }),
          col('max_mole_fraction_b', 'Maximum at x(B)', 0, right),
          col('implied_ratio_b_to_a', 'Implied b/a', 0, right),
          col('nearest_model', 'Nearest candidate', 0),
          col('absorbance_at_max', 'Absorbance at the maximum', 0, right),
          col('sharpness', 'Sharpness (1 = a sharp corner)', 0, right),
          col('sample_ids', 'Samples', 0, { in: SHEETS }),
        ],
        rows: [
          [
            count(job.n),
            num(job.totalConcentrationM, 4),
            decimals(job.maxMoleFractionB, 3),
            num(job.impliedRatioBToA, 3),
            text(job.nearestModel, DASH),
            decimals(job.absorbanceAtMax, 4),
            num(job.sharpness, 3),
            text(job.sampleIds.join(' ')),
          ],
        ],
      },
    ],
  };
}

export function stoichiometrySection(a: BatchAnalysisDto): ReportSection {
  const r = a.result;
  const ci = (c: CandidateResult): string =>
    c.fit?.status === 'determined' && c.fit.kCi95
      ? `${formatNumber(c.fit.kCi95[0])} – ${formatNumber(c.fit.kCi95[1])}`
      : c.fit
        ? c.fit.status.replace('-', ' ')
        : DASH;
  const notes: ReportSection['notes'] = [];
  if (r.stoichiometry) {
    notes.push({ text: r.stoichiometry.verdict, style: 'emphasis' });
    if (r.headline) notes.push({ text: `K (${r.headline.model}) = ${r.headline.text}`, in: SHEETS });
    notes.push({ text: r.kNote, style: 'muted', in: SHEETS });
    notes.push({ text: r.epsilonSource.note, style: 'muted', in: SHEETS });
  }
  if (r.headline) notes.push({ text: `${r.kNote} ${r.epsilonSource.note}.`, style: 'muted', in: PDF });
  const u = r.uncertainty;
  if (u?.propagation || u?.monteCarlo) {
    const parts: string[] = [];
    if (u.propagation) parts.push(`propagated SD of K ${formatNumber(u.propagation.kSd)} (${u.model})`);
    if (u.monteCarlo)
      parts.push(
        `Monte Carlo (${u.monteCarlo.draws} draws) median K ${formatNumber(u.monteCarlo.kMedian)}, 95 % interval ${formatNumber(u.monteCarlo.kCi95[0])} to ${formatNumber(u.monteCarlo.kCi95[1])}`,
      );
    notes.push({ text: `Uncertainty of K: ${parts.join('; ')}.` });
  }
  return {
    title: 'Stoichiometry',
    details: [],
    figures: [],
    notes,
    tables: [
      {
        title: 'Stoichiometry',
        empty: 'No mixtures, or no ε: no stoichiometry was assessed.',
        columns: [
          col('model', 'Model', 36),
          col('rank', 'Rank', 30, right),
          col('k_mean', 'Mean K', 56, right),
          col('k_sd', 'SD of K', 0, { in: SHEETS }),
          col('k_cv', 'CV', 40, right),
          col('n_feasible', 'Feasible mixtures', 0, { in: SHEETS }),
          col('n_infeasible', 'Impossible mixtures', 0, { in: SHEETS }),
          col('k_status', 'K status', 0, { in: SHEETS }),
          col('K', 'K (global fit)', 56, right),
          col('K_unit', 'Unit', 30, { in: SHEETS }),
          col('K_se', 'SE of K', 0, { in: SHEETS }),
          col('K_ci', '95 % CI', 90, { in: PDF, ...right }),
          col('K_ci95_low', '95 % CI low', 0, { in: SHEETS }),
          col('K_ci95_high', '95 % CI high', 0, { in: SHEETS }),
          col('K_lower_bound_95', '95 % lower bound', 0, { in: SHEETS }),
          col('K_upper_bound_95', '95 % upper bound', 0, { in: SHEETS }),
          col('K_text', 'K as stated', 0, { in: SHEETS }),
          col('epsilon_held', 'ε held', 0, { in: SHEETS }),
          col('AIC', 'AIC', 44, right),
          col('delta_AIC', 'ΔAIC', 36, right),
          col('akaike_weight', 'Weight', 38, right),
          col('unit', 'Unit', 46, { in: PDF }),
          col('ruled_out', 'Ruled out', 0, { in: SHEETS }),
          col('reason', 'Note', 110),
        ],
        rows: (r.stoichiometry?.candidates ?? []).map((c) => {
          const fit = c.fit;
          const k: ReportCell = { ...measured(fit?.k, fit?.kSe), text: formatKValue(fit) };
          return [
            text(c.model),
            count(c.rank),
            num(c.kMean, 4),
            num(c.kSd, 2),
            fraction(c.kCv),
            count(c.nFeasible),
            count(c.nInfeasible),
            text(fit?.status ?? null),
            k,
            text(c.kUnit),
            num(fit?.kSe, 2),
            text(ci(c)),
            // The interval to the same decimal place as K itself.
            measured(fit?.kCi95?.[0], fit?.kSe),
            measured(fit?.kCi95?.[1], fit?.kSe),
            num(fit?.kLowerBound95, 3),
            num(fit?.kUpperBound95, 3),
            text(formatK(fit)),
            { text: fit ? (fit.epsilonFixed ? 'yes' : 'no') : DASH, value: fit?.epsilonFixed ?? null },
            decimals(fit?.aic, 3, 2),
            decimals(c.deltaAic, 3, 2),
            c.akaikeWeight !== null && c.akaikeWeight < 0.001
              ? { text: '< 0.001', value: roundSignificant(c.akaikeWeight, 3) }
              : num(c.akaikeWeight, 3, 2),
            text(kUnitOf(c.model)),
            { text: c.ruledOut ? 'yes' : 'no', value: c.ruledOut },
            { text: c.ruledOut ? `ruled out: ${c.reason}` : c.reason, value: c.reason },
          ];
        }),
      },
    ],
  };
}

export function qcSection(a: BatchAnalysisDto): ReportSection {
  const r = a.result;
  return {
    title: 'QC flags',
    details: [],
    figures: [],
    notes: r.warnings.map((w) => ({ text: `Note: ${w}`, style: 'muted' as const, in: PDF })),
    tables: [
      {
        title: 'QC flags',
        empty: 'No QC flags.',
        columns: [
          col('severity', 'Severity', 48),
          col('code', 'Code', 0, { in: SHEETS }),
          col('finding', 'Finding', 170),
          col('position', 'Where', 50),
          col('sample_id', 'Sample', 0, { in: SHEETS }),
          col('value', 'Value', 0, { in: SHEETS }),
          col('threshold', 'Threshold', 0, { in: SHEETS }),
          col('message', 'Details', 231),
        ],
        rows: r.qc.map((f) => {
          const g = guidanceFor(f.code);
          return [
            text(f.severity),
            text(f.code),
            { text: `${g.title}. ${g.meaning}`, value: g.title },
            // The page names position and sample together; the spreadsheets keep them apart.
            { text: [f.position, f.sampleId].filter(Boolean).join(' '), value: f.position },
            text(f.sampleId),
            num(f.value, 4),
            num(f.threshold, 4),
            text(f.message),
          ];
        }),
      },
    ],
  };
}

export function filesSection(a: BatchAnalysisDto): ReportSection {
  return {
    title: 'Files',
    details: [],
    figures: [],
    notes: [],
    tables: [
      {
        title: 'Files',
        empty: 'No files stored yet.',
        columns: [
          col('file', 'File', 122),
          col('received_at', 'Received (UTC)', 68),
          col('sha256', 'SHA-256', 309),
        ],
        rows: (a.record?.files ?? a.files).map((f) => [
          text(f.originalName),
          { text: minute(f.receivedAt), value: f.receivedAt },
          text(f.sha256),
        ]),
      },
    ],
  };
}

/** Who reviewed and approved, when, and with what comment: from the approval record where there is one. */
