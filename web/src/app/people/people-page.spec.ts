import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { PeoplePage } from './people-page';

const PEOPLE = [
  { id: 1, email: 'admin@equilight.test', displayName: 'Ada Admin', role: 'admin', active: true },
  { id: 2, email: 'manager@equilight.test', displayName: 'Mika Manager', role: 'lab_manager', active: true },
  { id: 3, email: 'former@equilight.test', displayName: 'Fay Former', role: 'scientist', active: false },
  {
    id: 4,
    email: 'new@equilight.test',
    displayName: 'Ida Invited',
    role: 'scientist',
    active: true,
    invited: true,
  },
];

describe('PeoplePage', () => {
  async function setup() {
    TestBed.configureTestingModule({
      imports: [PeoplePage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    const fixture = TestBed.createComponent(PeoplePage);
    fixture.detectChanges();
    TestBed.inject(HttpTestingController).expectOne('/api/users').flush(PEOPLE);
    await fixture.whenStable();
    return { fixture, el: fixture.nativeElement as HTMLElement };
  }

  const rows = (el: HTMLElement) =>
    [...el.querySelectorAll('tr.mat-mdc-row')].map((r) => r.textContent ?? '');

  it('lists everyone with role labels and status', async () => {
    const { el } = await setup();
    const text = rows(el).join('\n');
    expect(rows(el)).toHaveLength(4);
    expect(text).toContain('Lab manager');
    expect(text).toContain('Deactivated');
    // invited and no password yet: not "Active" until they set one
    const ida = rows(el).find((r) => r.includes('Ida Invited'))!;
    expect(ida).toContain('Invited');
    expect(ida).not.toContain('Active');
    expect(rows(el).find((r) => r.includes('Mika Manager'))).toContain('Active');
  });

  it('filters by any of name, e-mail, role and status', async () => {
    const { fixture, el } = await setup();
    const input = el.querySelector<HTMLInputElement>('input[matInput]')!;
    input.value = 'deactivated';
    input.dispatchEvent(new Event('input'));
    await fixture.whenStable();
    expect(rows(el)).toHaveLength(1);
    expect(rows(el)[0]).toContain('Fay Former');
    input.value = 'zzz';
    input.dispatchEvent(new Event('input'));
    await fixture.whenStable();
    expect(el.textContent).toContain('No one matches the filter.');
  });

  it('sorts by name when the header is clicked', async () => {
    const { fixture, el } = await setup();
    expect(rows(el)[0]).toContain('Ada Admin');
    const header = el.querySelector<HTMLElement>('th.mat-column-displayName .mat-sort-header-container')!;
    header.click();
    await fixture.whenStable();
    expect(rows(el)[0]).toContain('Mika Manager');
  });

  it('lists what the last reload answered when an earlier reload answers late', async () => {
    const { fixture, el } = await setup();
    const http = TestBed.inject(HttpTestingController);
    const reload = () => (fixture.componentInstance as unknown as { load(): void }).load();
    reload();
    const earlier = http.expectOne('/api/users');
    reload();
    const later = http.expectOne('/api/users');
    later.flush(PEOPLE.slice(0, 2));
    // The earlier request was given up when the later one started: its answer has nowhere to land.
    expect(earlier.cancelled).toBe(true);
    expect(() => earlier.flush(PEOPLE)).toThrow(/cancelled/);
    await fixture.whenStable();
    expect(rows(el)).toHaveLength(2);
    expect(rows(el).join('\n')).not.toContain('Fay Former');
  });
});
