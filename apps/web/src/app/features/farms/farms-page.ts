import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { endpoints } from '@tierscope/contracts';
import { describeApiError } from '../../core/http/api-error';
import { listState, LoadState } from '../../shared/ui/load-state';
import { FarmHouses } from './farm-houses';
import { ApiClient } from '../../core/http/api-client';

/** Every farm the user belongs to, each with its houses. */
@Component({
  selector: 'ts-farms-page',
  imports: [FarmHouses, LoadState, MatIconModule],
  templateUrl: './farms-page.html',
  styleUrl: './farms-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmsPage {
  private readonly api = inject(ApiClient);
  protected readonly farms = this.api.resource(endpoints.farms.list, () => ({}));
  protected readonly state = computed(() => listState(this.farms));
  protected readonly errorText = computed(() => describeApiError(this.farms.error()));
}
