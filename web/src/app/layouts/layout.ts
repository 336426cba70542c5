import { type PlateFormat, SAMPLE_ROLES, type SampleRole } from '../shared/plate-grid/plate-geometry';

export interface LayoutPosition {
  position: string;
  role: SampleRole;
  replicateGroup?: string;
}

export interface LayoutSummary {
  id: number;
  name: string;
  format: PlateFormat;
  cuvetteCount: number | null;
  currentVersion: number;
  positionCount: number;
  roleCounts: Partial<Record<SampleRole, number>>;
  updatedAt: string;
}

export interface LayoutVersionInfo {
  version: number;
  createdAt: string;
  createdById: number | null;
}

export interface Layout extends LayoutSummary {
  version: number;
  positions: LayoutPosition[];
  versions: LayoutVersionInfo[];
}

const FORMATS: readonly string[] = ['96', '384', 'cuvette'];

export function isLayoutSummary(value: unknown): value is LayoutSummary {
  const v = value as Partial<LayoutSummary> | null;
  return (
    !!v &&
    typeof v.id === 'number' &&
    typeof v.name === 'string' &&
    typeof v.format === 'string' &&
    FORMATS.includes(v.format) &&
    typeof v.currentVersion === 'number' &&
    typeof v.positionCount === 'number' &&
    !!v.roleCounts &&
    typeof v.roleCounts === 'object' &&
    typeof v.updatedAt === 'string'
  );
}

function isLayoutPosition(value: unknown): value is LayoutPosition {
  const v = value as Partial<LayoutPosition> | null;
  return (
    !!v &&
    typeof v.position === 'string' &&
    typeof v.role === 'string' &&
    (SAMPLE_ROLES as readonly string[]).includes(v.role) &&
    (v.replicateGroup === undefined || typeof v.replicateGroup === 'string')
  );
}

export function isLayout(value: unknown): value is Layout {
  const v = value as Partial<Layout> | null;
  return (
    isLayoutSummary(value) &&
    typeof v?.version === 'number' &&
    Array.isArray(v.positions) &&
    v.positions.every(isLayoutPosition) &&
    Array.isArray(v.versions)
  );
}
