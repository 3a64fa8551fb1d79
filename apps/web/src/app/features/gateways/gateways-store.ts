import { computed, inject, Injectable, linkedSignal, signal } from '@angular/core';
import type { Gateway, GatewayCreate, GatewayCreated } from '@tierscope/contracts';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { listState } from '../../shared/ui/load-state';
import { CountersApi } from '../counters/counters-api';
import { GatewaysApi } from './gateways-api';

/** The gateways page's state: the farm chosen, its gateways, and the key just made (shown once). */
@Injectable()
export class GatewaysStore {
  private readonly api = inject(GatewaysApi);
  private readonly auth = inject(AuthStore);

  /** The farms on which the user manages gateways. */
  readonly farms = this.auth.farmsWith('gateways.manage');
  readonly farmId = linkedSignal(() => this.farms()[0]?.farmId ?? null);
  readonly gateways = this.api.list(() => this.farmId());
  readonly loadStatus = computed(() => listState(this.gateways));
  /** How many counter ids the farm's gateways sent that no house has yet (0 until read). */
  private readonly unknown = inject(CountersApi).unknown(() => this.farmId());
  readonly unknownCount = computed(() =>
    this.unknown.hasValue() ? this.unknown.value().length : 0,
  );
  readonly errorText = computed(() => describeApiError(this.gateways.error()));
  readonly isCreating = signal(false);
  /** The key of the gateway just made: shown once, never again. */
  readonly newKey = signal<GatewayCreated | null>(null);

  /** Makes a gateway on the chosen farm; its key is kept in `newKey` until the page is left. */
  async create(input: GatewayCreate): Promise<void> {
    const farmId = this.farmId();
    if (farmId === null) return;
    this.isCreating.set(true);
    try {
      this.newKey.set(await this.api.create(farmId, input));
      this.gateways.reload();
    } finally {
      this.isCreating.set(false);
    }
  }

  async revoke(gateway: Gateway): Promise<void> {
    try {
      await this.api.revoke(gateway.id);
    } finally {
      this.gateways.reload();
    }
  }
}
