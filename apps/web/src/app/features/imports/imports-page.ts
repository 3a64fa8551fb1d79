import { DatePipe, DecimalPipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  signal,
  untracked,
} from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import {
  FormArray,
  FormControl,
  NonNullableFormBuilder,
  ReactiveFormsModule,
} from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatTableModule } from '@angular/material/table';
import {
  importMappingSchema,
  type ColumnRef,
  type ImportMappingInput,
  type SavedMapping,
} from '@tierscope/contracts';
import { map, startWith } from 'rxjs';
import { describeApiError, fieldErrorsOf } from '../../core/http/api-error';
import { FarmSelect } from '../../shared/ui/farm-select';
import { LoadState } from '../../shared/ui/load-state';
import { previewCsv, type CsvPreview } from './csv-preview';
import { ImportProgress } from './import-progress';
import {
  columnsOf,
  formOfMapping,
  guessesFor,
  mappingOf,
  roleOfColumn,
  type MappingFormValue,
} from './import-mapping-form';
import { ImportsStore } from './imports-store';
import { IMPORT_STATE_WORDS } from './import-state-words';
import type { ImportState } from '@tierscope/domain';

const SAMPLE_BYTES = 64 * 1024;

/** Integrators bring counter exports: choose a file, map its columns against a preview, import, watch. */
@Component({
  selector: 'ts-imports-page',
  imports: [
    FarmSelect,
    DatePipe,
    DecimalPipe,
    ReactiveFormsModule,
    MatButtonModule,
    MatCheckboxModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatRadioModule,
    MatSelectModule,
    MatTableModule,
    LoadState,
    ImportProgress,
  ],
  templateUrl: './imports-page.html',
  styleUrl: './imports-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ImportsPage {
  protected readonly store = inject(ImportsStore);
  protected stateWord(state: ImportState): string {
    return IMPORT_STATE_WORDS[state];
  }
  private readonly snackBar = inject(MatSnackBar);
  private readonly fb = inject(NonNullableFormBuilder);

  protected readonly file = signal<File | null>(null);
  private readonly sample = signal<{ text: string; isWholeFile: boolean } | null>(null);
  protected readonly form = this.fb.group({
    layout: this.fb.control<MappingFormValue['layout']>('long'),
    delimiter: this.fb.control<MappingFormValue['delimiter']>('auto'),
    decimal: this.fb.control<MappingFormValue['decimal']>('.'),
    hasHeader: this.fb.control(true),
    timestamp: this.fb.control<ColumnRef | null>(null),
    timestampFormat: this.fb.control<MappingFormValue['timestampFormat']>('iso'),
    timezone: this.fb.control(''),
    sectionBy: this.fb.control<MappingFormValue['sectionBy']>('rowTier'),
    counter: this.fb.control<ColumnRef | null>(null),
    row: this.fb.control<ColumnRef | null>(null),
    tier: this.fb.control<ColumnRef | null>(null),
    eggs: this.fb.control<ColumnRef | null>(null),
    mode: this.fb.control<MappingFormValue['mode']>('interval'),
    wide: new FormArray<FormControl<string>>([]),
  });
  /** The form's whole value as a signal, so the preview and its column chips follow every change. */
  private readonly formValue = toSignal(
    this.form.valueChanges.pipe(
      map((): MappingFormValue => this.form.getRawValue()),
      startWith(this.form.getRawValue()),
    ),
    { requireSync: true },
  );
  protected readonly preview = computed<CsvPreview | null>(() => {
    const sample = this.sample();
    if (!sample) return null;
    const delimiter = this.formValue().delimiter;
    try {
      return previewCsv(
        sample.text,
        sample.isWholeFile,
        delimiter === 'auto' ? undefined : delimiter,
      );
    } catch {
      // A sample csv-parse cannot read even leniently: the import will report its lines one by one.
      return null;
    }
  });
  /** The file's columns as the mapping names them: by header name, or by number without a header. */
  protected readonly columns = computed(() =>
    columnsOf(this.preview(), this.formValue().hasHeader),
  );
  protected readonly previewLines = computed(() => {
    const p = this.preview();
    if (!p) return [];
    return this.formValue().hasHeader ? p.lines : [p.firstLine, ...p.lines].slice(0, 10);
  });
  protected readonly wideTargets = computed(() => {
    const list = this.store.counters.value() ?? [];
    return list
      .filter((c) => c.kind === 'belt' && c.row !== null && c.tier !== null)
      .map((c) => ({
        value: `counter:${c.externalId}`,
        label: `Row ${c.row}, tier ${c.tier} (${c.externalId})`,
      }));
  });

  protected readonly errorText = signal<string | null>(null);
  protected readonly saveName = signal('');
  protected readonly recentColumns = [
    'created',
    'house',
    'file',
    'state',
    'lines',
    'added',
    'errors',
  ];

  constructor() {
    // The house's own zone is the default for times without an offset.
    effect(() => {
      const zone = this.store.house()?.timezone;
      if (zone && untracked(() => this.form.controls.timezone.value) === '') {
        this.form.controls.timezone.setValue(zone);
      }
    });
    // A new preview brings detected settings and a first guess at the columns.
    effect(() => {
      const p = this.preview();
      if (!p) return;
      untracked(() => {
        this.applyGuesses(p);
      });
    });
  }

  private guessedFor: CsvPreview | null = null;

  private applyGuesses(p: CsvPreview): void {
    if (this.guessedFor?.firstLine.join('\u0001') === p.firstLine.join('\u0001')) return;
    this.guessedFor = p;
    const c = this.form.controls;
    const known = new Set((this.store.counters.value() ?? []).map((k) => k.externalId));
    const { layout, wide, ...guessed } = guessesFor(p, c.timezone.value, known);
    this.form.patchValue(guessed);
    if (layout) c.layout.setValue(layout);
    this.setWide(wide);
  }

  private setWide(targets: readonly string[]): void {
    const wide = this.form.controls.wide;
    wide.clear();
    for (const w of targets) wide.push(new FormControl(w, { nonNullable: true }));
  }

  protected async chooseFile(event: Event): Promise<void> {
    const picker = event.target as HTMLInputElement;
    const chosen = picker.files?.[0] ?? null;
    this.file.set(chosen);
    this.store.current.set(null);
    this.errorText.set(null);
    this.guessedFor = null;
    if (!chosen) {
      this.sample.set(null);
      return;
    }
    const text = await chosen.slice(0, SAMPLE_BYTES).text();
    this.sample.set({ text, isWholeFile: chosen.size <= SAMPLE_BYTES });
  }

  protected useSaved(mapping: SavedMapping): void {
    const { wide, ...values } = formOfMapping(mapping.mapping, this.columns());
    this.form.patchValue(values);
    if (wide) this.setWide(wide);
    this.snackBar.open(`Mapping "${mapping.name}" applied`, undefined, { duration: 2000 });
  }

  /** The mapping as the API takes it, from the form. */
  protected mapping(): ImportMappingInput {
    return mappingOf(this.form.getRawValue(), this.columns());
  }

  /** Where a column goes, for the preview's header chips. */
  protected roleOf(index: number): string | null {
    return roleOfColumn(this.formValue(), this.columns(), index);
  }

  protected async start(): Promise<void> {
    const file = this.file();
    if (!file || this.store.houseId() === null) return;
    const checked = importMappingSchema.safeParse(this.mapping());
    if (!checked.success) {
      this.errorText.set(
        checked.error.issues
          .map((i) => `${i.path.join('.') || 'mapping'}: ${i.message}`)
          .join('; '),
      );
      return;
    }
    this.errorText.set(null);
    try {
      await this.store.start(this.mapping(), file);
      // Bring the progress into view: on a phone it is below the long mapping form.
      setTimeout(() => {
        document.querySelector('ts-import-progress')?.scrollIntoView({ behavior: 'smooth' });
      });
    } catch (error) {
      const fields = Object.entries(fieldErrorsOf(error)).map(([p, m]) => `${p}: ${m}`);
      this.errorText.set([describeApiError(error), ...fields].join(' — '));
    }
  }

  protected async saveMapping(): Promise<void> {
    const name = this.saveName().trim();
    if (name === '') return;
    try {
      await this.store.saveMapping(name, this.mapping());
      this.snackBar.open(`Mapping "${name}" saved`, undefined, { duration: 2000 });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }

  protected async deleteSaved(mapping: SavedMapping): Promise<void> {
    try {
      await this.store.deleteMapping(mapping);
      this.snackBar.open(`Mapping "${mapping.name}" deleted`, undefined, { duration: 2000 });
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }

  protected onFinished(): void {
    this.store.recent.reload();
  }
}
