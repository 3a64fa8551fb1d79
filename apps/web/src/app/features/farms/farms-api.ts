import { inject, Injectable } from '@angular/core';
import { endpoints, type Farm, type FarmUpdate } from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** What the farms page reads and changes: the user's farms. */
@Injectable({ providedIn: 'root' })
export class FarmsApi {
  private readonly api = inject(ApiClient);

  farms() {
    return this.api.resource(endpoints.farms.list, () => ({}));
  }

  update(farmId: number, changes: FarmUpdate): Promise<Farm> {
    return this.api.call(endpoints.farms.update, { params: { farmId }, body: changes });
  }
}
