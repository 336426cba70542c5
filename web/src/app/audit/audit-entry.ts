import type { AuditDto, AuditEntity } from '@equilight/contracts';

export type { AuditEntity, AuditPage } from '@equilight/contracts';
export { AUDIT_ENTITY_LABELS } from '@equilight/contracts';

/** One entry of the audit trail, as GET /api/audit sends it. */
export type AuditEntry = AuditDto;

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
