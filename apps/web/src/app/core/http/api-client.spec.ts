import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ApplicationRef, Injector, runInInjectionContext, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { endpoints } from '@tierscope/contracts';
import { ApiClient } from './api-client';

const farm = {
  id: 1,
  name: 'North Ridge',
  currency: 'USD',
  role: 'manager',
  houseCount: 3,
  createdAt: '2026-11-01T06:00:00.000Z',
};

describe('ApiClient', () => {
  let client: ApiClient;
  let http: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideHttpClient(), provideHttpClientTesting()],
    });
    client = TestBed.inject(ApiClient);
    http = TestBed.inject(HttpTestingController);
  });

  afterEach(() => {
    http.verify();
  });

  it('fills the path, sends the body with the declared method and parses the answer', async () => {
    const done = client.call(endpoints.farms.update, {
      params: { farmId: 7 },
      body: { name: 'South Field' },
    });
    const request = http.expectOne('/api/v1/farms/7');
    expect(request.request.method).toBe('PATCH');
    expect(request.request.body).toEqual({ name: 'South Field' });
    request.flush({ ...farm, id: 7, name: 'South Field' });
    expect((await done).name).toBe('South Field');
  });

  it('rejects an answer that does not match the endpoint’s schema', async () => {
    const done = client.call(endpoints.farms.get, { params: { farmId: 1 } });
    http.expectOne('/api/v1/farms/1').flush({ ...farm, houseCount: 'three' });
    await expect(done).rejects.toThrow(/houseCount/);
  });

  it('sends the query, leaving out empty values, and encodes path values', async () => {
    const done = client.call(endpoints.workOrders.list, {
      query: { state: 'active', houseId: undefined, mine: true },
    });
    const request = http.expectOne((r) => r.url === '/api/v1/work-orders');
    expect(request.request.params.keys()).toEqual(['state', 'mine']);
    expect(request.request.params.get('mine')).toBe('true');
    request.flush([]);
    expect(await done).toEqual([]);

    const mortality = client.call(endpoints.flocks.recordLoss, {
      params: { flockId: 3, day: '2026-11-01' },
      body: { dead: 2, culled: 0 },
    });
    const put = http.expectOne('/api/v1/flocks/3/mortality/2026-11-01');
    expect(put.request.method).toBe('PUT');
    put.flush(null, { status: 500, statusText: 'Server Error' });
    await expect(mortality).rejects.toMatchObject({ status: 500 });
  });

  it('reads as a resource that follows its input and asks nothing while the input is missing', async () => {
    const farmId = signal<number | null>(null);
    const houses = runInInjectionContext(TestBed.inject(Injector), () =>
      client.resource(endpoints.houses.listByFarm, () => {
        const id = farmId();
        return id === null ? undefined : { params: { farmId: id } };
      }),
    );
    TestBed.tick();
    http.expectNone(() => true);
    expect(houses.value()).toBeUndefined();

    farmId.set(2);
    TestBed.tick();
    http.expectOne('/api/v1/farms/2/houses').flush([]);
    await TestBed.inject(ApplicationRef).whenStable();
    expect(houses.value()).toEqual([]);
  });
});
