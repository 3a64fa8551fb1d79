import { inject, Injectable } from '@angular/core';
import {
  endpoints,
  type Flock,
  type FlockCreate,
  type FlockUpdate,
  type MortalityEntry,
} from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** The flock endpoints as the flock page uses them, with the house they live in. */
@Injectable({ providedIn: 'root' })
export class FlockApi {
  private readonly api = inject(ApiClient);

  flocks(houseId: () => number | null) {
    return this.api.resource(endpoints.flocks.list, () => {
      const id = houseId();
      return id === null ? undefined : { params: { houseId: id } };
    });
  }

  production(flockId: () => number | null) {
    return this.api.resource(endpoints.flocks.production, () => {
      const id = flockId();
      return id === null ? undefined : { params: { flockId: id } };
    });
  }

  place(houseId: number, input: FlockCreate): Promise<Flock> {
    return this.api.call(endpoints.flocks.place, { params: { houseId }, body: input });
  }

  recordLoss(flockId: number, day: string, input: MortalityEntry): Promise<Flock> {
    return this.api.call(endpoints.flocks.recordLoss, { params: { flockId, day }, body: input });
  }

  update(flockId: number, input: FlockUpdate): Promise<Flock> {
    return this.api.call(endpoints.flocks.update, { params: { flockId }, body: input });
  }
}
