import { HttpClient, provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter, Router } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { authInterceptor } from './auth-interceptor';
import { AuthStore } from './auth-store';

describe('authInterceptor', () => {
  beforeEach(() => {
    localStorage.setItem(
      'tierscope.session',
      JSON.stringify({
        token: 'the-token',
        expiresAt: new Date(Date.now() + 60_000).toISOString(),
        user: { id: 1, email: 'a@example.test', name: 'A' },
        memberships: [],
      }),
    );
    TestBed.configureTestingModule({
      providers: [
        provideRouter([]),
        provideHttpClient(withInterceptors([authInterceptor])),
        provideHttpClientTesting(),
      ],
    });
  });

  it('adds the bearer token to API calls only', () => {
    const http = TestBed.inject(HttpClient);
    const controller = TestBed.inject(HttpTestingController);
    http.get('/api/v1/farms').subscribe();
    http.get('/assets/logo.svg').subscribe();
    expect(controller.expectOne('/api/v1/farms').request.headers.get('Authorization')).toBe(
      'Bearer the-token',
    );
    expect(controller.expectOne('/assets/logo.svg').request.headers.has('Authorization')).toBe(
      false,
    );
  });

  it('signs the user out and sends them to sign in when the API answers 401', async () => {
    const navigate = vi.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    const result = firstValueFrom(TestBed.inject(HttpClient).get('/api/v1/farms')).catch(
      (e: unknown) => e,
    );
    TestBed.inject(HttpTestingController)
      .expectOne('/api/v1/farms')
      .flush(
        { error: { code: 'unauthenticated', message: 'expired' } },
        { status: 401, statusText: 'Unauthorized' },
      );
    await result;
    expect(TestBed.inject(AuthStore).session()).toBeNull();
    expect(navigate).toHaveBeenCalledWith(
      ['/sign-in'],
      expect.objectContaining({ queryParams: expect.objectContaining({ reason: 'expired' }) }),
    );
  });
});
