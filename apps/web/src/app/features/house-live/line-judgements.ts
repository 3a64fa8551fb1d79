import { DecimalPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { LineJudgement } from '@tierscope/contracts';
import { ratioColor, textOn } from '../../shared/ui/ratio-colors';

/**
 * Whole rows and whole tiers as the engine judged them, beside the cells, in the map's colours, with the
 * outline and warning of their exception. (A short tier's cells are drawn against the tier's yardstick, not
 * against each other, which would hide it: see `cellsAgainstShortTiers`.)
 */
@Component({
  selector: 'ts-line-judgements',
  imports: [DecimalPipe, MatIconModule],
  template: `
    <section class="lines" aria-label="Whole rows and tiers">
      @for (group of groups(); track group.label) {
        @if (group.lines.length > 0) {
          <div class="group">
            <h3>
              {{ group.label }} <span class="ts-muted">{{ group.against }}</span>
            </h3>
            <ul>
              @for (line of group.lines; track line.at) {
                <li
                  [style.background]="color(line)"
                  [style.color]="text(line)"
                  [class.flagged]="line.exceptionId !== null"
                  [class.closed]="line.exceptionStatus === 'closed'"
                  [attr.data-line]="group.word + '-' + line.at"
                  [attr.data-flagged]="line.exceptionId !== null"
                  [title]="
                    (line.eggs | number: '1.0-0') +
                    ' eggs of ' +
                    (line.expected | number: '1.0-0') +
                    ' expected'
                  "
                >
                  @if (line.exceptionId !== null) {
                    <mat-icon aria-label="exception">warning</mat-icon>
                  }
                  <span>{{ group.name }} {{ line.at }}</span>
                  <strong>{{ line.ratio * 100 | number: '1.0-0' }} %</strong>
                </li>
              }
            </ul>
          </div>
        }
      }
    </section>
  `,
  styles: `
    .lines {
      display: grid;
      gap: 8px;
      margin-top: 8px;
    }
    h3 {
      font: var(--mat-sys-title-small);
      margin: 0 0 4px;
    }
    ul {
      display: flex;
      flex-wrap: wrap;
      gap: 6px;
      list-style: none;
      margin: 0;
      padding: 0;
    }
    li {
      display: inline-flex;
      align-items: center;
      gap: 6px;
      padding: 4px 10px;
      border-radius: 6px;
      border: 2px solid transparent;
      font: var(--mat-sys-label-large);
      white-space: nowrap;
    }
    li.flagged {
      border-color: #c2185b;
      box-shadow: 0 0 0 1px #fff inset;
    }
    li.flagged.closed {
      border-style: dotted;
    }
    mat-icon {
      font-size: 18px;
      width: 18px;
      height: 18px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LineJudgements {
  readonly byRow = input.required<readonly LineJudgement[]>();
  readonly byTier = input.required<readonly LineJudgement[]>();

  protected groups() {
    return [
      {
        label: 'Whole rows',
        against: 'against the other rows',
        name: 'Row',
        word: 'row',
        lines: this.byRow(),
      },
      {
        label: 'Whole tiers',
        against: "against each tier's usual share of the house",
        name: 'Tier',
        word: 'tier',
        lines: this.byTier(),
      },
    ];
  }

  protected color(line: LineJudgement): string {
    return ratioColor(line.ratio * 100);
  }

  protected text(line: LineJudgement): string {
    return textOn(line.ratio * 100);
  }
}
