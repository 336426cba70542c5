import type { AuditDto } from '../contracts/audit';
import type { DataSource, EntityManager } from 'typeorm';
import { AuditEntry, type AuditEntity } from './audit-entry.entity';

export interface Actor {
  id: number;
  email: string;
}

export interface AuditRecord {
  actor: Actor;
  action: string;
  entity: AuditEntity;
  entityId: number;
  summary: string;
  before?: unknown;
  after?: unknown;
  reason?: string | null;
}

export type { AuditDto } from '../contracts/audit';

export interface AuditQuery {
  entity?: AuditEntity;
  entityId?: number;
  actorId?: number;
  action?: string;
  from?: string;
  to?: string;
  q?: string;
  page?: number;
  pageSize?: number;
}

/** The audit trail. Writes go through the caller's transaction so a change and its entry land together. */
export class AuditService {
  constructor(private readonly dataSource: DataSource) {}

  async record(entry: AuditRecord, manager: EntityManager = this.dataSource.manager): Promise<void> {
    await manager.insert(AuditEntry, {
      at: new Date().toISOString(),
      actorId: entry.actor.id,
      actorName: entry.actor.email,
      action: entry.action,
      entity: entry.entity,
      entityId: entry.entityId,
      summary: entry.summary,
      beforeJson: entry.before === undefined ? null : JSON.stringify(entry.before),
      afterJson: entry.after === undefined ? null : JSON.stringify(entry.after),
      reason: entry.reason ?? null,
    });
  }

  async list(query: AuditQuery): Promise<{ items: AuditDto[]; total: number }> {
    const qb = this.dataSource.getRepository(AuditEntry).createQueryBuilder('a');
    if (query.entity) qb.andWhere('a.entity = :entity', { entity: query.entity });
    if (query.entityId !== undefined) qb.andWhere('a.entity_id = :entityId', { entityId: query.entityId });
    if (query.actorId !== undefined) qb.andWhere('a.actor_id = :actorId', { actorId: query.actorId });
    if (query.action) qb.andWhere('a.action = :action', { action: query.action });
    if (query.from) qb.andWhere('a.at >= :from', { from: query.from });
    if (query.to) qb.andWhere('a.at <= :to', { to: query.to });
    if (query.q) {
      qb.andWhere(
        "(LOWER(a.summary) LIKE :q ESCAPE '\\' OR LOWER(COALESCE(a.reason, '')) LIKE :q ESCAPE '\\')",
        {
          q: `%${query.q.toLowerCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`,
        },
      );
    }
    const total = await qb.getCount();
    const pageSize = query.pageSize ?? 50;
    const rows = await qb
      .orderBy('a.id', 'DESC')
      .offset((query.page ?? 0) * pageSize)
      .limit(pageSize)
      .getMany();
    return {
      total,
      items: rows.map((a) => ({
        id: a.id,
        at: a.at,
        actorId: a.actorId,
        actorName: a.actorName,
        action: a.action,
        entity: a.entity,
        entityId: a.entityId,
        summary: a.summary,
        before: a.beforeJson ? JSON.parse(a.beforeJson) : null,
        after: a.afterJson ? JSON.parse(a.afterJson) : null,
        reason: a.reason,
      })),
    };
  }
}
