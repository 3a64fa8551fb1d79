import { inject, Injectable } from '@angular/core';
import { endpoints } from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** What the farms page reads: the user's farms. */
@Injectable({ providedIn: 'root' })
export class FarmsApi {
  private readonly api = inject(ApiClient);

  farms() {
    return this.api.resource(endpoints.farms.list, () => ({}));
  }
}
