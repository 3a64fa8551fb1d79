import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { WORK_ORDER_STATE_LABELS } from '@tierscope/domain';
import { LoadState } from '../../shared/ui/load-state';
import { PRIORITY_LABELS, spotOf } from './work-order-labels';
import { MyWorkStore } from './my-work-store';

/** The crew's own work, phone first: what is assigned to me, oldest first, one big card each. */
@Component({
  selector: 'ts-my-work-page',
  imports: [RouterLink, MatIconModule, MatButtonToggleModule, LoadState],
  templateUrl: './my-work-page.html',
  styleUrl: './my-work-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MyWorkPage {
  protected readonly store = inject(MyWorkStore);
  protected readonly spotOf = spotOf;
  protected readonly stateLabels = WORK_ORDER_STATE_LABELS;
  protected readonly priorityLabels = PRIORITY_LABELS;
}
