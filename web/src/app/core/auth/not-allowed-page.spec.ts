import { Location } from '@angular/common';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter, Router } from '@angular/router';
import { RouterTestingHarness } from '@angular/router/testing';
import { Component } from '@angular/core';
import { roleGuard } from './auth.guards';
import { AuthService } from './auth.service';
import { NotAllowedPage, rolesFromParam } from './not-allowed-page';
import type { Role, User } from './user';

@Component({ template: '<p data-testid="audit-page">Audit</p>' })
class AuditStandIn {}

@Component({ template: '<p data-testid="overview">Overview</p>' })
class OverviewStandIn {}

const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

describe('a page the role may not open', () => {
  async function open(role: Role, url: string) {
    const user: User = { id: 1, email: 'a@lab.test', displayName: 'A', role, active: true, invited: false };
    TestBed.configureTestingModule({
      providers: [
        provideRouter([
          { path: '', pathMatch: 'full', component: OverviewStandIn },
          { path: 'not-allowed', component: NotAllowedPage },
          { path: 'audit', canActivate: [roleGuard('lab_manager', 'admin')], component: AuditStandIn },
        ]),
        {
          provide: AuthService,
          useValue: { currentUser: signal(user), hasRole: (...roles: Role[]) => roles.includes(role) },
        },
      ],
    });
    const harness = await RouterTestingHarness.create();
    await harness.navigateByUrl(url);
    harness.detectChanges();
    return {
      harness,
      el: harness.routeNativeElement!,
      router: TestBed.inject(Router),
      location: TestBed.inject(Location),
    };
  }

  it('when a scientist opens it then the page names the roles it is for and the role signed in, and keeps the address', async () => {
    const { el, router, location } = await open('scientist', '/audit');
    expect(el.querySelector('[data-testid="audit-page"]')).toBeNull();
    expect(text(el.querySelector('[data-testid="not-allowed-message"]'))).toBe(
      'This page is for Lab manager and Administrator. You are signed in as Scientist.',
    );
    // The address is not changed to the not-allowed page (skipLocationChange); a browser keeps /audit (sign-in e2e).
    expect(location.path()).not.toContain('not-allowed');
    expect(router.url).toMatch(/^\/not-allowed/);
    const back = el.querySelector('a');
    expect(text(back)).toBe('Back to the Overview');
    expect(back?.getAttribute('href')).toBe('/');
  });

  it('when the role may open it then the page itself opens', async () => {
    const { el } = await open('lab_manager', '/audit');
    expect(el.querySelector('[data-testid="audit-page"]')).not.toBeNull();
    expect(el.querySelector('[data-testid="not-allowed-message"]')).toBeNull();
  });

  it('reads only known role names from the address', () => {
    expect(rolesFromParam('admin,root,scientist')).toEqual(['admin', 'scientist']);
    expect(rolesFromParam(null)).toEqual([]);
  });
});
