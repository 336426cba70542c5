import {
  AnalysisError,
  type MixturePlan,
  type PlannedMixture,
  type PlannerInput,
  planMixtures,
  planWellMixtures,
} from '@equilight/analysis';

export type SeriesKind = 'job' | 'excess';
export type PositionScheme = 'cuvette' | 'plate96' | 'plate384';

export const POSITION_SCHEMES: readonly { value: PositionScheme; label: string; capacity: number }[] = [
  { value: 'cuvette', label: 'Cuvettes C1, C2, …', capacity: 999 },
  { value: 'plate96', label: '96-well plate, row by row from A1', capacity: 96 },
  { value: 'plate384', label: '384-well plate, row by row from A1', capacity: 384 },
];

/** Stoichiometries the planner offers, "A:B". */
export const PLANNER_STOICHIOMETRIES = ['1:1', '1:2', '2:1', '1:3', '3:1', '2:2'] as const;

/** Everything the page asks for, in the units shown beside each field. */
export interface PlannerSettings {
  stockAM: number;
  stockBM: number;
  totalVolumeMl: number;
  series: SeriesKind;
  mixtureCount: number;
  /** Job's series: A₀ + B₀ in every mixture, mol/L. */
  totalConcentrationM: number;
  /** Fixed A with rising B: A₀ in every mixture, mol/L, and the first and last B₀/A₀. */
  fixedAM: number;
  firstRatioBToA: number;
  lastRatioBToA: number;
  stoichiometry: string;
  kAssumed: number;
  epsilonLPerMolCm: number;
  pathLengthCm: number;
  linearRangeMaxAbsorbance: number;
  /** Complex concentration below which the reading is not quantifiable, mol/L; null = no check. */
  loqM: number | null;
  /** Round volumes to this step, mL; 0 = no rounding. */
  volumeStepMl: number;
}

/** One line of the pipetting table, with where it goes and what is wrong with it. */
export interface PlanRow {
  position: string;
  sampleId: string;
  mixture: PlannedMixture;
  /** Mole fraction of B, B₀/(A₀ + B₀). */
  moleFractionB: number;
  aboveLinearRange: boolean;
  belowLoq: boolean;
  cannotBeMade: boolean;
  /** The unit the volumes are pipetted in: µL for plate wells, mL for cuvettes. */
  volumeUnit: 'mL' | 'µL';
  /** Stock A, stock B and diluent in volumeUnit. */
  volumes: { a: number; b: number; diluent: number; total: number };
}

/** Plate wells to fill: the free positions in order and the fill volume of a well. */
export interface WellTarget {
  positions: readonly string[];
  fillVolumeUl: number;
  /** Round volumes to this step, µL; 0 = no rounding. */
  volumeStepUl: number;
}

/** Fill volume of a well when none is given, µL (common practice for flat-bottom plates). */
export const DEFAULT_FILL_VOLUME_UL: Readonly<Record<'96' | '384', number>> = { '96': 200, '384': 80 };

/** Every position of a layout's format in order: A1, A2, … row by row, or C1 … Cn. */
export function formatPositions(format: '96' | '384' | 'cuvette', cuvetteCount: number | null): string[] {
  if (format === 'cuvette') return planPositions(Math.max(0, cuvetteCount ?? 0), 'cuvette');
  return planPositions(format === '96' ? 96 : 384, format === '96' ? 'plate96' : 'plate384');
}

/** The positions of a layout that no sample role occupies yet, in plate order. */
export function freePositions(
  format: '96' | '384' | 'cuvette',
  cuvetteCount: number | null,
  occupied: readonly { position: string }[],
): string[] {
  const taken = new Set(occupied.map((p) => p.position.toUpperCase()));
  return formatPositions(format, cuvetteCount).filter((p) => !taken.has(p));
}

/** Mole fractions of B for a Job's series of n mixtures: i/(n + 1), leaving out the pure reactants. */
export function jobMoleFractions(count: number): number[] {
  return Array.from({ length: count }, (_, i) => (i + 1) / (count + 1));
}

/** B₀/A₀ from first to last in equal steps. */
export function excessRatios(count: number, first: number, last: number): number[] {
  if (count === 1) return [first];
  return Array.from({ length: count }, (_, i) => first + ((last - first) * i) / (count - 1));
}

/** The analysis module's input for these settings. */
export function plannerInput(s: PlannerSettings): PlannerInput {
  return {
    stockAM: s.stockAM,
    stockBM: s.stockBM,
    totalVolumeMl: s.totalVolumeMl,
    series:
      s.series === 'job'
        ? {
            kind: 'job',
            totalConcentrationM: s.totalConcentrationM,
            moleFractionsB: jobMoleFractions(s.mixtureCount),
          }
        : {
            kind: 'excess',
            a0M: s.fixedAM,
            ratiosBToA: excessRatios(s.mixtureCount, s.firstRatioBToA, s.lastRatioBToA),
          },
    model: s.stoichiometry,
    kAssumed: s.kAssumed,
    epsilonLPerMolCm: s.epsilonLPerMolCm,
    pathLengthCm: s.pathLengthCm,
    volumeStepMl: s.volumeStepMl > 0 ? s.volumeStepMl : undefined,
    linearRangeMaxAbsorbance: s.linearRangeMaxAbsorbance,
    loqM: s.loqM ?? undefined,
  };
}

/** Positions in order: C1, C2, … for cuvettes, or A1, A2, … row by row across a plate. */
export function planPositions(count: number, scheme: PositionScheme): string[] {
  if (scheme === 'cuvette') return Array.from({ length: count }, (_, i) => `C${i + 1}`);
  const columns = scheme === 'plate96' ? 12 : 24;
  return Array.from(
    { length: count },
    (_, i) => `${String.fromCharCode(65 + Math.floor(i / columns))}${(i % columns) + 1}`,
  );
}

/**
 * The plan for these settings, laid out on positions with its flags. Throws the analysis module's errors.
 * With wells, the volumes are planned in µL to the well's fill volume and go to the given free positions
 * (the series' total volume in mL is then not used); otherwise in mL on the scheme's positions.
 */
export function planRows(
  s: PlannerSettings,
  scheme: PositionScheme,
  sampleIdPrefix: string,
  wells?: WellTarget,
): { plan: MixturePlan; rows: PlanRow[] } {
  const input = plannerInput(s);
  const wellPlan = wells
    ? planWellMixtures({
        ...input,
        fillVolumeUl: wells.fillVolumeUl,
        volumeStepUl: wells.volumeStepUl > 0 ? wells.volumeStepUl : undefined,
      })
    : null;
  const plan: MixturePlan = wellPlan ?? planMixtures(input);
  if (wells && plan.mixtures.length > wells.positions.length)
    throw new AnalysisError(
      'invalid-input',
      `the layout has ${wells.positions.length} free position(s) for ${plan.mixtures.length} mixtures`,
    );
  const positions = wells ? wells.positions : planPositions(plan.mixtures.length, scheme);
  const totalMl = wells ? wells.fillVolumeUl / 1000 : s.totalVolumeMl;
  const digits = String(plan.mixtures.length).length < 2 ? 2 : String(plan.mixtures.length).length;
  const rows = plan.mixtures.map((m, i): PlanRow => ({
    position: positions[i],
    sampleId: `${sampleIdPrefix}-${String(m.index).padStart(digits, '0')}`,
    mixture: m,
    moleFractionB: m.a0M + m.b0M > 0 ? m.b0M / (m.a0M + m.b0M) : 0,
    aboveLinearRange: m.predictedAbsorbance > s.linearRangeMaxAbsorbance,
    belowLoq: s.loqM !== null && m.productM < s.loqM,
    cannotBeMade: m.volumeAMl + m.volumeBMl > totalMl * (1 + 1e-9),
    volumeUnit: wells ? 'µL' : 'mL',
    volumes: wellPlan
      ? {
          a: wellPlan.mixtures[i].volumeAUl,
          b: wellPlan.mixtures[i].volumeBUl,
          diluent: wellPlan.mixtures[i].diluentUl,
          total: wellPlan.fillVolumeUl,
        }
      : { a: m.volumeAMl, b: m.volumeBMl, diluent: m.diluentMl, total: s.totalVolumeMl },
  }));
  return { plan, rows };
}

/** A number as plain text without floating-point noise (2.5000000000000004 → "2.5"). */
export function csvNumber(value: number): string {
  return String(Number(value.toPrecision(10)));
}

export const MANIFEST_COLUMNS = [
  'position',
  'sample_id',
  'role',
  'stock_a_M',
  'volume_a_mL',
  'stock_b_M',
  'volume_b_mL',
  'total_volume_mL',
] as const;

/** The plan as a manifest CSV (the product's manifest columns; one mixture per line, CRLF line ends). */
export function manifestCsv(rows: readonly PlanRow[], s: PlannerSettings): string {
  const lines = [MANIFEST_COLUMNS.join(',')];
  for (const row of rows) {
    lines.push(
      [
        row.position,
        row.sampleId,
        'mixture',
        csvNumber(s.stockAM),
        csvNumber(row.mixture.volumeAMl),
        csvNumber(s.stockBM),
        csvNumber(row.mixture.volumeBMl),
        csvNumber(row.volumeUnit === 'µL' ? row.volumes.total / 1000 : s.totalVolumeMl),
      ].join(','),
    );
  }
  return lines.join('\r\n') + '\r\n';
}

/** Units of K for stoichiometry a:b: M^(1−a−b), written as L^n·mol^−n. */
export function kUnit(stoichiometry: string): string {
  const m = /^(\d+):(\d+)$/.exec(stoichiometry);
  const n = m ? Number(m[1]) + Number(m[2]) - 1 : 1;
  if (n === 1) return 'L/mol';
  const sup = (k: number) =>
    String(k)
      .split('')
      .map((d) => '⁰¹²³⁴⁵⁶⁷⁸⁹'[Number(d)])
      .join('');
  return `L${sup(n)}·mol⁻${sup(n)}`;
}
