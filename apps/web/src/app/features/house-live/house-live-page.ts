import {
  ChangeDetectionStrategy,
  Component,
  computed,
  inject,
  input,
  numberAttribute,
  signal,
} from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { RouterLink } from '@angular/router';
import { type ExceptionView, endpoints } from '@tierscope/contracts';
import { measuredWords, type WindowKind } from '@tierscope/domain';
import { describeApiError } from '../../core/http/api-error';
import { LiveSocket } from '../../core/live/live-socket';
import { LoadState, type LoadStatus } from '../../shared/ui/load-state';
import { houseTime } from '../../shared/ui/local-dates';
import { CellDetail } from './cell-detail';
import { HouseHeatMap } from './house-heat-map';
import { LineJudgements } from './line-judgements';
import { ApiClient } from '../../core/http/api-client';

/** A house live: the rows × tiers map over the live socket, a window picker, and a cell's detail. */
@Component({
  selector: 'ts-house-live-page',
  imports: [
    FormsModule,
    RouterLink,
    MatButtonToggleModule,
    MatButtonModule,
    MatIconModule,
    MatFormFieldModule,
    MatInputModule,
    LoadState,
    HouseHeatMap,
    LineJudgements,
    CellDetail,
  ],
  templateUrl: './house-live-page.html',
  styleUrl: './house-live-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HouseLivePage {
  private readonly api = inject(ApiClient);
  private readonly live = inject(LiveSocket);

  /** Route parameter. */
  readonly houseId = input.required({ transform: numberAttribute });

  protected readonly windowKind = signal<WindowKind>('today');
  protected readonly from = signal('');
  protected readonly to = signal('');
  protected readonly selected = signal<{ row: number; tier: number } | null>(null);
  protected readonly connection = this.live.state;
  protected readonly lastMessageAt = this.live.lastMessageAt;

  // Follow the house live while the page is open; the socket resubscribes by itself after a reconnect.
  private readonly following = this.live.followHouse(
    () => this.houseId(),
    (message) => {
      // The message carries the exception as it now is: the list follows it without a new read.
      if (message.type === 'exception') {
        const changed = message.exception;
        this.exceptions.update((list) => withLiveException(list ?? [], changed));
      }
    },
  );
  private readonly liveMap = this.following.map;
  /** What the live socket said is wrong with watching this house (not found, or not yours). */
  private readonly liveError = this.following.error;
  // Today's map arrives over the socket (a snapshot, then frames): it is read over HTTP only when the socket
  // has not delivered one and is reconnecting. Past windows are read over HTTP.
  protected readonly fetched = this.api.resource(endpoints.exceptions.houseMap, () => {
    const kind = this.windowKind();
    const params = { houseId: this.houseId() };
    if (kind === 'today') {
      return this.liveMap() === null && this.connection() === 'reconnecting'
        ? { params, query: { window: kind } }
        : undefined;
    }
    if (kind !== 'custom') return { params, query: { window: kind } };
    return this.from() && this.to() && this.from() <= this.to()
      ? { params, query: { window: kind, from: this.from(), to: this.to() } }
      : undefined;
  });
  protected readonly exceptions = this.api.resource(endpoints.exceptions.list, () => ({
    query: { houseId: this.houseId(), status: 'live' as const },
  }));

  // A resource in error throws from value(): read it only when it has one, so a 404 shows its error state.
  private readonly fetchedMap = computed(() =>
    this.fetched.hasValue() ? this.fetched.value() : null,
  );
  protected readonly map = computed(() =>
    this.windowKind() === 'today' ? (this.liveMap() ?? this.fetchedMap()) : this.fetchedMap(),
  );
  protected readonly state = computed((): LoadStatus => {
    if (this.map()) return 'ready';
    if (this.fetched.error() || (this.windowKind() === 'today' && this.liveError())) return 'error';
    if (this.windowKind() === 'custom' && !(this.from() && this.to())) return 'empty';
    return 'loading';
  });
  protected readonly errorText = computed(
    () =>
      (this.windowKind() === 'today' ? this.liveError() : null) ??
      describeApiError(this.fetched.error()),
  );
  protected readonly connectionLabel = computed(
    () =>
      ({
        live: 'Live',
        connecting: 'Connecting…',
        reconnecting: 'Reconnecting…',
        offline: 'Offline',
      })[this.connection()],
  );
  /** The last frame's time by the house's own clock, with its zone shown. */
  protected readonly updatedText = computed(() => {
    const at = this.lastMessageAt();
    const zone = this.map()?.timezone;
    if (!at || !zone) return null;
    const time = new Intl.DateTimeFormat('en-GB', {
      hour: '2-digit',
      minute: '2-digit',
      second: '2-digit',
      timeZone: zone,
    }).format(at);
    return `${time} ${zone}`;
  });
  protected readonly houseExceptions = computed(() =>
    (this.exceptions.hasValue() ? this.exceptions.value() : []).filter(
      (e) => e.scope === 'house' || e.scope === 'row' || e.scope === 'tier',
    ),
  );

  protected setWindow(kind: WindowKind): void {
    this.windowKind.set(kind);
  }

  /** What it measured in plain words: how far below, how unusual for that spot (never a p-value). */
  protected measured(e: ExceptionView): string {
    return measuredWords(e);
  }

  /** When it opened, on the house's own clock with its zone. */
  protected since(iso: string): string {
    const zone = this.map()?.timezone;
    return zone ? houseTime(iso, zone) : new Date(iso).toISOString().slice(0, 16).replace('T', ' ');
  }

  protected describeScope(e: {
    kind: string;
    scope: string;
    row: number | null;
    tier: number | null;
  }): string {
    if (e.kind === 'collector_gap') return 'Collector and belts disagree';
    if (e.kind === 'house_dip') return 'House hen-day production dipped';
    return e.scope === 'row'
      ? `Row ${e.row} short (all tiers)`
      : `Tier ${e.tier} short (across rows)`;
  }
}

/** The house's live exceptions (open or acknowledged) after one changed: replaced, added first, or gone when closed. */
export function withLiveException(
  list: readonly ExceptionView[],
  changed: ExceptionView,
): ExceptionView[] {
  const others = list.filter((e) => e.id !== changed.id);
  if (changed.status === 'closed') return others;
  return list.some((e) => e.id === changed.id)
    ? list.map((e) => (e.id === changed.id ? changed : e))
    : [changed, ...others];
}
