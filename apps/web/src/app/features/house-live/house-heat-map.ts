import {
  afterNextRender,
  ChangeDetectionStrategy,
  Component,
  computed,
  DestroyRef,
  ElementRef,
  inject,
  input,
  output,
  signal,
} from '@angular/core';
import type { HouseMap, MapCell } from '@tierscope/contracts';
import { houseTime } from '../../shared/ui/local-dates';
import type { EChartsCoreOption } from 'echarts/core';
import { NgxEchartsDirective } from 'ngx-echarts';
import {
  NO_DATA_COLOR,
  RATIO_MAX,
  RATIO_MIN,
  RATIO_SCALE,
  textOn,
} from '../../shared/ui/ratio-colors';

const percent = (cell: MapCell) => (cell.ratio === null ? null : Math.round(cell.ratio * 100));

/**
 * Rows × tiers as they stand in the house: tier 1 (floor-most) at the bottom. Each cell carries its eggs
 * and % of expected; an exception adds a thick outline and a ▲ mark, so nothing depends on colour alone.
 * A plain table mirrors the map for screen readers.
 */
@Component({
  selector: 'ts-house-heat-map',
  imports: [NgxEchartsDirective],
  template: `
    <div
      echarts
      [options]="options()"
      class="chart"
      [style.height.px]="height()"
      (chartClick)="onClick($event)"
      role="img"
      [attr.aria-label]="'Map of ' + map().houseName + ': rows across, tiers up'"
    ></div>
    <table class="ts-visually-hidden" data-testid="map-table">
      <caption>
        {{
          map().houseName
        }}: eggs and % of expected per row and tier
      </caption>
      <tr>
        <th>Row</th>
        <th>Tier</th>
        <th>Eggs</th>
        <th>% of expected</th>
        <th>Exception</th>
      </tr>
      @for (cell of map().cells; track cell.row + '-' + cell.tier) {
        <tr
          [attr.data-row]="cell.row"
          [attr.data-tier]="cell.tier"
          [attr.data-exception]="cell.exceptionKind ?? ''"
        >
          <td>{{ cell.row }}</td>
          <td>{{ cell.tier }}</td>
          <td>{{ cell.eggs ?? 'no data' }}</td>
          <td>{{ cell.ratio === null ? '—' : (cell.ratio * 100).toFixed(0) + ' %' }}</td>
          <td>
            {{
              cell.exceptionKind
                ? cell.exceptionKind === 'silent_counter'
                  ? 'silent counter'
                  : 'shortfall'
                : ''
            }}
          </td>
        </tr>
      }
    </table>
  `,
  styles: `
    :host {
      display: block;
    }
    .chart {
      width: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HouseHeatMap {
  readonly map = input.required<HouseMap>();
  readonly selected = input<{ row: number; tier: number } | null>(null);
  readonly cellClick = output<{ row: number; tier: number }>();

  protected readonly height = computed(() => 90 + this.map().tiers * 78);
  /** The map's own width: narrow cells (a phone) get short labels that fit inside them. */
  private readonly width = signal(800);
  private readonly isCompact = computed(
    () => (this.width() - 80) / Math.max(1, this.map().rows) < 76,
  );

  constructor() {
    const host = inject<ElementRef<HTMLElement>>(ElementRef);
    const destroyRef = inject(DestroyRef);
    afterNextRender(() => {
      const observer = new ResizeObserver(([entry]) => {
        if (entry) this.width.set(entry.contentRect.width);
      });
      observer.observe(host.nativeElement);
      destroyRef.onDestroy(() => {
        observer.disconnect();
      });
    });
  }

  protected readonly options = computed((): EChartsCoreOption => {
    const map = this.map();
    const selected = this.selected();
    const compact = this.isCompact();
    // Narrow: "R3" and "T2" so every row keeps its label, and the % alone in a cell (the count is in the
    // tooltip, the cell detail and the table).
    const rows = Array.from({ length: map.rows }, (_, i) =>
      compact ? `R${i + 1}` : `Row ${i + 1}`,
    );
    const tiers = Array.from({ length: map.tiers }, (_, i) =>
      compact ? `T${i + 1}` : `Tier ${i + 1}`,
    );
    const data = map.cells.map((cell) => {
      const p = percent(cell);
      const isSelected = selected?.row === cell.row && selected.tier === cell.tier;
      const hasException = cell.exceptionKind !== null;
      return {
        // −1 puts a cell without data outside the scale: it is drawn grey.
        value: [
          cell.row - 1,
          cell.tier - 1,
          p === null ? -1 : Math.min(RATIO_MAX, Math.max(RATIO_MIN + 0.01, p)),
        ],
        cell,
        itemStyle: {
          borderColor: hasException ? '#c2185b' : isSelected ? '#1f4e55' : '#ffffff',
          borderWidth: hasException ? 5 : isSelected ? 4 : 2,
          borderType: cell.isLearning ? 'dashed' : 'solid',
        },
        label: {
          color: textOn(p),
          fontWeight: hasException ? 600 : 400,
          formatter: compact
            ? `${hasException ? '▲\n' : ''}${p === null ? '—' : `${p} %`}${cell.isDataLate ? '\nlate' : ''}`
            : `${hasException ? '▲ ' : ''}${cell.eggs === null ? 'no data' : cell.eggs.toLocaleString()}\n${p === null ? '—' : `${p} %`}${cell.isDataLate ? '\ndata late' : ''}`,
        },
      };
    });
    return {
      animation: false,
      textStyle: { fontFamily: 'IBM Plex Sans' },
      grid: { left: compact ? 32 : 64, right: compact ? 8 : 16, top: 8, bottom: 64 },
      tooltip: {
        formatter: (params: { data: { cell: MapCell } }) => {
          const c = params.data.cell;
          const expected = c.expected === null ? '—' : Math.round(c.expected).toLocaleString();
          const late =
            c.isDataLate && c.dataUntil
              ? `<br>Data late: counted up to ${houseTime(c.dataUntil, map.timezone)}`
              : '';
          const from =
            c.yardstick === 'tier' ? ` (from tier ${c.tier}'s usual share of the house)` : '';
          return `Row ${c.row}, tier ${c.tier}<br>Eggs ${c.eggs ?? '—'} · expected ${expected}${from}<br>${c.exceptionKind ? (c.exceptionKind === 'silent_counter' ? 'Silent counter' : 'Shortfall') + (c.isLearning ? ' (learning)' : '') : 'No exception'}${late}`;
        },
      },
      xAxis: {
        type: 'category',
        data: rows,
        splitArea: { show: false },
        axisTick: { show: false },
        axisLabel: { interval: 0 },
      },
      yAxis: { type: 'category', data: tiers, axisTick: { show: false } },
      visualMap: {
        type: 'continuous',
        min: RATIO_MIN,
        max: RATIO_MAX,
        range: [RATIO_MIN, RATIO_MAX],
        dimension: 2,
        orient: 'horizontal',
        left: 'center',
        bottom: 4,
        itemHeight: compact ? Math.max(120, this.width() - 150) : 220,
        text: [compact ? '110 %' : '110 % of expected', '70 %'],
        calculable: false,
        inRange: { color: RATIO_SCALE },
        outOfRange: { color: NO_DATA_COLOR },
      },
      series: [
        {
          type: 'heatmap',
          data,
          label: { show: true, fontSize: compact ? 12 : 13, lineHeight: compact ? 16 : 18 },
        },
      ],
    };
  });

  protected onClick(event: unknown): void {
    const cell = (event as { data?: { cell?: MapCell } }).data?.cell;
    if (cell) this.cellClick.emit({ row: cell.row, tier: cell.tier });
  }
}
