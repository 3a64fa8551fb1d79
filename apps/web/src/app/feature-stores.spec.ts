import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { By } from '@angular/platform-browser';
import { RouterTestingHarness } from '@angular/router/testing';
import { signInAs } from '../testing/session';
import { ExceptionsPage } from './features/exceptions/exceptions-page';
import { ExceptionsStore } from './features/exceptions/exceptions-store';
import { appConfig } from './app.config';

/** The store the exceptions page was given (the page sits in the shell's outlet). */
function storeOnPage(harness: RouterTestingHarness): ExceptionsStore {
  return harness.fixture.debugElement
    .query(By.directive(ExceptionsPage))
    .injector.get(ExceptionsStore);
}

describe('feature stores (provided on their routes)', () => {
  afterEach(() => {
    localStorage.clear();
  });

  it('gives each visit of a page a fresh store, and keeps it while the page stays', async () => {
    signInAs('manager');
    TestBed.configureTestingModule({
      // The app's own routes and router features; only the HTTP backend is the testing one.
      providers: [...appConfig.providers, provideHttpClientTesting()],
    });
    const harness = await RouterTestingHarness.create();
    await harness.navigateByUrl('/exceptions');
    const first = storeOnPage(harness);
    first.status.set('closed');
    await harness.navigateByUrl('/exceptions?houseId=3');
    expect(storeOnPage(harness)).toBe(first);

    await harness.navigateByUrl('/notifications');
    await harness.navigateByUrl('/exceptions');
    const second = storeOnPage(harness);
    expect(second).not.toBe(first);
    expect(second.status()).toBe('live');
    TestBed.inject(HttpTestingController).match(() => true);
  });
});
