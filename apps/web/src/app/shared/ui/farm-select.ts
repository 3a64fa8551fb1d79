import { ChangeDetectionStrategy, Component, input, model } from '@angular/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatSelectModule } from '@angular/material/select';

/** The farm picker every farm-scoped page opens with: the farms given, the chosen one bound two ways. */
@Component({
  selector: 'ts-farm-select',
  imports: [MatFormFieldModule, MatSelectModule],
  template: `
    <mat-form-field appearance="outline" subscriptSizing="dynamic">
      <mat-label>Farm</mat-label>
      <mat-select [value]="farmId()" (valueChange)="farmId.set($event)">
        @for (f of farms(); track f.farmId) {
          <mat-option [value]="f.farmId">{{ f.farmName }}</mat-option>
        }
      </mat-select>
    </mat-form-field>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FarmSelect {
  readonly farms = input.required<readonly { farmId: number; farmName: string }[]>();
  readonly farmId = model<number | null>(null);
}
