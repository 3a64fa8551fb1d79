import { DecimalPipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  input,
  numberAttribute,
  signal,
  untracked,
} from '@angular/core';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import {
  flockCreateSchema,
  mortalityEntrySchema,
  type FlockProduction,
} from '@tierscope/contracts';
import { calendarDayOf } from '@tierscope/domain';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import { describeApiError, fieldErrorsOf } from '../../core/http/api-error';
import { LoadState } from '../../shared/ui/load-state';
import { localDay } from '../../shared/ui/local-dates';
import { firstError, zodValidator } from '../../shared/ui/zod-validator';
import { flockHeadline } from './flock-headline';
import { FlockStore } from './flock-store';

/** A house's flock: placement, the morning walk, hen-day production by week of age against its fitted curve. */
@Component({
  selector: 'ts-flock-page',
  imports: [
    DecimalPipe,
    RouterLink,
    ReactiveFormsModule,
    NgxEchartsDirective,
    MatButtonModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatSelectModule,
    MatTableModule,
    LoadState,
  ],
  templateUrl: './flock-page.html',
  styleUrl: './flock-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FlockPage {
  readonly houseId = input.required({ transform: numberAttribute });

  protected readonly store = inject(FlockStore);
  private readonly snackBar = inject(MatSnackBar);
  private readonly fb = inject(NonNullableFormBuilder);

  /** Yesterday and the last 7 days before the whole-flock figures, and the walks not recorded. */
  protected readonly headline = computed(() => {
    const p = this.store.production.value();
    return p ? flockHeadline(p.days) : null;
  });
  protected readonly recentDays = computed(() =>
    [...(this.store.production.value()?.days ?? [])].reverse().slice(0, 14),
  );
  protected readonly layChart = computed(() => {
    const p = this.store.production.value();
    return p ? layChart(p) : null;
  });
  protected readonly mortalityChart = computed(() => {
    const p = this.store.production.value();
    return p ? mortalityChart(p) : null;
  });
  protected readonly dayColumns = ['day', 'age', 'eggs', 'hens', 'hdp', 'dead', 'culled'];
  protected readonly firstError = firstError;

  protected readonly placement = this.fb.group({
    placedOn: [localDay(), zodValidator(flockCreateSchema.shape.placedOn)],
    hensHoused: [0, zodValidator(flockCreateSchema.shape.hensHoused)],
    ageAtPlacementWeeks: [17, zodValidator(flockCreateSchema.shape.ageAtPlacementWeeks)],
    breed: [''],
  });
  protected readonly walk = this.fb.group({
    day: [localDay()],
    dead: [0, zodValidator(mortalityEntrySchema.shape.dead)],
    culled: [0, zodValidator(mortalityEntrySchema.shape.culled)],
  });
  protected readonly endOn = signal(localDay());

  constructor() {
    this.store.followHouse(() => this.houseId());
    // Days are the house's own: once its zone is known, today is today on its clock, not on this device's.
    effect(() => {
      const zone = this.store.house.value()?.timezone;
      if (!zone) return;
      const today = calendarDayOf(new Date(), zone);
      untracked(() => {
        if (!this.walk.controls.day.dirty) this.walk.controls.day.setValue(today);
        if (!this.placement.controls.placedOn.dirty)
          this.placement.controls.placedOn.setValue(today);
        this.endOn.set(today);
      });
    });
  }

  /** Saves one record and says so; a refusal is shown with the fields it names. */
  private async act(work: () => Promise<void>, done: string): Promise<boolean> {
    try {
      await work();
      this.snackBar.open(done, undefined, { duration: 2500 });
      return true;
    } catch (error) {
      const fields = Object.entries(fieldErrorsOf(error)).map(([p, m]) => `${p}: ${m}`);
      this.snackBar.open([describeApiError(error), ...fields].join(' — '), 'Dismiss');
      return false;
    }
  }

  protected async place(): Promise<void> {
    if (this.placement.invalid) {
      this.placement.markAllAsTouched();
      return;
    }
    await this.act(() => this.store.place(this.placement.getRawValue()), 'Flock placed');
  }

  protected async recordWalk(): Promise<void> {
    if (this.store.flockId() === null || this.walk.invalid) {
      this.walk.markAllAsTouched();
      return;
    }
    const { day, dead, culled } = this.walk.getRawValue();
    const isSaved = await this.act(
      () => this.store.recordLoss(day, { dead, culled }),
      `Saved for ${day}: ${dead} dead, ${culled} culled`,
    );
    if (isSaved) this.walk.patchValue({ dead: 0, culled: 0 });
  }

  protected async endFlock(): Promise<void> {
    if (this.store.flockId() === null) return;
    await this.act(() => this.store.endFlock(this.endOn()), 'Flock ended');
  }
}

const TEAL = '#22565a';
const STRAW = '#c8a24a';

/** Hen-day % by week of age, with the fitted curve when there is one. */
export function layChart(p: FlockProduction): EChartsCoreOption {
  const weeks = p.weeks.filter((w) => w.days > 0);
  return {
    textStyle: { fontFamily: 'IBM Plex Sans' },
    tooltip: { trigger: 'axis' },
    legend: { bottom: 0 },
    grid: { left: 8, right: 16, top: 16, bottom: 40, containLabel: true },
    xAxis: { type: 'category', name: 'week of age', data: weeks.map((w) => w.ageWeeks) },
    yAxis: { type: 'value', name: 'hen-day %', min: 0, max: 100 },
    series: [
      {
        name: 'Hen-day %',
        type: 'bar',
        itemStyle: { color: TEAL },
        data: weeks.map((w) => w.henDayPct),
      },
      ...(p.fit
        ? [
            {
              name: `Fitted curve (R² ${p.fit.r2?.toFixed(2) ?? '—'})`,
              type: 'line',
              smooth: true,
              symbol: 'none',
              lineStyle: { color: STRAW, width: 3, type: p.fit.isGoodEnough ? 'solid' : 'dashed' },
              itemStyle: { color: STRAW },
              data: weeks.map((w) => w.fittedPct),
            },
          ]
        : []),
    ],
  };
}

/** Losses (dead and culled) as % of the week's starting hens, by week of age. */
export function mortalityChart(p: FlockProduction): EChartsCoreOption {
  return {
    textStyle: { fontFamily: 'IBM Plex Sans' },
    tooltip: { trigger: 'axis' },
    grid: { left: 8, right: 16, top: 16, bottom: 24, containLabel: true },
    xAxis: { type: 'category', name: 'week of age', data: p.weeks.map((w) => w.ageWeeks) },
    yAxis: { type: 'value', name: 'losses %' },
    series: [
      {
        name: 'Dead and culled, % of hens',
        type: 'bar',
        itemStyle: { color: '#8a4b00' },
        data: p.weeks.map((w) => w.mortalityPct),
      },
    ],
  };
}
