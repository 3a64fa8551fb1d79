import { DecimalPipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  computed,
  inject,
  linkedSignal,
  signal,
} from '@angular/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatTableModule } from '@angular/material/table';
import { type FarmSummary, endpoints } from '@tierscope/contracts';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError } from '../../core/http/api-error';
import { FarmSelect } from '../../shared/ui/farm-select';
import { LoadState, loadStatus } from '../../shared/ui/load-state';
import { localDay } from '../../shared/ui/local-dates';
import { ApiClient } from '../../core/http/api-client';

/** Okabe & Ito's colour-blind-safe palette ("Color Universal Design", 2002), one colour per house. */
const HOUSE_COLOURS = [
  '#0072B2',
  '#E69F00',
  '#009E73',
  '#CC79A7',
  '#56B4E9',
  '#D55E00',
  '#F0E442',
  '#000000',
];

/** Every house of a farm over a date range: eggs, hen-day, exceptions and what they cost. */
@Component({
  selector: 'ts-farm-summary',
  imports: [
    FarmSelect,
    DecimalPipe,
    NgxEchartsDirective,
    MatFormFieldModule,
    MatInputModule,
    MatTableModule,
    LoadState,
  ],
  templateUrl: './farm-summary.html',
  styleUrl: './reports-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmSummaryView {
  private readonly auth = inject(AuthStore);
  private readonly api = inject(ApiClient);
  protected readonly farms = this.auth.memberships;
  protected readonly farmId = linkedSignal(() => this.farms()[0]?.farmId ?? null);
  protected readonly from = signal(localDay(14));
  protected readonly to = signal(localDay(1));
  protected readonly summary = this.api.resource(endpoints.reports.farm, () => {
    const farm = this.farmId();
    return farm === null
      ? undefined
      : { query: { farmId: farm, from: this.from(), to: this.to() } };
  });
  protected readonly state = computed(() =>
    loadStatus(this.summary, (summary) => summary.houses.length === 0),
  );
  protected readonly errorText = computed(() => describeApiError(this.summary.error()));
  protected readonly columns = [
    'house',
    'eggs',
    'henDay',
    'collector',
    'exceptions',
    'lost',
    'value',
  ];
  protected readonly chart = computed(() => {
    const s = this.summary.value();
    return s ? eggsChart(s) : null;
  });
}

/** Eggs per production day, one line per house. */
export function eggsChart(s: FarmSummary): EChartsCoreOption {
  const days = s.houses[0]?.days.map((d) => d.day) ?? [];
  return {
    color: HOUSE_COLOURS,
    textStyle: { fontFamily: 'IBM Plex Sans' },
    tooltip: { trigger: 'axis' },
    legend: { bottom: 0 },
    grid: { left: 8, right: 16, top: 16, bottom: 40, containLabel: true },
    xAxis: { type: 'category', data: days },
    yAxis: { type: 'value', name: 'eggs' },
    series: s.houses.map((h) => ({
      name: h.houseName,
      type: 'line',
      symbolSize: 4,
      data: h.days.map((d) => d.eggs),
    })),
  };
}
