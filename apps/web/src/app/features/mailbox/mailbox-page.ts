import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatExpansionModule } from '@angular/material/expansion';
import { MatIconModule } from '@angular/material/icon';
import { LoadState } from '../../shared/ui/load-state';
import { MailboxStore } from './mailbox-store';

/** What the local mail catcher caught: the demo's and development's stand-in for real inboxes. */
@Component({
  selector: 'ts-mailbox-page',
  imports: [DatePipe, MatExpansionModule, MatButtonModule, MatIconModule, LoadState],
  template: `
    <div class="ts-page narrow">
      <div class="heading">
        <h1 class="ts-page-title">Mailbox</h1>
        <span class="spacer"></span>
        <button mat-stroked-button type="button" (click)="store.mail.reload()">
          <mat-icon>refresh</mat-icon> Refresh
        </button>
      </div>
      <p class="ts-muted">
        Every mail Tierscope sent while the local mail catcher stands in for the mail service. Only
        administrators see this page, and only in development and the demo.
      </p>
      <ts-load-state
        [state]="store.loadStatus()"
        loadingText="Reading the mailbox…"
        [errorText]="store.errorText()"
        emptyText="No mail yet. Mail appears here as exceptions open and work orders move."
        (retry)="store.mail.reload()"
      />
      @if (store.loadStatus() === 'ready') {
        <mat-accordion multi>
          @for (m of store.mail.value() ?? []; track m.id) {
            <mat-expansion-panel
              [expanded]="store.openId() === m.id"
              (opened)="store.openId.set(m.id)"
              class="message"
            >
              <mat-expansion-panel-header collapsedHeight="auto" expandedHeight="auto">
                <mat-panel-title>{{ m.subject }}</mat-panel-title>
                <mat-panel-description>
                  {{ m.to.join(', ') }} · {{ m.receivedAt | date: 'd MMM, HH:mm:ss' }}
                </mat-panel-description>
              </mat-expansion-panel-header>
              <p class="meta">From {{ m.from }} to {{ m.to.join(', ') }}</p>
              <pre class="body">{{ m.text }}</pre>
            </mat-expansion-panel>
          }
        </mat-accordion>
      }
    </div>
  `,
  styles: `
    .narrow {
      max-width: 960px;
    }
    .heading {
      display: flex;
      align-items: center;
    }
    .spacer {
      flex: 1;
    }
    mat-expansion-panel-header {
      padding-top: 10px;
      padding-bottom: 10px;
    }
    .body {
      white-space: pre-wrap;
      font-family: inherit;
      margin: 0;
    }
    .meta {
      color: var(--mat-sys-on-surface-variant);
      margin-top: 0;
    }
    @media (max-width: 599px) {
      mat-panel-description {
        display: none;
      }
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MailboxPage {
  protected readonly store = inject(MailboxStore);
}
