import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import type { CounterPlaced, House, UnknownCounter } from '@tierscope/contracts';
import type { CounterKind } from '@tierscope/domain';
import { describeApiError, fieldErrorsOf } from '../../core/http/api-error';
import { HousesApi } from '../../core/http/houses-api';
import { firstError } from '../../shared/ui/zod-validator';
import { CountersApi } from './counters-api';
import { heldWords } from './counter-words';

export interface PlaceCounterData {
  counter: UnknownCounter;
  /** the farm's houses, one of which the counter joins */
  houses: House[];
}

export interface PlaceCounterResult {
  house: House;
  placed: CounterPlaced;
}

const upTo = (n: number) => Array.from({ length: n }, (_, i) => i + 1);

/**
 * Places an unknown counter on a house's belt (row and tier) or as its collector. The dialog makes the call,
 * so a refusal (another counter counted there in the same hours) is read where the place is chosen.
 */
@Component({
  selector: 'ts-place-counter-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatSelectModule,
    MatRadioModule,
    MatButtonModule,
  ],
  templateUrl: './place-counter-dialog.html',
  styleUrl: './place-counter-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PlaceCounterDialog {
  protected readonly data = inject<PlaceCounterData>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<PlaceCounterDialog, PlaceCounterResult>);
  private readonly api = inject(CountersApi);
  private readonly fb = inject(NonNullableFormBuilder);

  protected readonly form = this.fb.group({
    houseId: this.fb.control<number | null>(this.data.houses[0]?.id ?? null, Validators.required),
    kind: this.fb.control<CounterKind>('belt'),
    row: this.fb.control<number | null>(null),
    tier: this.fb.control<number | null>(null),
  });
  protected readonly value = toSignal(this.form.valueChanges, {
    initialValue: this.form.getRawValue(),
  });
  protected readonly house = computed(
    () => this.data.houses.find((h) => h.id === this.value().houseId) ?? null,
  );
  protected readonly rows = computed(() => upTo(this.house()?.rows ?? 0));
  protected readonly tiers = computed(() => upTo(this.house()?.tiers ?? 0));
  private readonly counters = inject(HousesApi).counters(() => this.house()?.id ?? null);
  /** The counter that counts at the chosen place now, if any. */
  protected readonly current = computed(() => {
    const { kind, row, tier } = this.value();
    const counters = this.counters.hasValue() ? this.counters.value() : [];
    return (
      counters.find(
        (c) =>
          c.active &&
          (kind === 'collector'
            ? c.kind === 'collector'
            : c.kind === 'belt' && c.row === row && c.tier === tier),
      ) ?? null
    );
  });
  protected readonly held = heldWords(this.data.counter.readings, this.data.counter.eggs);
  protected readonly isSaving = signal(false);
  protected readonly errorText = signal<string | null>(null);
  protected readonly firstError = firstError;

  constructor() {
    // A belt needs its row and tier; the collector counts the whole house.
    this.form.controls.kind.valueChanges.pipe(takeUntilDestroyed()).subscribe((kind) => {
      for (const control of [this.form.controls.row, this.form.controls.tier]) {
        control.setValidators(kind === 'belt' ? Validators.required : null);
        if (kind === 'collector') control.setValue(null);
        control.updateValueAndValidity();
      }
    });
    this.form.controls.row.setValidators(Validators.required);
    this.form.controls.tier.setValidators(Validators.required);
    // Another house may have fewer rows or tiers: choose again.
    this.form.controls.houseId.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => {
      this.form.controls.row.setValue(null);
      this.form.controls.tier.setValue(null);
    });
  }

  protected async submit(): Promise<void> {
    const house = this.house();
    if (this.form.invalid || !house) {
      this.form.markAllAsTouched();
      return;
    }
    const { kind, row, tier } = this.form.getRawValue();
    this.isSaving.set(true);
    this.errorText.set(null);
    try {
      const placed = await this.api.place(this.data.counter.id, {
        houseId: house.id,
        kind,
        ...(kind === 'belt' ? { row: row ?? undefined, tier: tier ?? undefined } : {}),
      });
      this.ref.close({ house, placed });
    } catch (error) {
      for (const [path, message] of Object.entries(fieldErrorsOf(error))) {
        const control = this.form.get(path);
        if (control) {
          control.setErrors({ server: message });
          control.markAsTouched();
        }
      }
      this.errorText.set(describeApiError(error));
    } finally {
      this.isSaving.set(false);
    }
  }
}
