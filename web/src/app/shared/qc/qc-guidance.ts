import type { QcFlag } from '@equilight/analysis';

// The QC code → plain words table lives with the analysis, shared with the PDF report.
export { QC_GUIDANCE, type QcGuidance, guidanceFor } from '@equilight/analysis';

export const SEVERITY_DISPLAY: Record<QcFlag['severity'], { label: string; icon: string; rank: number }> = {
  error: { label: 'Error', icon: 'error', rank: 0 },
  warning: { label: 'Warning', icon: 'warning', rank: 1 },
  info: { label: 'Note', icon: 'info', rank: 2 },
};
