import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter, Router } from '@angular/router';
import { SignInPage } from './sign-in-page';

function setup() {
  localStorage.clear();
  TestBed.configureTestingModule({
    imports: [SignInPage],
    providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
  });
  const fixture = TestBed.createComponent(SignInPage);
  fixture.detectChanges();
  const element = fixture.nativeElement as HTMLElement;
  const type = (selector: string, value: string) => {
    const input = element.querySelector<HTMLInputElement>(selector);
    if (!input) throw new Error(`no ${selector}`);
    input.value = value;
    input.dispatchEvent(new Event('input'));
  };
  const submit = async () => {
    element.querySelector<HTMLButtonElement>('button[type=submit]')?.click();
    await fixture.whenStable();
    fixture.detectChanges();
  };
  /** Lets the sign-in promise chain run after a flushed response; zoneless tests have no zone to wait on. */
  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve, 0));
    await fixture.whenStable();
    fixture.detectChanges();
  };
  return { fixture, element, type, submit, settle, http: TestBed.inject(HttpTestingController) };
}

describe('SignInPage', () => {
  it('shows what is missing and sends nothing when the form is empty', async () => {
    const { element, submit, http } = setup();
    await submit();
    expect(element.textContent).toContain('Enter your e-mail address');
    expect(element.textContent).toContain('Enter your password');
    http.expectNone('/api/v1/auth/login');
  });

  it('shows the server message when the credentials do not match', async () => {
    const { element, type, submit, settle, http } = setup();
    type('input[type=email]', 'casey@example.test');
    type('input[autocomplete=current-password]', 'wrong');
    await submit();
    http.expectOne('/api/v1/auth/login').flush(
      {
        error: {
          code: 'invalid_credentials',
          message: 'That e-mail and password do not match an account',
        },
      },
      { status: 401, statusText: 'Unauthorized' },
    );
    await settle();
    expect(element.querySelector('[role=alert]')?.textContent).toContain('do not match');
  });

  it('goes to the farms after a successful sign-in', async () => {
    const { type, submit, settle, http } = setup();
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigateByUrl').mockResolvedValue(true);
    type('input[type=email]', 'casey@example.test');
    type('input[autocomplete=current-password]', 'right');
    await submit();
    const request = http.expectOne('/api/v1/auth/login');
    expect(request.request.body).toEqual({ email: 'casey@example.test', password: 'right' });
    request.flush({
      token: 't',
      expiresAt: new Date(Date.now() + 60_000).toISOString(),
      user: { id: 1, email: 'casey@example.test', name: 'Casey' },
      memberships: [],
    });
    await settle();
    expect(navigate).toHaveBeenCalledWith('/farms');
  });

  it('does not follow a returnTo link that leaves the app', async () => {
    const { fixture, type, submit, settle, http } = setup();
    fixture.componentRef.setInput('returnTo', '//elsewhere.example/steal');
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigateByUrl').mockResolvedValue(true);
    type('input[type=email]', 'casey@example.test');
    type('input[autocomplete=current-password]', 'right');
    await submit();
    http.expectOne('/api/v1/auth/login').flush({
      token: 't',
      expiresAt: new Date(Date.now() + 60_000).toISOString(),
      user: { id: 1, email: 'casey@example.test', name: 'Casey' },
      memberships: [],
    });
    await settle();
    expect(navigate).toHaveBeenCalledWith('/farms');
  });
});
