import { DatePipe, DecimalPipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  linkedSignal,
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
  type ImportStatus,
  type SavedMapping,
  endpoints,
} from '@tierscope/contracts';
import { can, type Delimiter } from '@tierscope/domain';
import { startWith } from 'rxjs';
import { AuthStore } from '../../core/auth/auth-store';
import { describeApiError, fieldErrorsOf } from '../../core/http/api-error';
import { FarmSelect } from '../../shared/ui/farm-select';
import { LoadState, listState } from '../../shared/ui/load-state';
import { guessLongMapping, guessTimestampFormat, previewCsv, type CsvPreview } from './csv-preview';
import { ImportProgress } from './import-progress';
import { ApiClient } from '../../core/http/api-client';

const SAMPLE_BYTES = 64 * 1024;

type WideColumn = Extract<ImportMappingInput, { layout: 'wide' }>['columns'][number];

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
  private readonly auth = inject(AuthStore);
  private readonly api = inject(ApiClient);
  private readonly snackBar = inject(MatSnackBar);
  private readonly fb = inject(NonNullableFormBuilder);

  protected readonly farms = computed(() =>
    this.auth.memberships().filter((m) => can(m.role, 'imports.run')),
  );
  protected readonly farmId = linkedSignal(() => this.farms()[0]?.farmId ?? null);
  protected readonly houses = this.api.resource(endpoints.houses.listByFarm, () => {
    const farm = this.farmId();
    return farm === null ? undefined : { params: { farmId: farm } };
  });
  protected readonly houseId = linkedSignal(() => this.houses.value()?.[0]?.id ?? null);
  protected readonly house = computed(
    () => this.houses.value()?.find((h) => h.id === this.houseId()) ?? null,
  );
  protected readonly counters = this.api.resource(endpoints.houses.counters, () => {
    const house = this.houseId();
    return house === null ? undefined : { params: { houseId: house } };
  });
  protected readonly saved = this.api.resource(endpoints.imports.mappings, () => {
    const farm = this.farmId();
    return farm === null ? undefined : { params: { farmId: farm } };
  });
  protected readonly recent = this.api.resource(endpoints.imports.list, () => {
    const farm = this.farmId();
    return farm === null ? undefined : { query: { farmId: farm } };
  });
  protected readonly recentState = computed(() => listState(this.recent));

  protected readonly file = signal<File | null>(null);
  private readonly sample = signal<{ text: string; isWholeFile: boolean } | null>(null);
  protected readonly form = this.fb.group({
    layout: this.fb.control<'long' | 'wide'>('long'),
    delimiter: this.fb.control<Delimiter | 'auto'>('auto'),
    decimal: this.fb.control<'.' | ','>('.'),
    hasHeader: this.fb.control(true),
    timestamp: this.fb.control<ColumnRef | null>(null),
    timestampFormat: this.fb.control<'iso' | 'dmy' | 'mdy' | 'ymd'>('iso'),
    timezone: this.fb.control(''),
    sectionBy: this.fb.control<'rowTier' | 'counter'>('rowTier'),
    counter: this.fb.control<ColumnRef | null>(null),
    row: this.fb.control<ColumnRef | null>(null),
    tier: this.fb.control<ColumnRef | null>(null),
    eggs: this.fb.control<ColumnRef | null>(null),
    mode: this.fb.control<'interval' | 'total'>('interval'),
    wide: new FormArray<FormControl<string>>([]),
  });
  private readonly formValue = toSignal(
    this.form.valueChanges.pipe(startWith(this.form.getRawValue())),
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
  protected readonly columns = computed(() => {
    const p = this.preview();
    if (!p) return [] as { ref: ColumnRef; label: string }[];
    const hasHeader = this.formValue().hasHeader ?? true;
    return Array.from({ length: p.columnCount }, (_, i): { ref: ColumnRef; label: string } => {
      const name = p.firstLine[i]?.trim() ?? '';
      return hasHeader && name !== ''
        ? { ref: name, label: name }
        : { ref: i + 1, label: `Column ${i + 1}` };
    });
  });
  protected readonly previewLines = computed(() => {
    const p = this.preview();
    if (!p) return [];
    return this.formValue().hasHeader ? p.lines : [p.firstLine, ...p.lines].slice(0, 10);
  });
  protected readonly wideTargets = computed(() => {
    const list = this.counters.value() ?? [];
    return list
      .filter((c) => c.kind === 'belt' && c.row !== null && c.tier !== null)
      .map((c) => ({
        value: `counter:${c.externalId}`,
        label: `Row ${c.row}, tier ${c.tier} (${c.externalId})`,
      }));
  });

  protected readonly isStarting = signal(false);
  protected readonly errorText = signal<string | null>(null);
  protected readonly current = signal<ImportStatus | null>(null);
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
      const zone = this.house()?.timezone;
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
    c.decimal.setValue(p.decimal);
    const guess = guessLongMapping(p.firstLine, c.timezone.value);
    const tsIndex = typeof guess.timestamp === 'string' ? p.firstLine.indexOf(guess.timestamp) : 0;
    c.timestampFormat.setValue(guessTimestampFormat(p.lines.map((l) => l[tsIndex] ?? '')));
    c.timestamp.setValue(guess.timestamp ?? null);
    c.eggs.setValue(guess.eggs ?? null);
    c.row.setValue(guess.row ?? null);
    c.tier.setValue(guess.tier ?? null);
    c.counter.setValue(guess.counter ?? null);
    c.sectionBy.setValue(guess.counter !== undefined ? 'counter' : 'rowTier');
    // Wide files name their counters in the header: map the columns that do.
    const known = new Set((this.counters.value() ?? []).map((k) => k.externalId));
    const wide = p.firstLine.map((name) =>
      known.has(name.trim()) ? `counter:${name.trim()}` : 'skip',
    );
    if (wide.filter((w) => w !== 'skip').length >= 2) c.layout.setValue('wide');
    c.wide.clear();
    for (const w of wide) c.wide.push(new FormControl(w, { nonNullable: true }));
  }

  protected async chooseFile(event: Event): Promise<void> {
    const picker = event.target as HTMLInputElement;
    const chosen = picker.files?.[0] ?? null;
    this.file.set(chosen);
    this.current.set(null);
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
    const m = mapping.mapping;
    const c = this.form.controls;
    c.layout.setValue(m.layout);
    c.delimiter.setValue(m.delimiter ?? 'auto');
    c.decimal.setValue(m.decimal);
    c.hasHeader.setValue(m.hasHeader);
    c.timestamp.setValue(m.timestamp);
    c.timestampFormat.setValue(m.timestampFormat);
    c.timezone.setValue(m.timezone);
    c.mode.setValue(m.mode);
    if (m.layout === 'long') {
      c.sectionBy.setValue(m.counter !== undefined ? 'counter' : 'rowTier');
      c.counter.setValue(m.counter ?? null);
      c.row.setValue(m.row ?? null);
      c.tier.setValue(m.tier ?? null);
      c.eggs.setValue(m.eggs);
    } else {
      const byColumn = new Map(
        m.columns.map((col) => [
          String(col.column),
          col.counter !== undefined
            ? `counter:${col.counter}`
            : `section:${col.row ?? 0}:${col.tier ?? 0}`,
        ]),
      );
      c.wide.controls.forEach((control, i) => {
        const ref = this.columns()[i]?.ref;
        control.setValue(byColumn.get(String(ref)) ?? 'skip');
      });
    }
    this.snackBar.open(`Mapping "${mapping.name}" applied`, undefined, { duration: 2000 });
  }

  /** The mapping as the API takes it, from the form. */
  protected mapping(): ImportMappingInput {
    const v = this.form.getRawValue();
    const common = {
      ...(v.delimiter === 'auto' ? {} : { delimiter: v.delimiter }),
      decimal: v.decimal,
      hasHeader: v.hasHeader,
      timestamp: v.timestamp ?? '',
      timestampFormat: v.timestampFormat,
      timezone: v.timezone,
      mode: v.mode,
    };
    if (v.layout === 'wide') {
      return {
        layout: 'wide',
        ...common,
        columns: v.wide.flatMap((target, i): WideColumn[] => {
          const ref = this.columns()[i]?.ref;
          if (target === 'skip' || ref === undefined) return [];
          if (target.startsWith('counter:')) return [{ column: ref, counter: target.slice(8) }];
          const [, row = 0, tier = 0] = target.split(':').map(Number);
          return [{ column: ref, row, tier }];
        }),
      };
    }
    return {
      layout: 'long',
      ...common,
      eggs: v.eggs ?? '',
      ...(v.sectionBy === 'counter'
        ? { counter: v.counter ?? '' }
        : { row: v.row ?? '', tier: v.tier ?? '' }),
    };
  }

  /** Where a column goes, for the preview's header chips. */
  protected roleOf(index: number): string | null {
    const v = this.formValue();
    const ref = this.columns()[index]?.ref;
    if (ref === undefined) return null;
    if (v.timestamp === ref) return 'time';
    if (v.layout === 'wide') {
      const target = v.wide?.[index];
      return target && target !== 'skip' ? target.replace('counter:', '') : null;
    }
    if (v.eggs === ref) return v.mode === 'total' ? 'total' : 'eggs';
    if (v.sectionBy === 'counter' && v.counter === ref) return 'counter';
    if (v.sectionBy === 'rowTier' && v.row === ref) return 'row';
    if (v.sectionBy === 'rowTier' && v.tier === ref) return 'tier';
    return null;
  }

  protected async start(): Promise<void> {
    const file = this.file();
    const houseId = this.houseId();
    if (!file || houseId === null) return;
    const checked = importMappingSchema.safeParse(this.mapping());
    if (!checked.success) {
      this.errorText.set(
        checked.error.issues
          .map((i) => `${i.path.join('.') || 'mapping'}: ${i.message}`)
          .join('; '),
      );
      return;
    }
    const form = new FormData();
    form.append('mapping', JSON.stringify(this.mapping()));
    form.append('file', file, file.name);
    this.isStarting.set(true);
    this.errorText.set(null);
    try {
      const status = await this.api.call(endpoints.imports.start, {
        params: { houseId },
        form,
      });
      this.current.set(status);
      this.recent.reload();
      // Bring the progress into view: on a phone it is below the long mapping form.
      setTimeout(() => {
        document.querySelector('ts-import-progress')?.scrollIntoView({ behavior: 'smooth' });
      });
    } catch (error) {
      const fields = Object.entries(fieldErrorsOf(error)).map(([p, m]) => `${p}: ${m}`);
      this.errorText.set([describeApiError(error), ...fields].join(' — '));
    } finally {
      this.isStarting.set(false);
    }
  }

  protected async saveMapping(): Promise<void> {
    const farmId = this.farmId();
    const name = this.saveName().trim();
    if (farmId === null || name === '') return;
    try {
      await this.api.call(endpoints.imports.saveMapping, {
        params: { farmId },
        body: { name, mapping: this.mapping() },
      });
      this.snackBar.open(`Mapping "${name}" saved`, undefined, { duration: 2000 });
      this.saved.reload();
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }

  protected async deleteSaved(mapping: SavedMapping): Promise<void> {
    try {
      await this.api.call(endpoints.imports.deleteMapping, { params: { mappingId: mapping.id } });
      this.snackBar.open(`Mapping "${mapping.name}" deleted`, undefined, { duration: 2000 });
      this.saved.reload();
    } catch (error) {
      this.snackBar.open(describeApiError(error), 'Dismiss');
    }
  }

  protected onFinished(): void {
    this.recent.reload();
  }
}
