import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter, Router } from '@angular/router';
import { SignInPage } from './sign-in-page';

describe('SignInPage', () => {
  async function setup() {
    TestBed.configureTestingModule({
      imports: [SignInPage],
      providers: [provideHttpClient(), provideHttpClientTesting(), provideRouter([])],
    });
    const fixture = TestBed.createComponent(SignInPage);
    fixture.componentRef.setInput('returnUrl', '/people');
    await fixture.whenStable();
    return { fixture, http: TestBed.inject(HttpTestingController), el: fixture.nativeElement as HTMLElement };
  }

  function type(el: HTMLElement, selector: string, value: string): void {
    const input = el.querySelector<HTMLInputElement>(selector)!;
    input.value = value;
    input.dispatchEvent(new Event('input'));
  }

  it('when submitted empty then shows what is missing and sends nothing', async () => {
    const { fixture, http, el } = await setup();
    el.querySelector<HTMLButtonElement>('button[type=submit]')!.click();
    await fixture.whenStable();
    expect(el.textContent).toContain('Enter your e-mail address.');
    expect(el.textContent).toContain('Enter your password.');
    http.expectNone('/api/auth/login');
  });

  it('when the server refuses then shows its message', async () => {
    const { fixture, http, el } = await setup();
    type(el, 'input[type=email]', 'someone@lab.test');
    type(el, 'input[formControlName=password]', 'wrong-password');
    el.querySelector<HTMLButtonElement>('button[type=submit]')!.click();
    const req = http.expectOne('/api/auth/login');
    expect(req.request.body).toEqual({ email: 'someone@lab.test', password: 'wrong-password' });
    req.flush(
      { error: { code: 'unauthorized', message: 'E-mail or password is not correct.' } },
      { status: 401, statusText: 'Unauthorized' },
    );
    await fixture.whenStable();
    expect(el.querySelector('[data-testid=sign-in-error]')?.textContent).toContain(
      'E-mail or password is not correct.',
    );
  });

  it('when sign-in succeeds then goes to the return address', async () => {
    const { fixture, http, el } = await setup();
    const navigate = jest.spyOn(TestBed.inject(Router), 'navigateByUrl').mockResolvedValue(true);
    type(el, 'input[type=email]', 'admin@equilight.test');
    type(el, 'input[formControlName=password]', 'secret-enough');
    el.querySelector<HTMLButtonElement>('button[type=submit]')!.click();
    http
      .expectOne('/api/auth/login')
      .flush({ id: 1, email: 'admin@equilight.test', displayName: 'A', role: 'admin', active: true });
    await fixture.whenStable();
    expect(navigate).toHaveBeenCalledWith('/people');
  });
});
