import { DASH, EPSILON_UNIT, formatQuantity, reportingUnitOf, roundSignificant } from '../analysis';
import type { AuditDto } from '../audit/audit.service';
import type { BatchAnalysisDto } from '../batches/batches.service';
import type { BatchComment } from '../contracts/comments';
import { ROLE_LABELS } from '../contracts/roles';
import { PDF, SHEETS, col, count, detail, minute, missing, right, text } from './report-cells';
import type { BatchReport, ReportCell, ReportSection, ReportTable } from './report-model';
import {
  calibrationSection,
  filesSection,
  iceSection,
  jobSection,
  mixturesSection,
  positionsSection,
  qcSection,
  stoichiometrySection,
  unknownsSection,
} from './report-sections';

export interface BatchReportInput {
  analysis: BatchAnalysisDto;
  /** Audit entries of the batch, oldest first. */
  trail: AuditDto[];
  /** The engine this server runs (an approved batch names its record's engine instead). */
  engineVersion?: string;
  generatedAt?: Date;
  /** The batch's comments in reading order (threads, oldest first); the report lists them last. */
  comments?: BatchComment[];
}

export function buildBatchReport(input: BatchReportInput): BatchReport {
  const { analysis: a } = input;
  const b = a.batch;
  const r = a.result;
  const generated = minute((input.generatedAt ?? new Date()).toISOString());
  return {
    title: `Batch report: ${b.name}`,
    subtitle: `Equilight · batch ${b.id} · ${b.state} · generated ${generated}`,
    verdict: r.stoichiometry?.verdict
      ? {
          text: r.stoichiometry.verdict,
          kLine: r.headline ? `K (${r.headline.model}) = ${r.headline.text}` : null,
        }
      : null,
    footer: b.name,
    sections: [
      batchSection(input),
      {
        title: 'Layout map',
        details: [],
        figures: [{ kind: 'layout-map', positions: r.positions, roles: rolesOf(a) }],
        tables: [],
        notes: [],
        in: PDF,
      },
      positionsSection(a),
      calibrationSection(a),
      unknownsSection(a),
      mixturesSection(a),
      iceSection(a),
      jobSection(a),
      stoichiometrySection(a),
      qcSection(a),
      filesSection(a),
      reviewSection(input),
      ...commentsSection(input.comments ?? []),
    ],
  };
}

/**
 * The comments, when there are any: notes beside the analysis, not part of it. A reply names the
 * comment it answers; a removed comment reads as such (what it said is in the audit trail only).
 */
function commentsSection(comments: BatchComment[]): ReportSection[] {
  if (!comments.length) return [];
  return [
    {
      title: 'Comments',
      details: [],
      figures: [],
      notes: [],
      tables: [
        {
          title: 'Comments',
          columns: [
            col('comment_id', 'No.', 28, right),
            col('reply_to', 'Reply to', 40, { ...right, in: SHEETS }),
            col('at', 'When (UTC)', 72),
            col('author', 'Who', 95),
            col('role', 'Role', 58),
            col('text', 'Comment', 246),
          ],
          rows: comments.map((c) => [
            count(c.id),
            c.replyToId === null ? text(null) : count(c.replyToId),
            { text: minute(c.createdAt), value: c.createdAt },
            text(c.authorName),
            { text: ROLE_LABELS[c.authorRole], value: c.authorRole },
            c.removed
              ? text(`Comment removed${c.removedBy ? ` by ${c.removedBy}` : ''}, ${minute(c.removedAt)}`)
              : text(c.replyToId === null ? c.text : `Re ${c.replyToId}: ${c.text}`),
          ]),
        },
      ],
    },
  ];
}

function rolesOf(a: BatchAnalysisDto): Map<string, string> {
  const roles = new Map(a.layoutPositions.map((p) => [p.position, p.role]));
  for (const p of a.result.positions) if (p.role && !roles.has(p.position)) roles.set(p.position, p.role);
  return roles;
}

function batchSection(input: BatchReportInput): ReportSection {
  const a = input.analysis;
  const b = a.batch;
  const r = a.result;
  // An approved batch reports the settings its approval record froze.
  const s = a.record?.settings ?? b.settings;
  const rec = a.record;
  const epsilonFrom =
    s.epsilonSource && s.epsilonLPerMolCm !== null
      ? `${formatQuantity(s.epsilonLPerMolCm, EPSILON_UNIT)}, from batch "${s.epsilonSource.batchName}" (id ${s.epsilonSource.batchId}), ${s.epsilonSource.recordId !== null ? `approval record ${s.epsilonSource.recordId}` : `its analysis of ${minute(s.epsilonSource.takenAt)} (not approved then)`}`
      : r.epsilonSource.kind === 'none'
        ? 'none (fitted with K)'
        : `${formatQuantity(r.epsilonSource.epsilonLPerMolCm, EPSILON_UNIT)} — ${r.epsilonSource.kind === 'given' ? 'given' : "this batch's standards"}`;
  const percent = (v: number): string => `${(v * 100).toFixed(1)} %`;
  // The unit and limits the numbers were computed with (a result from before units has neither: mol/L).
  const unit = reportingUnitOf(r.settings);
  const limits = r.settings.recoveryLimitsPct ?? null;
  const engine = rec ? rec.engine.version : (input.engineVersion ?? null);
  return {
    title: 'Batch',
    details: [
      detail('batch_id', 'Batch id', String(b.id), b.id, SHEETS),
      detail('name', 'Name', b.name),
      detail('state', 'State', b.state, b.state, SHEETS),
      detail('instrument', 'Instrument', b.profileName ?? `profile ${b.profileId}`),
      detail('layout', 'Layout', `${b.layoutName ?? `layout ${b.layoutId}`} v${b.layoutVersion}`),
      detail('manifest', 'Manifest', `${b.manifestName ?? `manifest ${b.manifestId}`} v${b.manifestVersion}`),
      detail('run_id', 'Run id', b.runId),
      detail('system', 'System', b.systemName ?? DASH, b.systemName),
      detail(
        'temperature_C',
        'Temperature',
        b.temperatureC === null ? DASH : `${b.temperatureC} °C`,
        b.temperatureC,
      ),
      detail('files', 'Files', `${b.fileCount} of ${b.expectedFiles} expected stored`, b.fileCount),
      detail(
        'wavelength_nm',
        'Wavelength',
        r.wavelengthNm === null ? DASH : `${r.wavelengthNm} nm`,
        r.wavelengthNm,
      ),
      detail('path_length_cm', 'Path length', `${r.pathLengthCm} cm`, r.pathLengthCm),
      detail('calibration_model', 'Calibration model', s.calibrationModel),
      detail('candidates', 'Candidates', s.candidates.join(', '), s.candidates.join(' ')),
      detail(
        'concentration_unit',
        'Concentrations in',
        unit.molarMassGPerMol === null
          ? unit.unit
          : `${unit.unit} (molar mass ${unit.molarMassGPerMol} g/mol)`,
        unit.unit,
      ),
      detail(
        'molar_mass_g_per_mol',
        'Molar mass (g/mol)',
        unit.molarMassGPerMol === null ? DASH : String(unit.molarMassGPerMol),
        unit.molarMassGPerMol,
        SHEETS,
      ),
      ...(limits
        ? [
            detail(
              'recovery_limits_pct',
              'Control recovery limits',
              `${limits[0]}–${limits[1]} %`,
              `${limits[0]}-${limits[1]}`,
            ),
          ]
        : []),
      detail(
        'thresholds',
        'Thresholds',
        `R² at least ${s.r2Min}; replicate CV at most ${percent(s.replicateCvMax)}; K CV at most ${percent(s.kCvMax)}; linear range up to A = ${s.linearRangeMaxAbsorbance}`,
        null,
        PDF,
      ),
      detail('r2_min', 'R² at least', String(s.r2Min), s.r2Min, SHEETS),
      detail('replicate_cv_max', 'Replicate CV at most', String(s.replicateCvMax), s.replicateCvMax, SHEETS),
      detail('k_cv_max', 'K CV at most', String(s.kCvMax), s.kCvMax, SHEETS),
      detail(
        'linear_range_max_absorbance',
        'Linear range up to',
        String(s.linearRangeMaxAbsorbance),
        s.linearRangeMaxAbsorbance,
        SHEETS,
      ),
      detail('epsilon_from', 'ε from', epsilonFrom),
      detail('monte_carlo_draws', 'Monte Carlo draws', String(s.monteCarloDraws), s.monteCarloDraws),
      detail(
        'exclusions',
        'Exclusions',
        s.exclusions.length ? s.exclusions.map((e) => `${e.position} (${e.reason})`).join('; ') : 'none',
      ),
      ...(rec
        ? [
            detail(
              'approval_record',
              'Approval record',
              `record ${rec.id}, approved by ${rec.approvedBy ?? 'unknown'} on ${minute(rec.approvedAt)}; this report shows the result stored then`,
              rec.id,
            ),
          ]
        : []),
      detail(
        'engine_version',
        'Analysis engine',
        rec ? `${rec.engine.version} (analysis module SHA-256 ${rec.engine.sourceSha256})` : (engine ?? DASH),
        engine,
      ),
    ],
    figures: [],
    tables: [],
    notes: [],
  };
}

function reviewSection(input: BatchReportInput): ReportSection {
  const a = input.analysis;
  const b = a.batch;
  const rec = a.record;
  const approvedBy = rec?.approvedBy ?? b.approvedBy;
  const approvedAt = rec?.approvedAt ?? b.approvedAt;
  const comment = rec?.approvalComment ?? b.approvalComment;
  const approved = b.state === 'approved';
  const state = approved
    ? `Approved by ${approvedBy ?? 'unknown'} on ${minute(approvedAt)}.`
    : b.state === 'reviewed'
      ? `Reviewed by ${b.reviewedBy ?? 'unknown'}; not yet approved.`
      : 'Open: not yet reviewed, not yet approved.';
  return {
    title: 'Review and approval',
    details: [
      detail('review_state', 'State', state, b.state),
      detail('reviewed_by', 'Reviewed by', b.reviewedBy ?? 'not reviewed', b.reviewedBy),
      detail('reviewed_at', 'Reviewed (UTC)', minute(b.reviewedAt), b.reviewedAt),
      detail(
        'approved_by',
        'Approved by',
        approved ? (approvedBy ?? 'unknown') : 'not yet approved',
        approved ? approvedBy : null,
      ),
      detail(
        'approved_at',
        'Approved (UTC)',
        approved ? minute(approvedAt) : DASH,
        approved ? approvedAt : null,
      ),
      detail('approval_comment', 'Comment', approved ? comment || DASH : DASH, approved ? comment : null),
    ],
    figures: [],
    notes: [],
    tables: [
      {
        title: 'Review and approval trail',
        in: PDF,
        columns: [
          col('at', 'When (UTC)', 80),
          col('actor', 'Who', 125),
          col('action', 'Action', 50),
          col('what', 'What and why', 244),
        ],
        rows: input.trail.map((e) => [
          text(minute(e.at)),
          text(e.actorName),
          text(e.action),
          text(e.reason ? `${e.summary} — ${e.reason}` : e.summary),
        ]),
      },
    ],
  };
}

/** The readings of the batch as one table (the readings CSV): the raw data, not part of the report. */
export function readingsTable(a: BatchAnalysisDto): ReportTable {
  const files = new Map(a.files.map((f) => [f.id, f]));
  const samples = new Map(a.samples.map((s) => [s.position, s]));
  const layout = new Map(a.layoutPositions.map((p) => [p.position, p]));
  const raw = (v: number | null | undefined): ReportCell =>
    missing(v) ? { text: DASH, value: null } : { text: String(v), value: roundSignificant(v, 12) };
  return {
    title: 'Readings',
    columns: [
      col('file', 'File', 0),
      col('sha256', 'SHA-256', 0),
      col('position', 'Position', 0),
      col('wavelength_nm', 'Wavelength', 0, { unit: 'nm' }),
      col('absorbance', 'Absorbance', 0),
      col('flag', 'Flag', 0),
      col('sample_id', 'Sample', 0),
      col('role', 'Role', 0),
    ],
    rows: a.readings.map((r) => {
      const file = files.get(r.intakeFileId);
      const sample = samples.get(r.position);
      return [
        text(file?.originalName ?? null),
        text(file?.sha256 ?? null),
        text(r.position),
        raw(r.wavelengthNm),
        raw(r.absorbance),
        text(r.flag ?? null),
        text(sample?.sampleId ?? null),
        text(sample?.role ?? layout.get(r.position)?.role ?? null),
      ];
    }),
  };
}
