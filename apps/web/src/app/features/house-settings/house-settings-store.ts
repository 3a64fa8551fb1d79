import { computed, inject, Injectable, signal } from '@angular/core';
import type { HouseUpdate, HouseWithCounters } from '@tierscope/contracts';
import { describeApiError } from '../../core/http/api-error';
import { loadStatus } from '../../shared/ui/load-state';
import { HousesApi } from '../../core/http/houses-api';
import { HouseSettingsApi } from './house-settings-api';

/** The house settings page's state: the house as saved, and saving changes to it. */
@Injectable()
export class HouseSettingsStore {
  private readonly api = inject(HouseSettingsApi);
  private readonly houseParam = signal<() => number | null>(() => null);

  readonly houseId = computed(() => this.houseParam()());
  readonly house = inject(HousesApi).house(this.houseId);
  /** The currency the egg price is in: the house's farm's (null until read). */
  readonly currency = computed(() => {
    const farm = this.farm;
    return farm.hasValue() ? farm.value().currency : null;
  });
  private readonly farm = this.api.farm(() =>
    this.house.hasValue() ? this.house.value().farmId : null,
  );
  readonly loadStatus = computed(() => loadStatus(this.house));
  readonly errorText = computed(() => describeApiError(this.house.error()));
  readonly isSaving = signal(false);

  /** Shows the house the route names. */
  followHouse(houseId: () => number | null): void {
    this.houseParam.set(houseId);
  }

  /** Saves the changed settings; the answer becomes the house shown. Throws what the API refused. */
  async save(changes: HouseUpdate): Promise<HouseWithCounters | null> {
    const house = this.house.value();
    if (!house) return null;
    this.isSaving.set(true);
    try {
      const saved = await this.api.update(house.id, changes);
      this.house.set(saved);
      return saved;
    } finally {
      this.isSaving.set(false);
    }
  }
}
