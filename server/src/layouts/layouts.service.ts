import type { LayoutDto, LayoutSummaryDto } from '../contracts/layouts';
import type { DataSource, Repository } from 'typeorm';
import type { SampleRole } from '../analysis/types';
import type { Actor, AuditService } from '../audit/audit.service';
import { AppError } from '../common/app-error';
import { isValidPosition } from '../parsers';
import { Layout, type LayoutFormat, LayoutVersion } from './layout.entity';
import type { CreateLayoutInput, LayoutPosition, UpdateLayoutInput } from '../contracts/layouts';

export type { LayoutDto, LayoutSummaryDto } from '../contracts/layouts';

/** Checks every position against the plate or cuvette format; lists every problem at once. */
export function checkLayoutPositions(
  format: LayoutFormat,
  cuvetteCount: number | null,
  positions: LayoutPosition[],
): void {
  const problems: string[] = [];
  const seen = new Set<string>();
  const plateFormat = format;
  for (const p of positions) {
    if (!isValidPosition(p.position, plateFormat))
      problems.push(
        `${p.position} is not a position of a ${format === 'cuvette' ? 'cuvette sequence' : `${format}-well plate`}`,
      );
    else if (format === 'cuvette' && cuvetteCount !== null && Number(p.position.slice(1)) > cuvetteCount) {
      problems.push(`${p.position} is beyond the ${cuvetteCount} cuvettes of this sequence`);
    }
    if (seen.has(p.position)) problems.push(`${p.position} is listed twice`);
    seen.add(p.position);
  }
  if (problems.length) throw AppError.badRequest(`Invalid layout: ${problems.join('; ')}.`, problems);
}

function roleCounts(positions: LayoutPosition[]): Partial<Record<SampleRole, number>> {
  const counts: Partial<Record<SampleRole, number>> = {};
  for (const p of positions) counts[p.role as SampleRole] = (counts[p.role as SampleRole] ?? 0) + 1;
  return counts;
}

/** Layouts and their versions. Every change is audited. */
export class LayoutsService {
  private readonly layouts: Repository<Layout>;
  private readonly versions: Repository<LayoutVersion>;

  constructor(
    private readonly dataSource: DataSource,
    private readonly audit: AuditService,
  ) {
    this.layouts = dataSource.getRepository(Layout);
    this.versions = dataSource.getRepository(LayoutVersion);
  }

  async list(): Promise<LayoutSummaryDto[]> {
    const layouts = await this.layouts.find({ order: { name: 'ASC' } });
    const out: LayoutSummaryDto[] = [];
    for (const layout of layouts) {
      const version = await this.versionRow(layout.id, layout.currentVersion);
      out.push(this.summary(layout, JSON.parse(version.positionsJson) as LayoutPosition[]));
    }
    return out;
  }

  private summary(layout: Layout, positions: LayoutPosition[]): LayoutSummaryDto {
    return {
      id: layout.id,
      name: layout.name,
      format: layout.format,
      cuvetteCount: layout.cuvetteCount,
      currentVersion: layout.currentVersion,
      positionCount: positions.length,
      roleCounts: roleCounts(positions),
      updatedAt: new Date(layout.updatedAt).toISOString(),
    };
  }

  async getLayout(id: number): Promise<Layout> {
    const layout = await this.layouts.findOneBy({ id });
    if (!layout) throw AppError.notFound(`No layout with id ${id}.`);
    return layout;
  }

  private async versionRow(layoutId: number, version: number): Promise<LayoutVersion> {
    const row = await this.versions.findOneBy({ layoutId, version });
    if (!row) throw AppError.notFound(`Layout ${layoutId} has no version ${version}.`);
    return row;
  }

  /** A layout at a version (default: its current one). */
  async get(id: number, version?: number): Promise<LayoutDto> {
    const layout = await this.getLayout(id);
    const row = await this.versionRow(id, version ?? layout.currentVersion);
    const positions = JSON.parse(row.positionsJson) as LayoutPosition[];
    const versions = await this.versions.find({ where: { layoutId: id }, order: { version: 'ASC' } });
    return {
      ...this.summary(layout, positions),
      version: row.version,
      positions,
      versions: versions.map((v) => ({
        version: v.version,
        createdAt: v.createdAt,
        createdById: v.createdById,
      })),
    };
  }

  async create(input: CreateLayoutInput, actor: Actor): Promise<LayoutDto> {
    const cuvetteCount = input.format === 'cuvette' ? (input.cuvetteCount ?? null) : null;
    checkLayoutPositions(input.format, cuvetteCount, input.positions);
    if (await this.layouts.existsBy({ name: input.name }))
      throw AppError.conflict(`A layout named "${input.name}" already exists.`);
    const id = await this.dataSource.transaction(async (manager) => {
      const layout = await manager.save(
        manager.create(Layout, { name: input.name, format: input.format, cuvetteCount, currentVersion: 1 }),
      );
      await manager.insert(LayoutVersion, {
        layoutId: layout.id,
        version: 1,
        positionsJson: JSON.stringify(input.positions),
        createdById: actor.id,
        createdAt: new Date().toISOString(),
      });
      await this.audit.record(
        {
          actor,
          action: 'create',
          entity: 'layout',
          entityId: layout.id,
          summary: `Created layout "${layout.name}" (${input.format === 'cuvette' ? `${cuvetteCount} cuvettes` : `${input.format}-well`}, ${input.positions.length} positions)`,
          after: { version: 1, roleCounts: roleCounts(input.positions) },
        },
        manager,
      );
      return layout.id;
    });
    return this.get(id);
  }

  /** Editing saves a new version; earlier versions stay as they were. */
  async update(id: number, input: UpdateLayoutInput, actor: Actor): Promise<LayoutDto> {
    const layout = await this.getLayout(id);
    const cuvetteCount = layout.format === 'cuvette' ? (input.cuvetteCount ?? layout.cuvetteCount) : null;
    checkLayoutPositions(layout.format, cuvetteCount, input.positions);
    if (input.name && input.name !== layout.name && (await this.layouts.existsBy({ name: input.name }))) {
      throw AppError.conflict(`A layout named "${input.name}" already exists.`);
    }
    const before = await this.get(id);
    const version = layout.currentVersion + 1;
    await this.dataSource.transaction(async (manager) => {
      await manager.insert(LayoutVersion, {
        layoutId: id,
        version,
        positionsJson: JSON.stringify(input.positions),
        createdById: actor.id,
        createdAt: new Date().toISOString(),
      });
      await manager.update(
        Layout,
        { id },
        { currentVersion: version, name: input.name ?? layout.name, cuvetteCount },
      );
      await this.audit.record(
        {
          actor,
          action: 'update',
          entity: 'layout',
          entityId: id,
          summary: `Saved layout "${input.name ?? layout.name}" as version ${version}`,
          before: { version: before.version, name: before.name, roleCounts: before.roleCounts },
          after: { version, name: input.name ?? layout.name, roleCounts: roleCounts(input.positions) },
          reason: input.reason ?? null,
        },
        manager,
      );
    });
    return this.get(id);
  }
}
