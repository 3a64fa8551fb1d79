import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { AuthStore } from './auth-store';

const session = (role: 'admin' | 'crew', expiresInMs = 3_600_000) => ({
  token: 'header.payload.signature',
  expiresAt: new Date(Date.now() + expiresInMs).toISOString(),
  user: { id: 3, email: 'casey@example.test', name: 'Casey' },
  memberships: [{ farmId: 1, farmName: 'North Ridge', role }],
});

describe('AuthStore', () => {
  beforeEach(() => {
    localStorage.clear();
    TestBed.configureTestingModule({
      providers: [provideHttpClient(), provideHttpClientTesting()],
    });
  });

  it('signs in through the API and keeps the session across a reload', async () => {
    const store = TestBed.inject(AuthStore);
    const done = store.signIn({ email: 'casey@example.test', password: 'secret' });
    TestBed.inject(HttpTestingController).expectOne('/api/v1/auth/login').flush(session('crew'));
    await done;
    expect(store.isSignedIn()).toBe(true);
    expect(store.user()?.name).toBe('Casey');
    expect(JSON.parse(localStorage.getItem('tierscope.session') ?? '{}').token).toBe(
      'header.payload.signature',
    );
  });

  it('answers permission questions from the farm roles', () => {
    localStorage.setItem('tierscope.session', JSON.stringify(session('crew')));
    const store = TestBed.inject(AuthStore);
    expect(store.hasPermission('workOrders.work')).toBe(true);
    expect(store.hasPermission('users.manage')).toBe(false);
    expect(store.hasPermission('farm.read', 2)).toBe(false);
  });

  it('treats an expired session as signed out', () => {
    localStorage.setItem('tierscope.session', JSON.stringify(session('admin', -1000)));
    expect(TestBed.inject(AuthStore).isSignedIn()).toBe(false);
  });

  it('ignores a stored session that does not match the contract', () => {
    localStorage.setItem('tierscope.session', JSON.stringify({ token: 42 }));
    expect(TestBed.inject(AuthStore).session()).toBeNull();
  });
});
