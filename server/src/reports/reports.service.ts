import type { AuditDto, AuditService } from '../audit/audit.service';
import type { BatchesService } from '../batches/batches.service';
import type { CommentsService } from '../comments/comments.service';
import { buildBatchReport, readingsTable } from './batch-report';
import { reportToCsv, tableToCsv } from './csv';
import { type PdfOptions, renderReportPdf } from './pdf/render-pdf';
import type { BatchReport } from './report-model';
import { renderReportXlsx } from './xlsx';

export type CsvContent = 'readings' | 'results';

/** Exports of one batch: CSV tables, the XLSX workbook and the PDF report, all from one report model. */
export class ReportsService {
  constructor(
    private readonly batches: BatchesService,
    private readonly audit: AuditService,
    private readonly comments?: CommentsService,
  ) {}

  async csv(batchId: number, content: CsvContent): Promise<string> {
    if (content === 'readings') return tableToCsv(readingsTable(await this.batches.analysis(batchId)));
    return reportToCsv(await this.report(batchId));
  }

  async xlsx(batchId: number): Promise<Buffer> {
    return renderReportXlsx(await this.report(batchId));
  }

  async pdf(batchId: number, options: PdfOptions = {}): Promise<Buffer> {
    return renderReportPdf(await this.report(batchId), options);
  }

  /** The report of a batch, from `BatchesService.analysis` (an approved batch: its approval record). */
  async report(batchId: number): Promise<BatchReport> {
    const analysis = await this.batches.analysis(batchId);
    return buildBatchReport({
      analysis,
      trail: await this.trail(batchId),
      engineVersion: this.batches.engineVersion,
      comments: this.comments ? await this.comments.list(batchId) : [],
    });
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
