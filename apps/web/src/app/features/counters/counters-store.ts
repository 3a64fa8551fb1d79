import { computed, inject, Injectable, linkedSignal, signal } from '@angular/core';
import type { CounterPlaced, House, UnknownCounter } from '@tierscope/contracts';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { HousesApi } from '../../core/http/houses-api';
import { listState } from '../../shared/ui/load-state';
import { CountersApi } from './counters-api';

/** What the page says after a counter was placed: the counter, where it went, what it brought. */
export interface Placement {
  externalId: string;
  house: House;
  placed: CounterPlaced;
}

/** The unknown-counters page's state: the farm chosen, its unknown counters and houses, the last placement. */
@Injectable()
export class CountersStore {
  private readonly api = inject(CountersApi);
  private readonly auth = inject(AuthStore);

  /** The farms on which the user places counters. */
  readonly farms = this.auth.farmsWith('counters.manage');
  readonly farmId = linkedSignal(() => this.farms()[0]?.farmId ?? null);
  readonly unknown = this.api.unknown(() => this.farmId());
  readonly houses = inject(HousesApi).housesOfFarm(() => this.farmId());
  readonly loadStatus = computed(() => listState(this.unknown));
  readonly errorText = computed(() => describeApiError(this.unknown.error()));
  /** The last counter placed on this visit, until another farm is chosen. */
  readonly lastPlacement = linkedSignal<number | null, Placement | null>({
    source: () => this.farmId(),
    computation: () => null,
  });
  readonly isForgetting = signal(false);

  /** Notes a placement the dialog made, and reads the list again (the counter has left it). */
  placed(counter: UnknownCounter, house: House, placed: CounterPlaced): void {
    this.lastPlacement.set({ externalId: counter.externalId, house, placed });
    this.unknown.reload();
  }

  /** Forgets an unknown counter and its held readings; throws what the API refused. */
  async forget(counter: UnknownCounter): Promise<void> {
    this.isForgetting.set(true);
    try {
      await this.api.forget(counter.id);
    } finally {
      this.isForgetting.set(false);
      this.unknown.reload();
    }
  }
}
