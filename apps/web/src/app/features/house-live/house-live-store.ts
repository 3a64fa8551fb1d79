import { computed, inject, Injectable, signal } from '@angular/core';
import type { ExceptionView } from '@tierscope/contracts';
import type { WindowKind } from '@tierscope/domain';
import { describeApiError } from '../../core/http/api-error';
import { LiveSocket } from '../../core/live/live-socket';
import type { LoadStatus } from '../../shared/ui/load-state';
import { ExceptionsApi } from '../exceptions/exceptions-api';
import { HouseLiveApi } from './house-live-api';

/**
 * A house page's state: today's map from the live socket (HTTP only while it reconnects with none), past
 * windows over HTTP, the section picked, and the house's live exceptions kept current from socket messages.
 */
@Injectable()
export class HouseLiveStore {
  private readonly api = inject(HouseLiveApi);
  private readonly live = inject(LiveSocket);
  private readonly houseParam = signal<() => number | null>(() => null);

  readonly houseId = computed(() => this.houseParam()());
  readonly windowKind = signal<WindowKind>('today');
  readonly from = signal('');
  readonly to = signal('');
  readonly selected = signal<{ row: number; tier: number } | null>(null);
  readonly connection = this.live.state;
  readonly lastMessageAt = this.live.lastMessageAt;

  // Follow the house live while the page is open; the socket resubscribes by itself after a reconnect.
  private readonly following = this.live.followHouse(this.houseId, (message) => {
    // The message carries the exception as it now is: the list follows it without a new read.
    if (message.type === 'exception') {
      const changed = message.exception;
      this.exceptions.update((list) => withLiveException(list ?? [], changed));
    }
  });
  private readonly liveMap = this.following.map;
  /** What the live socket said is wrong with watching this house (not found, or not yours). */
  private readonly liveError = this.following.error;
  // Today's map arrives over the socket (a snapshot, then frames): it is read over HTTP only when the socket
  // has not delivered one and is reconnecting. Past windows are read over HTTP.
  readonly fetched = this.api.houseMap(() => {
    const houseId = this.houseId();
    const window = this.windowKind();
    if (houseId === null) return undefined;
    if (window === 'today') {
      return this.liveMap() === null && this.connection() === 'reconnecting'
        ? { houseId, window }
        : undefined;
    }
    if (window !== 'custom') return { houseId, window };
    return this.from() && this.to() && this.from() <= this.to()
      ? { houseId, window, from: this.from(), to: this.to() }
      : undefined;
  });
  readonly exceptions = inject(ExceptionsApi).list(() => ({
    houseId: this.houseId() ?? undefined,
    status: 'live' as const,
  }));

  // A resource in error throws from value(): read it only when it has one, so a 404 shows its error state.
  private readonly fetchedMap = computed(() =>
    this.fetched.hasValue() ? this.fetched.value() : null,
  );
  readonly map = computed(() =>
    this.windowKind() === 'today' ? (this.liveMap() ?? this.fetchedMap()) : this.fetchedMap(),
  );
  readonly loadStatus = computed((): LoadStatus => {
    if (this.map()) return 'ready';
    if (this.fetched.error() || (this.windowKind() === 'today' && this.liveError())) return 'error';
    if (this.windowKind() === 'custom' && !(this.from() && this.to())) return 'empty';
    return 'loading';
  });
  readonly errorText = computed(
    () =>
      (this.windowKind() === 'today' ? this.liveError() : null) ??
      describeApiError(this.fetched.error()),
  );
  /** Row, tier and house-wide exceptions: the ones no single cell shows. */
  readonly houseExceptions = computed(() =>
    (this.exceptions.hasValue() ? this.exceptions.value() : []).filter(
      (e) => e.scope === 'house' || e.scope === 'row' || e.scope === 'tier',
    ),
  );

  /** Shows the house the route names. */
  followHouse(houseId: () => number | null): void {
    this.houseParam.set(houseId);
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
