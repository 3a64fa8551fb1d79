import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import type { WorkOrder } from '@tierscope/contracts';
import { WorkOrderPage } from './work-order-page';
import { WorkOrderStore } from './work-order-store';

const order: WorkOrder = {
  id: 12,
  farmId: 1,
  farmName: 'North Ridge',
  houseId: 2,
  houseName: 'House 2',
  row: 4,
  tier: 3,
  title: 'Nest curtains',
  priority: 'high',
  state: 'in_progress',
  assignee: { id: 3, name: 'Casey Crew' },
  dueOn: null,
  isOverdue: false,
  exceptionId: null,
  checklistDone: 0,
  checklistTotal: 1,
  createdAt: '2026-12-01T10:00:00.000Z',
  doneAt: null,
  description: '',
  tiers: 3,
  timezone: 'America/Chicago',
  createdBy: { id: 2, name: 'Morgan Manager' },
  findingCause: null,
  findingNotes: '',
  cancelReason: null,
  startedAt: '2026-12-01T11:00:00.000Z',
  cancelledAt: null,
  updatedAt: '2026-12-01T11:00:00.000Z',
  checklist: [
    { id: 5, label: 'Check the curtain', isChecked: false, checkedBy: null, checkedAt: null },
  ],
  photos: [],
  exceptionStatus: null,
  nextStates: ['done'],
  canEdit: false,
  canWork: true,
};

async function setup() {
  TestBed.configureTestingModule({
    imports: [WorkOrderPage],
    // The page's store, as its route provides it.
    providers: [provideRouter([]), provideHttpClient(), provideHttpClientTesting(), WorkOrderStore],
  });
  const fixture = TestBed.createComponent(WorkOrderPage);
  fixture.componentRef.setInput('workOrderId', '12');
  fixture.detectChanges();
  const http = TestBed.inject(HttpTestingController);
  const settle = async () => {
    await new Promise((resolve) => setTimeout(resolve, 0));
    await fixture.whenStable();
    fixture.detectChanges();
  };
  http.expectOne('/api/v1/work-orders/12').flush(order);
  await settle();
  return { fixture, element: fixture.nativeElement as HTMLElement, http, settle };
}

function button(element: HTMLElement, text: string): HTMLButtonElement {
  const found = [...element.querySelectorAll('button')].find((b) => b.textContent.includes(text));
  if (!found) throw new Error(`no button "${text}"`);
  return found;
}

describe('WorkOrderPage', () => {
  it('shows the safety cautions, naming the upper tier, and the deferral to site procedures', async () => {
    const { element } = await setup();
    const safety = element.querySelector('.safety')?.textContent ?? '';
    expect(safety).toContain('Lock out and tag out first');
    expect(safety).toContain('Working at height: tier 3');
    expect(safety).toContain("site's own safety procedures");
  });

  it('puts the checklist first and the cautions right after it, unfolded, with the first one above it', async () => {
    const { element } = await setup();
    const checklist = element.querySelector('#checklist-title');
    const cautions = element.querySelector<HTMLDetailsElement>('details.safety');
    expect(checklist && cautions).toBeTruthy();
    // Document order: the checklist heading comes before the cautions.
    expect(
      checklist!.compareDocumentPosition(cautions!) & Node.DOCUMENT_POSITION_FOLLOWING,
    ).toBeTruthy();
    expect(cautions!.open).toBe(true);
    expect(element.querySelector('.safety-line')?.textContent).toContain(
      'Lock out and tag out first',
    );
  });

  it('will not mark done without a cause, and sends the findings with it once chosen', async () => {
    const { fixture, element, http, settle } = await setup();
    button(element, 'Mark done').click();
    await settle();
    http.expectNone((r) => r.method === 'PATCH');

    const component = fixture.componentInstance as unknown as {
      findings: { patchValue(v: object): void; markAsDirty(): void };
    };
    component.findings.patchValue({ cause: 'nest', notes: 'Curtain torn, replaced' });
    component.findings.markAsDirty();
    button(element, 'Mark done').click();
    await settle();
    const patch = http.expectOne((r) => r.method === 'PATCH' && r.url === '/api/v1/work-orders/12');
    expect(patch.request.body).toEqual({
      state: 'done',
      findingCause: 'nest',
      findingNotes: 'Curtain torn, replaced',
    });
    patch.flush({ ...order, state: 'done', findingCause: 'nest', nextStates: [] });
    await settle();
    expect(element.querySelector('[data-testid=state]')?.textContent).toBe('Done');
  });

  it('ticks a checklist item through the API', async () => {
    const { element, http, settle } = await setup();
    const box = element.querySelector<HTMLInputElement>('input[type=checkbox]');
    box?.click();
    await settle();
    const request = http.expectOne('/api/v1/work-orders/12/checklist/5');
    expect(request.request.body).toEqual({ isChecked: true });
  });
});
