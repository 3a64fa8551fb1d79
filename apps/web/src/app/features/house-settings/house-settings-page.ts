import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  input,
  numberAttribute,
  signal,
} from '@angular/core';
import {
  FormControl,
  NonNullableFormBuilder,
  ReactiveFormsModule,
  Validators,
} from '@angular/forms';
import { MatAutocompleteModule } from '@angular/material/autocomplete';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSnackBar, MatSnackBarModule } from '@angular/material/snack-bar';
import { RouterLink } from '@angular/router';
import { houseCreateSchema, type HouseUpdate } from '@tierscope/contracts';
import { toSignal } from '@angular/core/rxjs-interop';
import { describeApiError, fieldErrorsOf } from '../../core/http/api-error';
import { LoadState } from '../../shared/ui/load-state';
import { firstError, zodValidator } from '../../shared/ui/zod-validator';
import { HouseSettingsStore } from './house-settings-store';

const fields = houseCreateSchema.shape;
const ALL_ZONES: readonly string[] = Intl.supportedValuesOf('timeZone');

/** A house's layout, clock and shortfall threshold. */
@Component({
  selector: 'ts-house-settings-page',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatAutocompleteModule,
    MatSnackBarModule,
    LoadState,
  ],
  templateUrl: './house-settings-page.html',
  styleUrl: './house-settings-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HouseSettingsPage {
  protected readonly store = inject(HouseSettingsStore);
  private readonly snackBar = inject(MatSnackBar);

  /** Route parameter. */
  readonly houseId = input.required({ transform: numberAttribute });

  protected readonly form = inject(NonNullableFormBuilder).group({
    name: ['', [Validators.required, zodValidator(fields.name)]],
    rows: [1, [Validators.required, zodValidator(fields.rows)]],
    tiers: [1, [Validators.required, zodValidator(fields.tiers)]],
    timezone: ['', [Validators.required, zodValidator(fields.timezone)]],
    lightsOn: ['04:00', [Validators.required, zodValidator(fields.lightsOn)]],
    photoperiodHours: [16, [Validators.required, zodValidator(fields.photoperiodHours)]],
    shortfallThresholdPct: [10, [Validators.required, zodValidator(fields.shortfallThresholdPct)]],
    eggPricePerDozen: new FormControl<number | null>(null, zodValidator(fields.eggPricePerDozen)),
  });
  protected readonly firstError = firstError;
  protected readonly saveError = signal<string | null>(null);

  private readonly zoneQuery = toSignal(this.form.controls.timezone.valueChanges, {
    initialValue: '',
  });
  protected readonly zoneOptions = computed(() => {
    const query = this.zoneQuery().toLowerCase();
    return ALL_ZONES.filter((zone) => zone.toLowerCase().includes(query)).slice(0, 30);
  });

  constructor() {
    this.store.followHouse(() => this.houseId());
    // Fill the form whenever the house (re)loads.
    effect(() => {
      const house = this.store.house.value();
      if (!house) return;
      this.form.reset({
        name: house.name,
        rows: house.rows,
        tiers: house.tiers,
        timezone: house.timezone,
        lightsOn: house.lightsOn,
        photoperiodHours: house.photoperiodHours,
        shortfallThresholdPct: house.shortfallThresholdPct,
        eggPricePerDozen: house.eggPricePerDozen,
      });
    });
  }

  protected async save(): Promise<void> {
    const house = this.store.house.value();
    if (!house) return;
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const value = this.form.getRawValue();
    const changes: HouseUpdate = Object.fromEntries(
      Object.entries(value).filter(([key, v]) => house[key as keyof typeof value] !== v),
    );
    if (Object.keys(changes).length === 0) {
      this.snackBar.open('Nothing to save: no setting was changed', undefined, { duration: 3000 });
      return;
    }
    this.saveError.set(null);
    try {
      const saved = await this.store.save(changes);
      if (saved) this.snackBar.open(`${saved.name} saved`, undefined, { duration: 3000 });
    } catch (error) {
      this.saveError.set(describeApiError(error));
      for (const [path, message] of Object.entries(fieldErrorsOf(error))) {
        const control = this.form.get(path);
        control?.setErrors({ server: message });
        control?.markAsTouched();
      }
    }
  }
}
