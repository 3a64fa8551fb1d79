import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import type { CounterPlaced, UnknownCounter } from '@tierscope/contracts';
import { house as houseFixture } from '../../../testing/fixtures';
import { signInAs } from '../../../testing/session';
import { CountersStore } from './counters-store';

const unknown = (id: number, externalId: string): UnknownCounter => ({
  id,
  externalId,
  firstSeenAt: '2026-11-10T12:00:00.000Z',
  readings: 3,
  eggs: 100,
  firstReadingAt: '2026-11-10T12:00:00.000Z',
  lastReadingAt: '2026-11-11T12:00:00.000Z',
});

const house = houseFixture();

const placed: CounterPlaced = {
  counter: { id: 9, externalId: 'SPARE-3', kind: 'belt', row: 2, tier: 3, active: true },
  houseId: 4,
  replacedExternalId: null,
  readings: 3,
  eggs: 100,
  firstDay: '2026-11-10',
  lastDay: '2026-11-11',
};

function setup() {
  TestBed.configureTestingModule({
    providers: [CountersStore, provideHttpClient(), provideHttpClientTesting()],
  });
  const store = TestBed.inject(CountersStore);
  const http = TestBed.inject(HttpTestingController);
  const settle = async () => {
    TestBed.tick();
    await new Promise((resolve) => setTimeout(resolve, 0));
  };
  const unknownRequest = () =>
    http.expectOne((r) => r.method === 'GET' && r.url === '/api/v1/farms/1/unknown-counters');
  const housesRequest = () =>
    http.expectOne((r) => r.method === 'GET' && r.url === '/api/v1/farms/1/houses');
  return { store, http, settle, unknownRequest, housesRequest };
}

describe('CountersStore', () => {
  afterEach(() => {
    localStorage.clear();
  });

  it("reads the integrator's farm's unknown counters and houses", async () => {
    signInAs('integrator');
    const { store, settle, unknownRequest, housesRequest } = setup();
    await settle();
    expect(store.loadStatus()).toBe('loading');
    unknownRequest().flush([unknown(9, 'SPARE-3')]);
    housesRequest().flush([house]);
    await settle();
    expect(store.loadStatus()).toBe('ready');
    expect(store.unknown.value()?.map((c) => c.externalId)).toEqual(['SPARE-3']);
  });

  it('says the list is empty when every counter has its place', async () => {
    signInAs('integrator');
    const { store, settle, unknownRequest } = setup();
    await settle();
    unknownRequest().flush([]);
    await settle();
    expect(store.loadStatus()).toBe('empty');
  });

  it('keeps what a placement brought and reads the list again', async () => {
    signInAs('integrator');
    const { store, settle, unknownRequest, housesRequest } = setup();
    await settle();
    unknownRequest().flush([unknown(9, 'SPARE-3')]);
    housesRequest().flush([house]);
    await settle();

    store.placed(unknown(9, 'SPARE-3'), house, placed);
    await settle();
    expect(store.lastPlacement()).toEqual({ externalId: 'SPARE-3', house, placed });
    unknownRequest().flush([]);
    await settle();
    expect(store.loadStatus()).toBe('empty');
  });

  it('forgets a counter through the API, and reads the list again even when refused', async () => {
    signInAs('integrator');
    const { store, http, settle, unknownRequest } = setup();
    await settle();
    unknownRequest().flush([unknown(9, 'SPARE-3')]);
    await settle();

    const forgetting = store.forget(unknown(9, 'SPARE-3'));
    expect(store.isForgetting()).toBe(true);
    http
      .expectOne((r) => r.method === 'DELETE' && r.url === '/api/v1/unknown-counters/9')
      .flush(
        { error: { code: 'conflict', message: 'Counter SPARE-3 already has a place' } },
        { status: 409, statusText: 'Conflict' },
      );
    await expect(forgetting).rejects.toMatchObject({ status: 409 });
    expect(store.isForgetting()).toBe(false);
    await settle();
    unknownRequest().flush([]);
  });
});
