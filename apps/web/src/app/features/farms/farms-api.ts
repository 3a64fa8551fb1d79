import { inject, Injectable } from '@angular/core';
import { endpoints } from '@tierscope/contracts';
import type { WindowKind } from '@tierscope/domain';
import { ApiClient } from '../../core/http/api-client';

/** What the farm cards read: the farms and a house's map for a window. */
@Injectable({ providedIn: 'root' })
export class FarmsApi {
  private readonly api = inject(ApiClient);

  farms() {
    return this.api.resource(endpoints.farms.list, () => ({}));
  }

  houseMap(houseId: () => number, window: Exclude<WindowKind, 'custom'>) {
    return this.api.resource(endpoints.exceptions.houseMap, () => ({
      params: { houseId: houseId() },
      query: { window },
    }));
  }
}
