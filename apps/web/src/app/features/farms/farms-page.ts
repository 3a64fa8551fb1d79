import { httpResource } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, computed } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { farmSchema } from '@tierscope/contracts';
import { z } from 'zod';
import { describeApiError } from '../../core/http/api-error';
import { listState, LoadState } from '../../shared/ui/load-state';
import { FarmHouses } from './farm-houses';

/** Every farm the user belongs to, each with its houses. */
@Component({
  selector: 'ts-farms-page',
  imports: [FarmHouses, LoadState, MatIconModule],
  templateUrl: './farms-page.html',
  styleUrl: './farms-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmsPage {
  protected readonly farms = httpResource(() => '/api/v1/farms', {
    parse: z.array(farmSchema).parse,
  });
  protected readonly state = computed(() => listState(this.farms));
  protected readonly errorText = computed(() => describeApiError(this.farms.error()));
}
