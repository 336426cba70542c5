import { TestBed } from '@angular/core/testing';
import { fixtureBatch } from './analysis-fixture';
import { ApprovalRecordPanel, describeHeadline } from './approval-record-panel';
import type { ApprovalRecord, EngineCheck } from './batch-analysis';

const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

const summary = {
  qcFlagCount: 0,
  qcErrorCount: 0,
  best: '1:1',
  k: 612.34,
  kSe: 10,
  kCi95: [590, 635] as [number, number],
  kStatus: 'determined' as const,
  kLowerBound95: null,
  kUpperBound95: null,
  kUnit: 'L·mol⁻¹',
  kText: '612 L·mol⁻¹ (95 % CI 590 to 635)',
};
const record: ApprovalRecord = {
  id: 4,
  batchId: 7,
  schemaVersion: 1,
  engine: {
    version: '0.1.0+0123456789ab',
    packageVersion: '0.1.0',
    sourceSha256: '0123456789ab'.padEnd(64, '0'),
  },
  approvedBy: 'Lab Manager',
  approvedAt: '2031-05-03T09:00:00Z',
  approvalComment: 'Checked.',
  settings: fixtureBatch().settings,
  files: [],
  summary,
  supersededAt: null,
  supersededBy: null,
  supersededReason: null,
};

async function render(check: EngineCheck | null, approved = true) {
  const fixture = TestBed.createComponent(ApprovalRecordPanel);
  fixture.componentRef.setInput('approved', approved);
  fixture.componentRef.setInput('record', record);
  fixture.componentRef.setInput('engineCheck', check);
  await fixture.whenStable();
  return fixture.nativeElement as HTMLElement;
}

describe('approval record panel', () => {
  it('states a headline with its unit and interval, or says there is none', () => {
    expect(describeHeadline(summary)).toBe('K (1:1) = 612 L·mol⁻¹ (95 % CI 590 to 635)');
    expect(describeHeadline({ ...summary, best: null, k: null, kText: null })).toBe('no equilibrium result');
    expect(describeHeadline({ ...summary, k: null, kText: null })).toBe('1:1 as the best model, without a K');
    // A record written before K statements existed: its value and interval in the one number format.
    expect(describeHeadline({ ...summary, kText: null })).toBe('K (1:1) = 612 L·mol⁻¹ (95 % CI 590 to 635)');
  });

  it('when the stored files no longer match the record then it says so, not that the engine changed', async () => {
    const el = await render({
      engineVersion: '0.1.0+0123456789ab',
      sameEngine: true,
      differs: true,
      inputsMatch: false,
      current: { ...summary, k: 700 },
      error: null,
    });
    expect(text(el.querySelector('[data-testid="engine-note"]'))).toContain('not the ones this record names');
    expect(el.querySelector('[data-testid="engine-same"]')).toBeNull();
  });

  it("when today's engine fails on the inputs then the note says so and the record stays", async () => {
    const el = await render({
      engineVersion: '0.2.0+ffffffffffff',
      sameEngine: false,
      differs: true,
      inputsMatch: true,
      current: null,
      error: 'no standards',
    });
    const note = text(el.querySelector('[data-testid="engine-note"]'));
    expect(note).toContain('Re-analysis with the current engine (0.2.0+ffffffffffff) fails: no standards.');
    expect(note).toContain('stays as it is');
    expect(text(el.querySelector('[data-testid="record-headline"]'))).toContain('612 L·mol⁻¹');
  });

  it('when the batch is not approved then only earlier approvals show, if any', async () => {
    const el = await render(null, false);
    expect(el.querySelector('[data-testid="approval-record"]')).toBeNull();
  });
});
