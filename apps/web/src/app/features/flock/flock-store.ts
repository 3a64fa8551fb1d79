import { computed, inject, Injectable, linkedSignal, signal } from '@angular/core';
import type { FlockCreate, MortalityEntry } from '@tierscope/contracts';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import type { LoadStatus } from '../../shared/ui/load-state';
import { HousesApi } from '../../core/http/houses-api';
import { FlockApi } from './flock-api';

/** The flock page's state: the house, its flocks, the chosen flock's production, and the records kept. */
@Injectable()
export class FlockStore {
  private readonly api = inject(FlockApi);
  private readonly auth = inject(AuthStore);
  private readonly houseParam = signal<() => number | null>(() => null);

  readonly houseId = computed(() => this.houseParam()());
  readonly house = inject(HousesApi).house(this.houseId);
  readonly flocks = this.api.flocks(this.houseId);
  /** The flock shown: the newest until another is picked. */
  readonly flockId = linkedSignal(() => this.flocks.value()?.[0]?.id ?? null);
  readonly production = this.api.production(this.flockId);
  readonly canManage = computed(() => {
    const farmId = this.house.value()?.farmId;
    return farmId !== undefined && this.auth.hasPermission('flock.manage', farmId);
  });
  readonly hasActiveFlock = computed(() =>
    (this.flocks.value() ?? []).some((f) => f.endedOn === null),
  );
  readonly loadStatus = computed((): LoadStatus => {
    if (this.flocks.error() || this.production.error()) return 'error';
    if (!this.flocks.hasValue()) return 'loading';
    if (this.flocks.value().length === 0) return 'empty';
    return this.production.hasValue() ? 'ready' : 'loading';
  });
  readonly errorText = computed(() =>
    describeApiError(this.flocks.error() ?? this.production.error()),
  );
  readonly isSaving = signal(false);

  /** Shows the house the route names. */
  followHouse(houseId: () => number | null): void {
    this.houseParam.set(houseId);
  }

  place(input: FlockCreate): Promise<void> {
    return this.record(async () => {
      const houseId = this.houseId();
      if (houseId !== null) await this.api.place(houseId, input);
    });
  }

  /** The morning walk's dead and culled hens for one day of the chosen flock. */
  recordLoss(day: string, input: MortalityEntry): Promise<void> {
    return this.record(async () => {
      const flockId = this.flockId();
      if (flockId !== null) await this.api.recordLoss(flockId, day, input);
    });
  }

  endFlock(endedOn: string): Promise<void> {
    return this.record(async () => {
      const flockId = this.flockId();
      if (flockId !== null) await this.api.update(flockId, { endedOn });
    });
  }

  /** Saves one record, then reads the flocks and production again; throws what the API refused. */
  private async record(work: () => Promise<void>): Promise<void> {
    this.isSaving.set(true);
    try {
      await work();
      this.flocks.reload();
      this.production.reload();
    } finally {
      this.isSaving.set(false);
    }
  }
}
