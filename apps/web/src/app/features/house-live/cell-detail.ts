import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, input, output, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { type ExceptionView } from '@tierscope/contracts';
import { durationWords, measuredWords } from '@tierscope/domain';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import { describeApiError } from '../../core/http/api-error';
import { LoadState, loadStatus } from '../../shared/ui/load-state';
import { houseTime } from '../../shared/ui/local-dates';
import { HouseLiveApi } from './house-live-api';

/** One section: today's cumulative curve against its peers' median, its last 14 days, and what to check. */
@Component({
  selector: 'ts-cell-detail',
  imports: [NgxEchartsDirective, MatButtonModule, MatIconModule, LoadState, DecimalPipe],
  templateUrl: './cell-detail.html',
  styleUrl: './cell-detail.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CellDetail {
  private readonly api = inject(HouseLiveApi);
  readonly houseId = input.required<number>();
  readonly row = input.required<number>();
  readonly tier = input.required<number>();
  readonly timezone = input.required<string>();
  readonly closed = output();

  protected readonly detail = this.api.cell(() => ({
    houseId: this.houseId(),
    row: this.row(),
    tier: this.tier(),
  }));
  protected readonly state = computed(() => loadStatus(this.detail));
  protected readonly errorText = computed(() => describeApiError(this.detail.error()));

  /** What it measured in plain words: how far below, how unusual for that spot (never a p-value). */
  protected measured(e: ExceptionView): string {
    return measuredWords(e);
  }

  /** When it opened, on the house's own clock with its zone. */
  protected since(iso: string): string {
    return houseTime(iso, this.timezone());
  }

  /** How long until now, in words ("5 h 10 min"). */
  protected lasting(iso: string): string {
    return durationWords(iso, new Date());
  }

  private readonly hourLabel = (iso: string) =>
    new Intl.DateTimeFormat('en-GB', {
      hour: '2-digit',
      minute: '2-digit',
      timeZone: this.timezone(),
    }).format(new Date(iso));

  protected readonly todayChart = computed((): EChartsCoreOption | null => {
    const d = this.detail.value();
    if (!d || d.today.length === 0) return null;
    return {
      animation: false,
      textStyle: { fontFamily: 'IBM Plex Sans' },
      grid: { left: 48, right: 12, top: 28, bottom: 28 },
      legend: { top: 0, data: ['This section', 'Median of its tier'] },
      tooltip: { trigger: 'axis' },
      xAxis: { type: 'category', data: d.today.map((p) => this.hourLabel(p.hour)) },
      yAxis: { type: 'value', name: 'eggs so far' },
      series: [
        {
          name: 'This section',
          type: 'line',
          data: d.today.map((p) => p.eggs),
          lineStyle: { width: 3, color: '#1f4e55' },
          itemStyle: { color: '#1f4e55' },
        },
        {
          name: 'Median of its tier',
          type: 'line',
          data: d.today.map((p) => p.peers),
          lineStyle: { type: 'dashed', color: '#a07a1f' },
          itemStyle: { color: '#a07a1f' },
        },
      ],
    };
  });

  protected readonly daysChart = computed((): EChartsCoreOption | null => {
    const d = this.detail.value();
    if (!d) return null;
    return {
      animation: false,
      textStyle: { fontFamily: 'IBM Plex Sans' },
      grid: { left: 48, right: 12, top: 28, bottom: 28 },
      legend: { top: 0, data: ['Eggs', 'Expected'] },
      tooltip: { trigger: 'axis' },
      xAxis: { type: 'category', data: d.days.map((x) => x.day.slice(5)) },
      yAxis: { type: 'value' },
      series: [
        {
          name: 'Eggs',
          type: 'bar',
          data: d.days.map((x) => x.eggs),
          itemStyle: { color: '#5b8a8f' },
        },
        {
          name: 'Expected',
          type: 'line',
          data: d.days.map((x) => (x.expected === null ? null : Math.round(x.expected))),
          lineStyle: { color: '#a07a1f', width: 2 },
          itemStyle: { color: '#a07a1f' },
        },
      ],
    };
  });
}
