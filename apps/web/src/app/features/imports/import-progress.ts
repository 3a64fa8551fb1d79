import { DatePipe, DecimalPipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  computed,
  DestroyRef,
  effect,
  inject,
  input,
  linkedSignal,
  output,
  untracked,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatProgressSpinnerModule } from '@angular/material/progress-spinner';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { type ImportStatus } from '@tierscope/contracts';
import { interval, timer, type Subscription } from 'rxjs';
import { describeApiError } from '../../core/http/api-error';
import { LiveSocket } from '../../core/live/live-socket';
import { ImportsApi } from './imports-api';
import { IMPORT_STATE_WORDS } from './import-state-words';

const ENDED = new Set(['done', 'failed', 'cancelled']);
/** How often a done import is read again while its days are judged. */
const JUDGING_POLL_MS = 3000;

/** One import from queued to its summary: a progress bar with lines per second and time left, then counts and line errors. */
@Component({
  selector: 'ts-import-progress',
  imports: [
    DatePipe,
    DecimalPipe,
    RouterLink,
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
    MatProgressSpinnerModule,
    MatTableModule,
  ],
  templateUrl: './import-progress.html',
  styleUrl: './import-progress.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ImportProgress {
  readonly status = input.required<ImportStatus>();
  readonly finished = output<ImportStatus>();

  private readonly api = inject(ImportsApi);
  private readonly live = inject(LiveSocket);
  private readonly snackBar = inject(MatSnackBar);

  /** The newest state: the input, then live messages and reads. */
  protected readonly now = linkedSignal(() => this.status());
  private firstSeen: { at: number; lines: number; bytes: number } | null = null;
  /** reads while a retried import runs (the live follow-up is tied to the import it was given) */
  private poll: Subscription | null = null;
  protected readonly rate = linkedSignal<{
    linesPerSecond: number;
    secondsLeft: number | null;
  } | null>(() => {
    const s = this.now();
    const first = this.firstSeen;
    if (!first || s.state !== 'running') return null;
    const seconds = (Date.now() - first.at) / 1000;
    if (seconds < 0.5) return null;
    const linesPerSecond = (s.linesRead - first.lines) / seconds;
    const bytesPerSecond = (s.bytesRead - first.bytes) / seconds;
    return {
      linesPerSecond,
      secondsLeft: bytesPerSecond > 0 ? (s.bytes - s.bytesRead) / bytesPerSecond : null,
    };
  });
  protected readonly percent = computed(() => {
    const s = this.now();
    if (s.state === 'done') return 100;
    return s.bytes > 0 ? Math.min(100, (100 * s.bytesRead) / s.bytes) : 0;
  });
  protected readonly isEnded = computed(() => ENDED.has(this.now().state));
  protected readonly errorColumns = ['line', 'column', 'message'];
  protected readonly stateWords = IMPORT_STATE_WORDS;

  constructor() {
    // Live messages of its house while it runs (the socket's one seam, core/live).
    this.live.followHouse(
      () => (this.isEnded() ? null : this.status().houseId),
      (message) => {
        if (message.type !== 'import' || message.import.id !== untracked(this.status).id) return;
        this.track({ ...untracked(this.now), ...message.import });
      },
    );
    const destroyRef = inject(DestroyRef);
    let pollSubscription: Subscription | null = null;
    const stop = () => {
      pollSubscription?.unsubscribe();
      pollSubscription = null;
    };
    destroyRef.onDestroy(() => {
      stop();
      this.poll?.unsubscribe();
    });
    // Follow the import it was given: a slow read too, in case the socket is down.
    effect(() => {
      const given = this.status();
      untracked(() => {
        stop();
        this.firstSeen = null;
        if (ENDED.has(given.state)) return;
        pollSubscription = interval(2000).subscribe(() => {
          void this.read(given.id);
        });
      });
    });
    this.followJudging(destroyRef);
    // When it ends: the full status (with its errors), once.
    effect(() => {
      const s = this.now();
      if (!ENDED.has(s.state)) return;
      untracked(() => {
        stop();
        this.poll?.unsubscribe();
        this.poll = null;
        if (s.errors.length === 0 && s.errorCount > 0) void this.read(s.id);
        else this.finished.emit(s);
      });
    });
  }

  /** Reads a done import again until its days are judged (the first read after it ends tells). */
  private followJudging(destroyRef: DestroyRef): void {
    let wait: Subscription | null = null;
    let isKnown = false;
    destroyRef.onDestroy(() => wait?.unsubscribe());
    effect(() => {
      const s = this.now();
      untracked(() => {
        wait?.unsubscribe();
        wait = null;
        if (s.state !== 'done' || (isKnown && !s.isJudgingDays)) return;
        wait = timer(isKnown ? JUDGING_POLL_MS : 0).subscribe(() => {
          isKnown = true;
          void this.read(s.id);
        });
      });
    });
  }

  private track(next: ImportStatus): void {
    if (!this.firstSeen && next.state === 'running') {
      this.firstSeen = { at: Date.now(), lines: next.linesRead, bytes: next.bytesRead };
    }
    this.now.set(next);
  }

  private async read(id: number): Promise<void> {
    try {
      this.track(await this.api.get(id));
    } catch {
      // A missed read is made up by the next one or by a live message.
    }
  }

  protected async cancel(): Promise<void> {
    try {
      this.track(await this.api.cancel(this.now().id));
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }

  protected async retry(): Promise<void> {
    try {
      const status = await this.api.retry(this.now().id);
      this.firstSeen = null;
      this.now.set(status);
      void this.read(status.id);
      this.poll = interval(2000).subscribe(() => {
        void this.read(status.id);
      });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }

  protected async downloadErrors(): Promise<void> {
    try {
      await this.api.downloadErrors(this.now().id);
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }

  protected size(bytes: number): string {
    return bytes >= 1024 * 1024
      ? `${(bytes / 1024 / 1024).toFixed(1)} MB`
      : `${Math.max(1, Math.round(bytes / 1024))} KB`;
  }

  protected timeLeft(seconds: number | null): string {
    if (seconds === null || !Number.isFinite(seconds)) return '—';
    if (seconds < 60) return `${Math.ceil(seconds)} s`;
    return `${Math.floor(seconds / 60)} min ${Math.ceil(seconds % 60)} s`;
  }
}
