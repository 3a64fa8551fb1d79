import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressSpinnerModule } from '@angular/material/progress-spinner';

/** The loading, error and empty states every list shares, so each says what is happening the same way. */
@Component({
  selector: 'ts-load-state',
  imports: [MatProgressSpinnerModule, MatIconModule, MatButtonModule],
  template: `
    @switch (state()) {
      @case ('loading') {
        <div class="ts-state" role="status">
          <mat-spinner diameter="24" />
          <span>{{ loadingText() }}</span>
        </div>
      }
      @case ('error') {
        <div class="ts-state error" role="alert">
          <mat-icon>cloud_off</mat-icon>
          <span>{{ errorText() }}</span>
          <button mat-button type="button" (click)="retry.emit()">Try again</button>
        </div>
      }
      @case ('empty') {
        <div class="ts-state" role="status">
          <mat-icon>inbox</mat-icon>
          <span>{{ emptyText() }}</span>
        </div>
      }
    }
  `,
  styles: `
    .error {
      background: var(--mat-sys-error-container);
      color: var(--mat-sys-on-error-container);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LoadState {
  readonly state = input.required<LoadStatus>();
  readonly loadingText = input('Loading…');
  readonly errorText = input('This could not be loaded.');
  readonly emptyText = input('Nothing here yet.');
  readonly retry = output();
}

/** What a page shows for what it reads: loading, error, empty or ready — the one list of these states. */
export type LoadStatus = 'loading' | 'error' | 'empty' | 'ready';

/** What a page shows for one resource: its error, loading until it has a value, then empty or ready. */
export function loadStatus<T>(
  resource: { error(): unknown; hasValue(): boolean; value(): T | undefined },
  isEmpty: (value: T) => boolean = () => false,
): LoadStatus {
  if (resource.error()) return 'error';
  const value = resource.hasValue() ? resource.value() : undefined;
  if (value === undefined) return 'loading';
  return isEmpty(value) ? 'empty' : 'ready';
}

/** What a list page shows for a resource: like `loadStatus`, and empty while nothing is asked for. */
export function listState(resource: {
  error(): unknown;
  isLoading(): boolean;
  hasValue(): boolean;
  value(): readonly unknown[] | undefined;
}): LoadStatus {
  if (resource.error()) return 'error';
  if (resource.isLoading() && !resource.hasValue()) return 'loading';
  return (resource.value()?.length ?? 0) === 0 ? 'empty' : 'ready';
}
