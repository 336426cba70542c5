import { TestBed } from '@angular/core/testing';
import { VersionHistory } from './version-history';

describe('VersionHistory', () => {
  it('lists versions newest first, marks the current and the shown one, and asks to view the others', async () => {
    TestBed.configureTestingModule({ imports: [VersionHistory] });
    const fixture = TestBed.createComponent(VersionHistory);
    fixture.componentRef.setInput('versions', [
      { version: 1, createdAt: '2025-03-01T09:00:00.000Z', source: 'file' },
      { version: 2, createdAt: '2025-03-02T10:00:00.000Z', source: 'form' },
      { version: 3, createdAt: '2025-03-03T11:00:00.000Z' },
    ]);
    fixture.componentRef.setInput('current', 3);
    fixture.componentRef.setInput('shown', 2);
    fixture.componentRef.setInput('testId', 'layout-versions');
    const viewed: number[] = [];
    fixture.componentInstance.view.subscribe((v) => viewed.push(v));
    await fixture.whenStable();

    const el = fixture.nativeElement as HTMLElement;
    const items = [...el.querySelectorAll('[data-testid="layout-versions"] li')].map((li) =>
      li.textContent!.replace(/\s+/g, ' ').trim(),
    );
    expect(items.map((t) => t.slice(0, 2))).toEqual(['v3', 'v2', 'v1']);
    expect(items[0]).toContain('current');
    expect(items[0]).toContain('View');
    expect(items[1]).toContain('form');
    expect(items[1]).toContain('shown');
    expect(items[1]).not.toContain('View');
    expect(items[2]).toContain('file');

    el.querySelectorAll<HTMLButtonElement>('li button')[1].click();
    expect(viewed).toEqual([1]);
  });
});
