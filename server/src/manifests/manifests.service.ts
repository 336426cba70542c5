import path from 'node:path';
import type { DataSource, Repository } from 'typeorm';
import type { SampleDefinition } from '../analysis/types';
import type { Actor, AuditService } from '../audit/audit.service';
import { AppError } from '../common/app-error';
import type { LayoutPosition } from '../contracts/layouts';
import type { LayoutsService } from '../layouts/layouts.service';
import { ParseError, parseManifestCsv } from '../parsers';
import type {
  ManifestCheck,
  ManifestDto,
  ManifestMismatch,
  ManifestSummaryDto,
} from '../contracts/manifests';
import { Manifest, ManifestVersion } from './manifest.entity';
import { MANIFEST_COLUMNS, type ManifestRowInput } from '../contracts/manifests';
import { xlsxToCsv } from './xlsx-to-csv';

export type { ManifestCheck, ManifestDto, ManifestMismatch, ManifestSummaryDto };

export interface ManifestInput {
  file?: { buffer: Buffer; originalName: string };
  rows?: ManifestRowInput[];
  layoutId: number;
}

function csvCell(value: string | number | null | undefined): string {
  const text = value === null || value === undefined ? '' : String(value);
  return /[",\n\r;\t]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** Rows typed into the app become the same CSV the upload takes, so one parser checks both. */
export function rowsToCsv(rows: ManifestRowInput[]): Buffer {
  const lines = [
    MANIFEST_COLUMNS.join(','),
    ...rows.map((row) => MANIFEST_COLUMNS.map((c) => csvCell(row[c])).join(',')),
  ];
  return Buffer.from(`${lines.join('\n')}\n`);
}

/** Where manifest and layout disagree: positions only one of them has, and different roles. */
export function compareWithLayout(
  samples: SampleDefinition[],
  layout: LayoutPosition[],
  layoutName: string,
): ManifestMismatch[] {
  const mismatches: ManifestMismatch[] = [];
  const byPosition = new Map(layout.map((p) => [p.position, p]));
  const manifestPositions = new Set(samples.map((s) => s.position));
  for (const sample of samples) {
    const slot = byPosition.get(sample.position);
    if (!slot) {
      mismatches.push({
        position: sample.position,
        message: `${sample.position} (${sample.sampleId}) is not a used position of layout "${layoutName}"`,
      });
    } else if (slot.role !== sample.role) {
      mismatches.push({
        position: sample.position,
        message: `${sample.position}: the layout has a ${slot.role} here but the manifest says ${sample.role} (${sample.sampleId})`,
      });
    }
  }
  for (const slot of layout) {
    if (!manifestPositions.has(slot.position)) {
      mismatches.push({
        position: slot.position,
        message: `${slot.position}: the layout has a ${slot.role} here but the manifest has no sample for it`,
      });
    }
  }
  return mismatches.sort((a, b) => a.position.localeCompare(b.position, 'en', { numeric: true }));
}

/** Sample manifests: upload (CSV/XLSX) or form, checked against a layout, versioned and audited. */
export class ManifestsService {
  private readonly manifests: Repository<Manifest>;
  private readonly versions: Repository<ManifestVersion>;

  constructor(
    private readonly dataSource: DataSource,
    private readonly layouts: LayoutsService,
    private readonly audit: AuditService,
  ) {
    this.manifests = dataSource.getRepository(Manifest);
    this.versions = dataSource.getRepository(ManifestVersion);
  }

  /** Parse and check a manifest against its layout without saving anything. */
  async check(input: ManifestInput): Promise<ManifestCheck> {
    const layout = await this.layouts.get(input.layoutId);
    let content: Buffer;
    let source: ManifestCheck['source'];
    let fileName: string | null = null;
    if (input.file) {
      fileName = path.basename(input.file.originalName).slice(0, 200);
      const isXlsx = /\.xlsx$/i.test(fileName);
      source = isXlsx ? 'xlsx' : 'csv';
      content = input.file.buffer;
      try {
        if (isXlsx) content = await xlsxToCsv(content, fileName);
      } catch (err) {
        if (err instanceof ParseError)
          throw new AppError('invalid_manifest', 400, err.message, { problems: [], mismatches: [] });
        throw err;
      }
    } else if (input.rows && input.rows.length > 0) {
      source = 'form';
      content = rowsToCsv(input.rows);
    } else {
      throw AppError.badRequest('Send a manifest file (field "file") or rows typed into the form.');
    }
    let parsed;
    try {
      parsed = await parseManifestCsv(content, fileName ?? 'manifest form', {
        format: layout.format,
        cuvetteCount: layout.cuvetteCount,
      });
    } catch (err) {
      if (err instanceof ParseError)
        throw new AppError('invalid_manifest', 400, err.message, { problems: [], mismatches: [] });
      throw err;
    }
    return {
      source,
      fileName,
      layoutId: layout.id,
      layoutVersion: layout.version,
      samples: parsed.samples,
      problems: parsed.problems,
      mismatches: parsed.problems.length
        ? []
        : compareWithLayout(parsed.samples, layout.positions, layout.name),
    };
  }

  private refuseUnlessClean(check: ManifestCheck, acceptMismatches: boolean): void {
    if (check.problems.length) {
      throw new AppError(
        'invalid_manifest',
        400,
        `The manifest has ${check.problems.length} problem(s); fix them and upload it again.`,
        {
          problems: check.problems,
          mismatches: check.mismatches,
        },
      );
    }
    if (check.mismatches.length && !acceptMismatches) {
      throw new AppError(
        'manifest_mismatch',
        409,
        `The manifest and the layout disagree at ${check.mismatches.length} position(s); fix them or save with acceptMismatches.`,
        { problems: [], mismatches: check.mismatches },
      );
    }
  }

  async create(
    name: string,
    input: ManifestInput,
    acceptMismatches: boolean,
    actor: Actor,
  ): Promise<ManifestDto> {
    if (await this.manifests.existsBy({ name }))
      throw AppError.conflict(`A manifest named "${name}" already exists.`);
    const check = await this.check(input);
    this.refuseUnlessClean(check, acceptMismatches);
    const id = await this.dataSource.transaction(async (manager) => {
      const manifest = await manager.save(
        manager.create(Manifest, { name, layoutId: check.layoutId, currentVersion: 1 }),
      );
      await manager.insert(ManifestVersion, this.versionRow(manifest.id, 1, check, actor));
      await this.audit.record(
        {
          actor,
          action: 'create',
          entity: 'manifest',
          entityId: manifest.id,
          summary: `Created manifest "${name}" with ${check.samples.length} samples on layout ${check.layoutId} v${check.layoutVersion} (${check.source})`,
          after: { version: 1, samples: check.samples.length, mismatchesAccepted: check.mismatches.length },
        },
        manager,
      );
      return manifest.id;
    });
    return this.get(id);
  }

  async update(
    id: number,
    input: ManifestInput,
    acceptMismatches: boolean,
    reason: string | undefined,
    actor: Actor,
  ): Promise<ManifestDto> {
    const manifest = await this.getManifest(id);
    const before = await this.get(id);
    const check = await this.check(input);
    this.refuseUnlessClean(check, acceptMismatches);
    const version = manifest.currentVersion + 1;
    await this.dataSource.transaction(async (manager) => {
      await manager.insert(ManifestVersion, this.versionRow(id, version, check, actor));
      await manager.update(Manifest, { id }, { currentVersion: version, layoutId: check.layoutId });
      await this.audit.record(
        {
          actor,
          action: 'update',
          entity: 'manifest',
          entityId: id,
          summary: `Saved manifest "${manifest.name}" as version ${version} (${check.samples.length} samples)`,
          before: { version: before.version, samples: before.samples.length, layoutId: before.layoutId },
          after: {
            version,
            samples: check.samples.length,
            layoutId: check.layoutId,
            mismatchesAccepted: check.mismatches.length,
          },
          reason: reason ?? null,
        },
        manager,
      );
    });
    return this.get(id);
  }

  private versionRow(
    manifestId: number,
    version: number,
    check: ManifestCheck,
    actor: Actor,
  ): Partial<ManifestVersion> {
    return {
      manifestId,
      version,
      layoutVersion: check.layoutVersion,
      samplesJson: JSON.stringify(check.samples),
      source: check.source,
      fileName: check.fileName,
      createdById: actor.id,
      createdAt: new Date().toISOString(),
    };
  }

  async getManifest(id: number): Promise<Manifest> {
    const manifest = await this.manifests.findOneBy({ id });
    if (!manifest) throw AppError.notFound(`No manifest with id ${id}.`);
    return manifest;
  }

  async list(): Promise<ManifestSummaryDto[]> {
    const rows = await this.manifests.find({ order: { name: 'ASC' } });
    const out: ManifestSummaryDto[] = [];
    for (const m of rows) {
      const v = await this.versions.findOneByOrFail({ manifestId: m.id, version: m.currentVersion });
      out.push({
        id: m.id,
        name: m.name,
        layoutId: m.layoutId,
        currentVersion: m.currentVersion,
        sampleCount: (JSON.parse(v.samplesJson) as unknown[]).length,
        updatedAt: new Date(m.updatedAt).toISOString(),
      });
    }
    return out;
  }

  async get(id: number, version?: number): Promise<ManifestDto> {
    const manifest = await this.getManifest(id);
    const row = await this.versions.findOneBy({
      manifestId: id,
      version: version ?? manifest.currentVersion,
    });
    if (!row) throw AppError.notFound(`Manifest ${id} has no version ${version}.`);
    const versions = await this.versions.find({ where: { manifestId: id }, order: { version: 'ASC' } });
    return {
      id,
      name: manifest.name,
      layoutId: manifest.layoutId,
      layoutVersion: row.layoutVersion,
      currentVersion: manifest.currentVersion,
      version: row.version,
      source: row.source,
      fileName: row.fileName,
      samples: JSON.parse(row.samplesJson) as SampleDefinition[],
      versions: versions.map((v) => ({
        version: v.version,
        createdAt: v.createdAt,
        createdById: v.createdById,
        source: v.source,
      })),
      updatedAt: new Date(manifest.updatedAt).toISOString(),
    };
  }
}
