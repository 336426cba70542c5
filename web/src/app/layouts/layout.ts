import type { LayoutDto, LayoutSummaryDto } from '@equilight/contracts';
import type { SampleRole } from '../shared/plate-grid/plate-geometry';

export interface LayoutPosition {
  position: string;
  role: SampleRole;
  replicateGroup?: string;
}

export type LayoutSummary = LayoutSummaryDto;
export type Layout = LayoutDto;
export type LayoutVersionInfo = LayoutDto['versions'][number];
