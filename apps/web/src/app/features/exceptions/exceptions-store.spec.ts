import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { exceptionView, workOrderSummary } from '../../../testing/fixtures';
import { signInAs } from '../../../testing/session';
import { ExceptionsStore } from './exceptions-store';

function setup() {
  TestBed.configureTestingModule({
    providers: [ExceptionsStore, provideHttpClient(), provideHttpClientTesting()],
  });
  const store = TestBed.inject(ExceptionsStore);
  const http = TestBed.inject(HttpTestingController);
  const settle = async () => {
    TestBed.tick();
    await new Promise((resolve) => setTimeout(resolve, 0));
  };
  const listRequest = () =>
    http.expectOne((r) => r.method === 'GET' && r.url === '/api/v1/exceptions');
  return { store, http, settle, listRequest };
}

describe('ExceptionsStore', () => {
  afterEach(() => {
    localStorage.clear();
  });

  it('reads the live exceptions first, then again with each filter chosen', async () => {
    signInAs('crew');
    const { store, settle, listRequest } = setup();
    await settle();
    expect(listRequest().request.params.toString()).toBe('status=live');

    store.status.set('closed');
    store.kind.set('silent_counter');
    await settle();
    expect(listRequest().request.params.toString()).toBe('status=closed&kind=silent_counter');
  });

  it("filters by a mailed link's house until the user picks all houses", async () => {
    signInAs('crew');
    const { store, settle, listRequest } = setup();
    store.followHouseParam(() => 7);
    await settle();
    expect(listRequest().request.params.get('houseId')).toBe('7');

    store.houseFilter.set(null);
    await settle();
    expect(listRequest().request.params.has('houseId')).toBe(false);
  });

  it('offers a manager a work order only for an exception that has none yet', async () => {
    signInAs('manager');
    const { store, http, settle, listRequest } = setup();
    await settle();
    listRequest().flush([exceptionView(5), exceptionView(6)]);
    http
      .expectOne((r) => r.url === '/api/v1/work-orders')
      .flush([workOrderSummary(40, { exceptionId: 5 })]);
    await settle();

    expect(store.ordersByException().get(5)).toEqual([40]);
    expect(store.canOpenWorkOrder(exceptionView(5))).toBe(false);
    expect(store.canOpenWorkOrder(exceptionView(6))).toBe(true);
    expect(store.canOpenWorkOrder(exceptionView(6, { status: 'closed' }))).toBe(false);
  });

  it('does not read work orders for the crew, who may not open them', async () => {
    signInAs('crew');
    const { store, http, settle, listRequest } = setup();
    await settle();
    listRequest().flush([exceptionView(5)]);
    http.expectNone((r) => r.url === '/api/v1/work-orders');
    expect(store.canOpenWorkOrder(exceptionView(5))).toBe(false);
    expect(store.canAct(exceptionView(5))).toBe(false);
  });

  it('reads the list again after an acknowledgement the API refused, and passes the refusal on', async () => {
    signInAs('manager');
    const { store, http, settle, listRequest } = setup();
    await settle();
    listRequest().flush([exceptionView(5)]);
    await settle();
    http.match((r) => r.url === '/api/v1/work-orders');

    const acting = store.acknowledge(exceptionView(5));
    http
      .expectOne('/api/v1/exceptions/5/acknowledge')
      .flush({ error: 'conflict' }, { status: 409, statusText: 'Conflict' });
    await expect(acting).rejects.toBeTruthy();
    await settle();
    listRequest();
  });
});
