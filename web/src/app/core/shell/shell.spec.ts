import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatMenuHarness } from '@angular/material/menu/testing';
import { provideRouter } from '@angular/router';
import { AuthService } from '../auth/auth.service';
import { LiveEventsService } from '../live/live-events.service';
import { Shell } from './shell';

jest.setTimeout(20_000);

describe('Shell', () => {
  it('when the user menu opens then the e-mail and the role are apart, not one run of text', async () => {
    TestBed.configureTestingModule({
      imports: [Shell],
      providers: [
        provideRouter([]),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
        {
          provide: AuthService,
          useValue: {
            currentUser: signal({
              id: 3,
              email: 'scientist@equilight.test',
              displayName: 'Sam Scientist',
              role: 'scientist',
              active: true,
              invited: false,
            }),
          },
        },
        { provide: LiveEventsService, useValue: {} },
      ],
    });
    const fixture = TestBed.createComponent(Shell);
    await fixture.whenStable();
    const loader = TestbedHarnessEnvironment.documentRootLoader(fixture);
    const menu = await loader.getHarness(MatMenuHarness.with({ selector: '[data-testid="user-menu"]' }));
    await menu.open();
    const card = document.querySelector('[data-testid="user-card"]')!;
    expect(card.textContent).toBe('scientist@equilight.test Scientist');
    const [email, role] = [...card.children] as HTMLElement[];
    expect(email.textContent).toBe('scientist@equilight.test');
    expect(role.textContent).toBe('Scientist');
    // not a menu item: the keyboard goes from the first real item
    expect(card.getAttribute('role')).toBeNull();
    expect((await menu.getItems()).length).toBe(2);
  });
});
