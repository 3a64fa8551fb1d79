import { inject, Injectable } from '@angular/core';
import { endpoints, type HouseUpdate, type HouseWithCounters } from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** The house endpoints the settings page uses. */
@Injectable({ providedIn: 'root' })
export class HouseSettingsApi {
  private readonly api = inject(ApiClient);

  /** The house's farm (its currency), nothing while the farm is not known. */
  farm(farmId: () => number | null) {
    return this.api.resource(endpoints.farms.get, () => {
      const id = farmId();
      return id === null ? undefined : { params: { farmId: id } };
    });
  }

  update(houseId: number, changes: HouseUpdate): Promise<HouseWithCounters> {
    return this.api.call(endpoints.houses.update, { params: { houseId }, body: changes });
  }
}
