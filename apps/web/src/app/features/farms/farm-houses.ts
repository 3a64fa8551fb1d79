import { ChangeDetectionStrategy, Component, computed, inject, input } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { listState, LoadState } from '../../shared/ui/load-state';
import { HouseSummary } from './house-summary';
import { HousesApi } from '../../core/http/houses-api';

/** The house cards of one farm. */
@Component({
  selector: 'ts-farm-houses',
  imports: [MatCardModule, MatButtonModule, MatIconModule, RouterLink, LoadState, HouseSummary],
  templateUrl: './farm-houses.html',
  styleUrl: './farm-houses.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmHouses {
  private readonly housesApi = inject(HousesApi);
  private readonly auth = inject(AuthStore);
  readonly farmId = input.required<number>();

  protected readonly houses = this.housesApi.housesOfFarm(this.farmId);
  protected readonly state = computed(() => listState(this.houses));
  protected readonly errorText = computed(() => describeApiError(this.houses.error()));
  protected readonly canEdit = computed(() =>
    this.auth.hasPermission('house.update', this.farmId()),
  );
}
