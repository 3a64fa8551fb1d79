import { inject, Injectable } from '@angular/core';
import { endpoints } from '@tierscope/contracts';
import { ApiClient } from './api-client';

/** The house reads several features share: a house, a farm's houses, a house's counters. */
@Injectable({ providedIn: 'root' })
export class HousesApi {
  private readonly api = inject(ApiClient);

  /** One house with its counters (nothing while the id is null). */
  house(houseId: () => number | null) {
    return this.api.resource(endpoints.houses.get, () => {
      const id = houseId();
      return id === null ? undefined : { params: { houseId: id } };
    });
  }

  /** A farm's houses (nothing while no farm is chosen). */
  housesOfFarm(farmId: () => number | null) {
    return this.api.resource(endpoints.houses.listByFarm, () => {
      const id = farmId();
      return id === null ? undefined : { params: { farmId: id } };
    });
  }

  /** The counters a house's gateways report as (nothing while no house is chosen). */
  counters(houseId: () => number | null) {
    return this.api.resource(endpoints.houses.counters, () => {
      const id = houseId();
      return id === null ? undefined : { params: { houseId: id } };
    });
  }
}
