/** One entry of the audit trail, as GET /api/audit sends it. */
export type AuditEntity =
  'layout' | 'manifest' | 'batch' | 'instrument_profile' | 'user' | 'intake_file' | 'webhook';

export interface AuditEntry {
  id: number;
  at: string;
  actorId: number | null;
  actorName: string;
  action: string;
  entity: AuditEntity;
  entityId: number;
  summary: string;
  before: unknown;
  after: unknown;
  reason: string | null;
}

export interface AuditPage {
  items: AuditEntry[];
  total: number;
}

/** The filters and page of GET /api/audit; absent fields do not filter. */
export interface AuditQuery {
  entity?: AuditEntity;
  entityId?: number;
  action?: string;
  /** ISO 8601 with offset, inclusive. */
  from?: string;
  to?: string;
  q?: string;
  page: number;
  pageSize: number;
}

export const AUDIT_ENTITY_LABELS: Record<AuditEntity, string> = {
  batch: 'Batch',
  layout: 'Layout',
  manifest: 'Manifest',
  instrument_profile: 'Instrument profile',
  intake_file: 'Intake file',
  user: 'Person',
  webhook: 'Webhook',
};

/** Actions the server writes today; the filter offers these. */
export const AUDIT_ACTIONS: readonly string[] = [
  'create',
  'update',
  'settings',
  'exclude',
  'assign',
  'review',
  'approve',
  'reopen',
  'rotate-token',
  'revoke-token',
  'delete',
];

export function isAuditPage(value: unknown): value is AuditPage {
  const v = value as Partial<AuditPage> | null;
  return (
    !!v &&
    typeof v.total === 'number' &&
    Array.isArray(v.items) &&
    v.items.every(
      (e: Partial<AuditEntry>) =>
        !!e &&
        typeof e.id === 'number' &&
        typeof e.at === 'string' &&
        typeof e.action === 'string' &&
        typeof e.entity === 'string' &&
        typeof e.entityId === 'number' &&
        typeof e.summary === 'string',
    )
  );
}
