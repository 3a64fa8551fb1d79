import {
  ChangeDetectionStrategy,
  Component,
  computed,
  inject,
  input,
  numberAttribute,
} from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressSpinnerModule } from '@angular/material/progress-spinner';
import { RouterLink } from '@angular/router';
import { type ExceptionView } from '@tierscope/contracts';
import { measuredWords } from '@tierscope/domain';
import { LoadState } from '../../shared/ui/load-state';
import { houseTime } from '../../shared/ui/local-dates';
import { CellDetail } from './cell-detail';
import { HouseHeatMap } from './house-heat-map';
import { LineJudgements } from './line-judgements';
import { HouseLiveStore } from './house-live-store';

/** A house live: the rows × tiers map over the live socket, a window picker, and a cell's detail. */
@Component({
  selector: 'ts-house-live-page',
  imports: [
    FormsModule,
    RouterLink,
    MatButtonToggleModule,
    MatButtonModule,
    MatIconModule,
    MatFormFieldModule,
    MatInputModule,
    MatProgressSpinnerModule,
    LoadState,
    HouseHeatMap,
    LineJudgements,
    CellDetail,
  ],
  templateUrl: './house-live-page.html',
  styleUrl: './house-live-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HouseLivePage {
  protected readonly store = inject(HouseLiveStore);

  /** Route parameter. */
  readonly houseId = input.required({ transform: numberAttribute });

  constructor() {
    this.store.followHouse(() => this.houseId());
  }

  protected readonly connectionLabel = computed(
    () =>
      ({
        live: 'Live',
        connecting: 'Connecting…',
        reconnecting: 'Reconnecting…',
        offline: 'Offline',
      })[this.store.connection()],
  );
  /** The last frame's time by the house's own clock, with its zone shown. */
  protected readonly updatedText = computed(() => {
    const at = this.store.lastMessageAt();
    const zone = this.store.map()?.timezone;
    if (!at || !zone) return null;
    const time = new Intl.DateTimeFormat('en-GB', {
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      timeZone: zone,
    }).format(at);
    return `${time} ${zone}`;
  });
  /** What it measured in plain words: how far below, how unusual for that spot (never a p-value). */
  protected measured(e: ExceptionView): string {
    return measuredWords(e);
  }

  /** When it opened, on the house's own clock with its zone. */
  protected since(iso: string): string {
    const zone = this.store.map()?.timezone;
    return zone ? houseTime(iso, zone) : new Date(iso).toISOString().slice(0, 16).replace('T', ' ');
  }

  protected describeScope(e: {
    kind: string;
    scope: string;
    row: number | null;
    tier: number | null;
  }): string {
    if (e.kind === 'collector_gap') return 'Collector and belts disagree';
    if (e.kind === 'house_dip') return 'House hen-day production dipped';
    return e.scope === 'row'
      ? `Row ${e.row} short (all tiers)`
      : `Tier ${e.tier} short (across rows)`;
  }
}
