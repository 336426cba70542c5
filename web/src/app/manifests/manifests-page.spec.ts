import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { ManifestsPage } from './manifests-page';

describe('ManifestsPage', () => {
  it('lists manifests with the name of their layout, sample count and version', async () => {
    TestBed.configureTestingModule({
      imports: [ManifestsPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    const fixture = TestBed.createComponent(ManifestsPage);
    fixture.detectChanges();
    const http = TestBed.inject(HttpTestingController);
    http.expectOne('/api/manifests').flush([
      {
        id: 3,
        name: 'Azo run 12',
        layoutId: 4,
        currentVersion: 2,
        sampleCount: 14,
        updatedAt: '2025-03-03T08:00:00.000Z',
      },
    ]);
    http.expectOne('/api/layouts').flush([
      {
        id: 4,
        name: 'Azo dye plate',
        format: '96',
        cuvetteCount: null,
        currentVersion: 1,
        positionCount: 14,
        roleCounts: {},
        updatedAt: '2025-03-02T09:00:00.000Z',
      },
    ]);
    await fixture.whenStable();
    const row = (fixture.nativeElement as HTMLElement).querySelector('tr.mat-mdc-row')!.textContent ?? '';
    expect(row).toContain('Azo run 12');
    expect(row).toContain('Azo dye plate');
    expect(row).toContain('14');
    expect(row).toContain('v2');
  });
});
