import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import type { FormControl, FormGroup } from '@angular/forms';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import type { Counter } from '@tierscope/contracts';
import { house as houseFixture } from '../../../testing/fixtures';
import { signInAs } from '../../../testing/session';
import { PlaceCounterDialog, type PlaceCounterData } from './place-counter-dialog';

const house = houseFixture();

const data: PlaceCounterData = {
  counter: {
    id: 9,
    externalId: 'SPARE-3',
    firstSeenAt: '2026-11-10T12:00:00.000Z',
    readings: 1200,
    eggs: 54321,
    firstReadingAt: '2026-11-10T12:00:00.000Z',
    lastReadingAt: '2026-11-11T12:00:00.000Z',
  },
  houses: [house],
};

const houseCounters: Counter[] = [
  { id: 1, externalId: 'H4-R2-T3', kind: 'belt', row: 2, tier: 3, active: true },
  { id: 2, externalId: 'H4-COLLECTOR', kind: 'collector', row: null, tier: null, active: true },
];

function setup() {
  signInAs('integrator');
  const closed: unknown[] = [];
  TestBed.configureTestingModule({
    providers: [
      provideHttpClient(),
      provideHttpClientTesting(),
      { provide: MAT_DIALOG_DATA, useValue: data },
      { provide: MatDialogRef, useValue: { close: (value: unknown) => closed.push(value) } },
    ],
  });
  const fixture = TestBed.createComponent(PlaceCounterDialog);
  const http = TestBed.inject(HttpTestingController);
  const element = fixture.nativeElement as HTMLElement;
  const settle = async () => {
    fixture.detectChanges();
    TestBed.tick();
    await new Promise((resolve) => setTimeout(resolve, 0));
    fixture.detectChanges();
  };
  // The dialog's own form and act, as its template uses them.
  const dialog = fixture.componentInstance as unknown as {
    form: FormGroup<{
      houseId: FormControl<number | null>;
      kind: FormControl<string>;
      row: FormControl<number | null>;
      tier: FormControl<number | null>;
    }>;
    submit(): Promise<void>;
  };
  return { fixture, http, element, settle, dialog, closed };
}

describe('PlaceCounterDialog', () => {
  afterEach(() => {
    localStorage.clear();
  });

  it('names the counter already at the chosen belt, and places the new one there', async () => {
    const { http, element, settle, dialog, closed } = setup();
    await settle();
    expect(element.textContent).toContain('1,200 held readings (54,321 eggs)');
    http.expectOne('/api/v1/houses/4/counters').flush(houseCounters);
    dialog.form.controls.row.setValue(2);
    dialog.form.controls.tier.setValue(3);
    await settle();
    expect(element.querySelector('[data-testid="current-counter"]')?.textContent).toContain(
      'H4-R2-T3',
    );

    const submitting = dialog.submit();
    const request = http.expectOne('/api/v1/unknown-counters/9/place');
    expect(request.request.body).toEqual({ houseId: 4, kind: 'belt', row: 2, tier: 3 });
    request.flush({
      counter: { id: 9, externalId: 'SPARE-3', kind: 'belt', row: 2, tier: 3, active: true },
      houseId: 4,
      replacedExternalId: null,
      readings: 1200,
      eggs: 54321,
      firstDay: '2026-11-10',
      lastDay: '2026-11-11',
    });
    await submitting;
    expect(closed).toEqual([expect.objectContaining({ house })]);
  });

  it('sends no row or tier for the collector, and none at all for a belt without them', async () => {
    const { http, settle, dialog } = setup();
    await settle();
    http.expectOne('/api/v1/houses/4/counters').flush(houseCounters);
    await dialog.submit();
    http.expectNone('/api/v1/unknown-counters/9/place');

    dialog.form.controls.kind.setValue('collector');
    await settle();
    const submitting = dialog.submit();
    const request = http.expectOne('/api/v1/unknown-counters/9/place');
    expect(request.request.body).toEqual({ houseId: 4, kind: 'collector' });
    request.flush({
      counter: {
        id: 9,
        externalId: 'SPARE-3',
        kind: 'collector',
        row: null,
        tier: null,
        active: true,
      },
      houseId: 4,
      replacedExternalId: 'H4-COLLECTOR',
      readings: 1200,
      eggs: 54321,
      firstDay: '2026-11-10',
      lastDay: '2026-11-11',
    });
    await submitting;
  });

  it('stays open with the refusal when another counter counted there in the same hours', async () => {
    const { http, element, settle, dialog, closed } = setup();
    await settle();
    http.expectOne('/api/v1/houses/4/counters').flush(houseCounters);
    dialog.form.controls.row.setValue(2);
    dialog.form.controls.tier.setValue(3);
    const submitting = dialog.submit();
    http.expectOne('/api/v1/unknown-counters/9/place').flush(
      {
        error: {
          code: 'conflict',
          message: 'Counter H4-R2-T3 at House 2, row 2, tier 3 counted during the same hours',
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await submitting;
    await settle();
    expect(closed).toEqual([]);
    expect(element.querySelector('[role="alert"]')?.textContent).toContain(
      'counted during the same hours',
    );
  });
});
