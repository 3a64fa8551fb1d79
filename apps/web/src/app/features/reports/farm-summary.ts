import { CurrencyPipe, DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatTableModule } from '@angular/material/table';
import { type FarmSummary } from '@tierscope/contracts';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import { FarmSelect } from '../../shared/ui/farm-select';
import { LoadState } from '../../shared/ui/load-state';
import { FarmSummaryStore } from './reports-store';

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
    CurrencyPipe,
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
  protected readonly store = inject(FarmSummaryStore);
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
    const s = this.store.summary.value();
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
