import { computed, inject, Injectable, linkedSignal, signal } from '@angular/core';
import type { ImportMappingInput, ImportStatus, SavedMapping } from '@tierscope/contracts';
import { AuthStore } from '../../core/auth/auth-store';
import { listState } from '../../shared/ui/load-state';
import { HousesApi } from '../../core/http/houses-api';
import { ImportsApi } from './imports-api';

/** The imports page's state: farm and house chosen, their counters and saved mappings, recent imports, the one running. */
@Injectable()
export class ImportsStore {
  private readonly api = inject(ImportsApi);
  private readonly housesApi = inject(HousesApi);
  private readonly auth = inject(AuthStore);

  /** The farms on which the user may import. */
  readonly farms = this.auth.farmsWith('imports.run');
  readonly farmId = linkedSignal(() => this.farms()[0]?.farmId ?? null);
  readonly houses = this.housesApi.housesOfFarm(this.farmId);
  readonly houseId = linkedSignal(() => this.houses.value()?.[0]?.id ?? null);
  readonly house = computed(
    () => this.houses.value()?.find((h) => h.id === this.houseId()) ?? null,
  );
  readonly counters = this.housesApi.counters(this.houseId);
  readonly saved = this.api.mappings(this.farmId);
  readonly recent = this.api.recent(this.farmId);
  readonly recentStatus = computed(() => listState(this.recent));
  readonly isStarting = signal(false);
  /** The import started from this page, followed until it ends. */
  readonly current = signal<ImportStatus | null>(null);

  /** Starts importing `file` into the chosen house; throws what the API refused. */
  async start(mapping: ImportMappingInput, file: File): Promise<void> {
    const houseId = this.houseId();
    if (houseId === null) return;
    this.isStarting.set(true);
    try {
      this.current.set(await this.api.start(houseId, mapping, file));
      this.recent.reload();
    } finally {
      this.isStarting.set(false);
    }
  }

  async saveMapping(name: string, mapping: ImportMappingInput): Promise<void> {
    const farmId = this.farmId();
    if (farmId === null) return;
    await this.api.saveMapping(farmId, name, mapping);
    this.saved.reload();
  }

  async deleteMapping(mapping: SavedMapping): Promise<void> {
    await this.api.deleteMapping(mapping.id);
    this.saved.reload();
  }
}
