import {
  ChangeDetectionStrategy,
  Component,
  computed,
  input,
  numberAttribute,
} from '@angular/core';
import { MatTabsModule } from '@angular/material/tabs';
import { DailyReportView } from './daily-report';
import { FarmSummaryView } from './farm-summary';
import { WorkOrderReportView } from './work-order-report';

/** The manager's reports: a house's day, the farm over a range, and how work orders went. */
@Component({
  selector: 'ts-reports-page',
  imports: [MatTabsModule, DailyReportView, FarmSummaryView, WorkOrderReportView],
  template: `
    <div class="ts-page">
      <h1 class="ts-page-title no-print">Reports</h1>
      <mat-tab-group [selectedIndex]="0" animationDuration="0ms" mat-stretch-tabs="false">
        <mat-tab label="Daily house report">
          <ts-daily-report [initialHouseId]="house()" />
        </mat-tab>
        <mat-tab label="Farm summary">
          <ng-template matTabContent><ts-farm-summary /></ng-template>
        </mat-tab>
        <mat-tab label="Work orders">
          <ng-template matTabContent><ts-work-order-report /></ng-template>
        </mat-tab>
      </mat-tab-group>
    </div>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReportsPage {
  /** ?houseId= from a house page: the daily report opens on it */
  readonly houseId = input<number | undefined, unknown>(undefined, { transform: numberAttribute });
  protected readonly house = computed(() => {
    const id = this.houseId();
    return id !== undefined && Number.isInteger(id) ? id : null;
  });
}
