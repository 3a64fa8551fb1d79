import { effect, inject, Injectable, signal, untracked, type Signal } from '@angular/core';
import {
  LIVE_CLOSE,
  liveServerMessageSchema,
  type HouseMap,
  type LiveClientMessage,
  type LiveServerMessage,
} from '@tierscope/contracts';
import {
  defer,
  EMPTY,
  filter,
  finalize,
  map,
  Observable,
  repeat,
  retry,
  share,
  Subject,
  timer,
} from 'rxjs';
import { webSocket, type WebSocketSubject } from 'rxjs/webSocket';
import { AuthStore } from '../auth/auth-store';

export type ConnectionState = 'connecting' | 'live' | 'reconnecting' | 'offline';

/**
 * The one live connection of the app: signs in with the user's token as its first message, reconnects
 * with backoff and resubscribes every house being watched. Components get a house's messages as a stream.
 */
@Injectable({ providedIn: 'root' })
export class LiveSocket {
  private readonly auth = inject(AuthStore);
  private readonly watched = new Map<number, number>();
  private socket: WebSocketSubject<unknown> | null = null;
  private readonly opened = new Subject<void>();

  readonly state = signal<ConnectionState>('offline');
  readonly lastMessageAt = signal<Date | null>(null);

  private lastCloseCode: number | null = null;

  private readonly messages: Observable<LiveServerMessage> = defer(() => {
    this.state.set(untracked(this.state) === 'offline' ? 'connecting' : 'reconnecting');
    const protocol = location.protocol === 'https:' ? 'wss' : 'ws';
    this.socket = webSocket<unknown>({
      url: `${protocol}://${location.host}/api/v1/live`,
      openObserver: {
        next: () => {
          this.state.set('live');
          const token = this.auth.token();
          if (token) this.send({ type: 'auth', token });
          for (const houseId of this.watched.keys()) this.send({ type: 'subscribe', houseId });
          this.opened.next();
        },
      },
      closeObserver: {
        next: (event: CloseEvent) => {
          this.lastCloseCode = event.code;
          this.state.set('reconnecting');
        },
      },
    });
    return this.socket;
  }).pipe(
    // Reconnect with backoff: 1 s, 2 s, 4 s … at most 30 s between tries, for as long as someone watches.
    retry({
      delay: (_error, attempt) => timer(Math.min(30_000, 1000 * 2 ** Math.min(attempt - 1, 5))),
    }),
    // A clean close is the server going away (a restart: 1012) or access changed (4403): connect again
    // after a second (another API process answers); 'sign in again' (4401) does not.
    repeat({ delay: () => (this.lastCloseCode === LIVE_CLOSE.signIn ? EMPTY : timer(1000)) }),
    map((raw) => liveServerMessageSchema.safeParse(raw)),
    filter((parsed) => parsed.success),
    map((parsed) => {
      this.lastMessageAt.set(new Date());
      return parsed.data;
    }),
    finalize(() => {
      this.state.set('offline');
      this.socket = null;
    }),
    share(),
  );

  private send(message: LiveClientMessage): void {
    this.socket?.next(message);
  }

  /**
   * The one seam between the socket and the screens: follows the house `houseId()` names (none while it is
   * null) for as long as the calling component lives, and gives its map and any error the server sent as
   * signals. Every message of the house also goes to `onMessage`, in order (exceptions, imports). Call it in
   * an injection context (a field initializer or constructor).
   */
  followHouse(
    houseId: () => number | null,
    onMessage?: (message: LiveServerMessage) => void,
  ): { map: Signal<HouseMap | null>; error: Signal<string | null> } {
    const map = signal<HouseMap | null>(null);
    const error = signal<string | null>(null);
    effect((onCleanup) => {
      const id = houseId();
      // Only the house id is a dependency: the socket's own signals must not restart the subscription.
      untracked(() => {
        map.set(null);
        error.set(null);
        if (id === null) return;
        const subscription = this.watchHouse(id).subscribe((message) => {
          if (message.type === 'snapshot' || message.type === 'frame') map.set(message.map);
          if (message.type === 'error') error.set(message.message);
          onMessage?.(message);
        });
        onCleanup(() => {
          subscription.unsubscribe();
        });
      });
    });
    return { map: map.asReadonly(), error: error.asReadonly() };
  }

  /** Snapshot, frames and exception events of one house, for as long as the subscription lasts. */
  watchHouse(houseId: number): Observable<LiveServerMessage> {
    return new Observable<LiveServerMessage>((subscriber) => {
      this.watched.set(houseId, (this.watched.get(houseId) ?? 0) + 1);
      const subscription = this.messages
        .pipe(filter((m) => 'houseId' in m && m.houseId === houseId))
        .subscribe(subscriber);
      // Already connected: subscribe now; otherwise the open handler does it.
      if (untracked(this.state) === 'live') this.send({ type: 'subscribe', houseId });
      return () => {
        subscription.unsubscribe();
        const count = (this.watched.get(houseId) ?? 1) - 1;
        if (count <= 0) {
          this.watched.delete(houseId);
          this.send({ type: 'unsubscribe', houseId });
        } else this.watched.set(houseId, count);
      };
    });
  }
}
