import { inject, Injectable } from '@angular/core';
import { endpoints, type CounterPlaced, type CounterPlacement } from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** The unknown-counter endpoints as the web app uses them. */
@Injectable({ providedIn: 'root' })
export class CountersApi {
  private readonly api = inject(ApiClient);

  /** A farm's unknown counters with their held readings (nothing while no farm is chosen). */
  unknown(farmId: () => number | null) {
    return this.api.resource(endpoints.counters.unknown, () => {
      const id = farmId();
      return id === null ? undefined : { params: { farmId: id } };
    });
  }

  place(counterId: number, placement: CounterPlacement): Promise<CounterPlaced> {
    return this.api.call(endpoints.counters.place, {
      params: { counterId },
      body: placement,
    });
  }

  forget(counterId: number): Promise<void> {
    return this.api.call(endpoints.counters.forget, { params: { counterId } });
  }
}
