import type { AuditDto, AuditService } from '../audit/audit.service';
import type { BatchesService } from '../batches/batches.service';
import { toCsv } from './csv';
import { type PdfOptions, renderBatchReport } from './pdf-report';
import { readingsTable, resultsTable } from './report-tables';

export type CsvContent = 'readings' | 'results';

/** Exports of one batch: CSV tables and the PDF report. */
export class ReportsService {
  constructor(
    private readonly batches: BatchesService,
    private readonly audit: AuditService,
  ) {}

  async csv(batchId: number, content: CsvContent): Promise<string> {
    const analysis = await this.batches.analysis(batchId);
    return toCsv(content === 'readings' ? readingsTable(analysis) : resultsTable(analysis));
  }

  async pdf(batchId: number, options: PdfOptions = {}): Promise<Buffer> {
    const analysis = await this.batches.analysis(batchId);
    return renderBatchReport({ analysis, trail: await this.trail(batchId) }, options);
  }

  /** Every audit entry of the batch, oldest first. */
  private async trail(batchId: number): Promise<AuditDto[]> {
    const entries: AuditDto[] = [];
    for (let page = 0; ; page++) {
      const { items, total } = await this.audit.list({
        entity: 'batch',
        entityId: batchId,
        page,
        pageSize: 500,
      });
      entries.push(...items);
      if (!items.length || entries.length >= total) break;
    }
    return entries.reverse();
  }
}
