import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input, inject } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { ratioColor } from '../../shared/ui/ratio-colors';
import { HouseLiveApi } from '../house-live/house-live-api';

/** A house card's figures: today's eggs, yesterday's hen-day %, open exceptions and a small map. */
@Component({
  selector: 'ts-house-summary',
  imports: [DecimalPipe, MatIconModule],
  template: `
    @if (today.value(); as m) {
      <div class="figures">
        <div>
          <span class="value">{{ m.belts | number }}</span><span class="label">eggs today</span>
        </div>
        <div>
          <span class="value">{{
            henDay() === null ? '—' : (henDay() | number: '1.1-1') + ' %'
          }}</span>
          <span class="label">hen-day yesterday</span>
        </div>
        <div [class.alert]="m.openExceptions > 0">
          <span class="value">
            @if (m.openExceptions > 0) {
              <mat-icon inline>warning</mat-icon>
            }
            {{ m.openExceptions }}</span
          >
          <span class="label">open exceptions</span>
        </div>
      </div>
      <div
        class="mini"
        [style.grid-template-columns]="'repeat(' + m.rows + ', 1fr)'"
        aria-hidden="true"
      >
        @for (cell of cells(); track cell.key) {
          <span [style.background]="cell.color" [class.flagged]="cell.flagged"></span>
        }
      </div>
    } @else if (today.error()) {
      <p class="ts-muted">Figures unavailable.</p>
    } @else {
      <p class="ts-muted">Loading figures…</p>
    }
  `,
  styles: `
    .figures {
      display: grid;
      grid-template-columns: repeat(3, 1fr);
      gap: 8px;
      margin: 8px 0;
    }
    .figures div {
      display: flex;
      flex-direction: column;
    }
    .value {
      font: var(--mat-sys-title-medium);
      display: inline-flex;
      align-items: center;
      gap: 2px;
    }
    .label {
      font-size: 12px;
      color: var(--mat-sys-on-surface-variant);
    }
    .alert .value {
      color: #a3134b;
    }
    .mini {
      display: grid;
      gap: 2px;
    }
    .mini span {
      height: 12px;
      border-radius: 2px;
      box-sizing: border-box;
    }
    .mini span.flagged {
      outline: 2px solid #c2185b;
      outline-offset: -2px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HouseSummary {
  private readonly api = inject(HouseLiveApi);
  readonly houseId = input.required<number>();

  protected readonly today = this.api.houseMap(() => ({
    houseId: this.houseId(),
    window: 'today',
  }));
  private readonly yesterday = this.api.houseMap(() => ({
    houseId: this.houseId(),
    window: 'yesterday',
  }));
  protected readonly henDay = computed(() => this.yesterday.value()?.henDayPct ?? null);
  /** Top tier first, as the house stands. */
  protected readonly cells = computed(() => {
    const m = this.today.value();
    if (!m) return [];
    return [...m.cells]
      .sort((a, b) => b.tier - a.tier || a.row - b.row)
      .map((c) => ({
        key: `${c.row}-${c.tier}`,
        color: ratioColor(c.ratio === null ? null : c.ratio * 100),
        flagged: c.exceptionKind !== null,
      }));
  });
}
