import { inject, Injectable } from '@angular/core';
import {
  endpoints,
  type Gateway,
  type GatewayCreate,
  type GatewayCreated,
} from '@tierscope/contracts';
import { ApiClient } from '../../core/http/api-client';

/** The gateway endpoints as the web app uses them. */
@Injectable({ providedIn: 'root' })
export class GatewaysApi {
  private readonly api = inject(ApiClient);

  /** A farm's gateways (nothing while no farm is chosen). */
  list(farmId: () => number | null) {
    return this.api.resource(endpoints.gateways.list, () => {
      const id = farmId();
      return id === null ? undefined : { params: { farmId: id } };
    });
  }

  create(farmId: number, input: GatewayCreate): Promise<GatewayCreated> {
    return this.api.call(endpoints.gateways.create, { params: { farmId }, body: input });
  }

  revoke(gatewayId: number): Promise<Gateway> {
    return this.api.call(endpoints.gateways.revoke, { params: { gatewayId } });
  }
}
