import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { DecimalPipe } from '@angular/common';
import { RouterLink } from '@angular/router';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import type { UnknownCounter } from '@tierscope/contracts';
import { firstValueFrom } from 'rxjs';
import { describeApiError } from '../../core/http/api-error';
import { FarmSelect } from '../../shared/ui/farm-select';
import { LoadState } from '../../shared/ui/load-state';
import { houseTime } from '../../shared/ui/local-dates';
import { heldWords } from './counter-words';
import { CountersStore, type Placement } from './counters-store';
import {
  PlaceCounterDialog,
  type PlaceCounterData,
  type PlaceCounterResult,
} from './place-counter-dialog';

/**
 * The integrator's unknown counters: ids a gateway sent that no house has, with the readings held for them,
 * each to place on a belt or a collector (its readings then count there) or to forget.
 */
@Component({
  selector: 'ts-counters-page',
  imports: [
    DecimalPipe,
    RouterLink,
    MatTableModule,
    MatButtonModule,
    MatIconModule,
    FarmSelect,
    LoadState,
  ],
  templateUrl: './counters-page.html',
  styleUrl: './counters-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CountersPage {
  protected readonly store = inject(CountersStore);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly columns = ['externalId', 'readings', 'eggs', 'span', 'firstSeen', 'actions'];
  /** No house holds these yet, so their times are on this device's clock, its zone shown. */
  private readonly zone = Intl.DateTimeFormat().resolvedOptions().timeZone;

  /** Where a placed counter now counts, in words. */
  protected where({ house, placed }: Placement): string {
    const { kind, row, tier } = placed.counter;
    return kind === 'collector'
      ? `${house.name}'s collector`
      : `${house.name}, row ${row}, tier ${tier}`;
  }

  /** The production days the held readings fell on (the house's own days), e.g. "10–11 Nov 2026". */
  protected days({ placed }: Placement): string {
    const { firstDay, lastDay } = placed;
    if (!firstDay || !lastDay) return 'no day';
    const format = new Intl.DateTimeFormat('en-GB', {
      day: 'numeric',
      month: 'short',
      year: 'numeric',
      timeZone: 'UTC',
    });
    const first = new Date(`${firstDay}T00:00:00Z`);
    const last = new Date(`${lastDay}T00:00:00Z`);
    return firstDay === lastDay ? format.format(first) : format.formatRange(first, last);
  }

  protected readonly held = heldWords;

  protected time(iso: string | null): string {
    return iso === null ? '—' : houseTime(iso, this.zone);
  }

  protected async place(counter: UnknownCounter): Promise<void> {
    const houses = this.store.houses.value() ?? [];
    if (houses.length === 0) {
      this.snackBar.open('This farm has no house yet: add one first', 'Dismiss');
      return;
    }
    const result = await firstValueFrom(
      this.dialog
        .open<PlaceCounterDialog, PlaceCounterData, PlaceCounterResult>(PlaceCounterDialog, {
          data: { counter, houses },
          autoFocus: 'first-tabbable',
        })
        .afterClosed(),
    );
    if (!result) return;
    this.store.placed(counter, result.house, result.placed);
  }

  protected async forget(counter: UnknownCounter): Promise<void> {
    const held =
      counter.readings > 0 ? ` and its ${heldWords(counter.readings, counter.eggs)}` : '';
    if (!confirm(`Forget counter ${counter.externalId}${held}? This cannot be undone.`)) return;
    try {
      await this.store.forget(counter);
      this.snackBar.open(`${counter.externalId} forgotten`, undefined, { duration: 3000 });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }
}
