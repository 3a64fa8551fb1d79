import type { ExceptionView, House, WorkOrderSummary } from '@tierscope/contracts';

// Answers as the API sends them, for specs: each parses with its contract schema.

/** A row shortfall in House 2, open, 82 % of expected; `over` changes any field. */
export const exceptionView = (id: number, over: Partial<ExceptionView> = {}): ExceptionView => ({
  id,
  farmId: 1,
  houseId: 2,
  houseName: 'House 2',
  timezone: 'America/Chicago',
  kind: 'shortfall',
  scope: 'row',
  row: 4,
  tier: null,
  status: 'open',
  isLearning: false,
  openedAt: '2026-11-10T12:00:00.000Z',
  closedAt: null,
  eggs: 820,
  expected: 1000,
  ratio: 0.82,
  pValue: 1e-9,
  worstRatio: 0.82,
  atOpen: { eggs: 820, expected: 1000, ratio: 0.82 },
  eggsLost: 180,
  eggsLostValue: null,
  likelyChecks: [],
  acknowledgedAt: null,
  acknowledgedBy: null,
  closeReason: null,
  closeNote: null,
  ...over,
});

/** A work order in House 1, open and unassigned; `over` changes any field. */
export const workOrderSummary = (
  id: number,
  over: Partial<WorkOrderSummary> = {},
): WorkOrderSummary => ({
  id,
  farmId: 1,
  farmName: 'F',
  houseId: 1,
  houseName: 'House 1',
  row: 1,
  tier: 1,
  title: 'a',
  priority: 'normal',
  state: 'open',
  assignee: null,
  dueOn: null,
  isOverdue: false,
  exceptionId: null,
  checklistDone: 0,
  checklistTotal: 0,
  createdAt: '2026-12-01T00:00:00.000Z',
  doneAt: null,
  ...over,
});

/** House 2 of the demo layout (6 rows × 3 tiers, America/Chicago); `over` changes any field. */
export const house = (over: Partial<House> = {}): House => ({
  id: 4,
  farmId: 1,
  name: 'House 2',
  rows: 6,
  tiers: 3,
  timezone: 'America/Chicago',
  lightsOn: '04:00',
  photoperiodHours: 16,
  shortfallThresholdPct: 10,
  eggPricePerDozen: null,
  createdAt: '2026-10-01T00:00:00.000Z',
  ...over,
});
