import { computed, inject, Injectable } from '@angular/core';
import { describeApiError } from '../../core/http/api-error';
import { listState } from '../../shared/ui/load-state';
import { FarmsApi } from './farms-api';

/** The farms page's state: the user's farms (each card reads its own houses and figures). */
@Injectable()
export class FarmsStore {
  private readonly api = inject(FarmsApi);

  readonly farms = this.api.farms();
  readonly loadStatus = computed(() => listState(this.farms));
  readonly errorText = computed(() => describeApiError(this.farms.error()));
}
