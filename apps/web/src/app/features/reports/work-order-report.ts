import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatTableModule } from '@angular/material/table';
import { type WorkOrderReport } from '@tierscope/contracts';
import { FINDING_CAUSE_LABELS, FINDING_CAUSES } from '@tierscope/domain';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import { FarmSelect } from '../../shared/ui/farm-select';
import { LoadState } from '../../shared/ui/load-state';
import { WorkOrderReportStore } from './reports-store';

/** Colour-blind-safe categorical colours (Okabe & Ito, "Color Universal Design", 2002), one per cause. */
const CAUSE_COLOURS = [
  '#E69F00',
  '#56B4E9',
  '#009E73',
  '#F0E442',
  '#0072B2',
  '#D55E00',
  '#CC79A7',
  '#7f7f7f',
];

/** How fast flagged spots get fixed, and what the causes were, per house. */
@Component({
  selector: 'ts-work-order-report',
  imports: [
    FarmSelect,
    DecimalPipe,
    NgxEchartsDirective,
    MatFormFieldModule,
    MatInputModule,
    MatTableModule,
    LoadState,
  ],
  templateUrl: './work-order-report.html',
  styleUrl: './reports-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WorkOrderReportView {
  protected readonly store = inject(WorkOrderReportStore);
  protected readonly columns = ['house', 'done', 'fromExceptions', 'median', 'max', 'topCause'];
  protected readonly chart = computed(() => {
    const report = this.store.report.value();
    return report ? causeChart(report) : null;
  });

  protected topCause(byCause: WorkOrderReport['houses'][number]['byCause']): string {
    const [cause, count] = Object.entries(byCause).sort((a, b) => b[1] - a[1])[0] ?? ['', 0];
    return count > 0
      ? `${FINDING_CAUSE_LABELS[cause as keyof typeof FINDING_CAUSE_LABELS]} (${count})`
      : '—';
  }
}

/** Findings by cause per house as stacked horizontal bars. */
export function causeChart(report: WorkOrderReport): EChartsCoreOption {
  const houses = report.houses.map((h) => h.houseName);
  return {
    color: CAUSE_COLOURS,
    textStyle: { fontFamily: 'IBM Plex Sans' },
    tooltip: { trigger: 'axis', axisPointer: { type: 'shadow' } },
    legend: { bottom: 0 },
    grid: { left: 8, right: 16, top: 8, bottom: 48, containLabel: true },
    xAxis: { type: 'value', minInterval: 1, name: 'work orders done' },
    yAxis: { type: 'category', data: houses },
    series: FINDING_CAUSES.map((cause) => ({
      name: FINDING_CAUSE_LABELS[cause],
      type: 'bar',
      stack: 'causes',
      label: {
        show: true,
        formatter: (p: { value: number }) => (p.value > 0 ? String(p.value) : ''),
      },
      data: report.houses.map((h) => h.byCause[cause]),
    })),
  };
}
