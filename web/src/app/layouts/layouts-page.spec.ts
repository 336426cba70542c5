import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { LayoutsPage } from './layouts-page';

describe('LayoutsPage', () => {
  it('lists layouts with format, positions, role counts and version', async () => {
    TestBed.configureTestingModule({
      imports: [LayoutsPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    const fixture = TestBed.createComponent(LayoutsPage);
    fixture.detectChanges();
    TestBed.inject(HttpTestingController)
      .expectOne('/api/layouts')
      .flush([
        {
          id: 1,
          name: 'Cobalt series',
          format: 'cuvette',
          cuvetteCount: 9,
          currentVersion: 1,
          positionCount: 9,
          roleCounts: { blank: 1, mixture: 8 },
          updatedAt: '2025-03-01T09:00:00.000Z',
        },
        {
          id: 2,
          name: 'Azo dye plate',
          format: '96',
          cuvetteCount: null,
          currentVersion: 3,
          positionCount: 14,
          roleCounts: { blank: 2, standard: 8, unknown: 4 },
          updatedAt: '2025-03-02T09:00:00.000Z',
        },
      ]);
    await fixture.whenStable();
    const rows = [...(fixture.nativeElement as HTMLElement).querySelectorAll('tr.mat-mdc-row')].map(
      (r) => r.textContent ?? '',
    );
    expect(rows).toHaveLength(2);
    expect(rows[0]).toContain('Azo dye plate');
    expect(rows[0]).toContain('96-well plate');
    expect(rows[0]).toMatch(/standard\s*8/);
    expect(rows[0]).toContain('v3');
    expect(rows[1]).toContain('Cuvette sequence (9)');
    expect(rows[1]).toMatch(/mixture\s*8/);
  });
});
