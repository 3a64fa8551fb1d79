import { exceptionMeasureSchema } from '@tierscope/contracts';
import type {
  CellDetail,
  CloseException,
  ExceptionsQuery,
  ExceptionView,
  HouseMap,
  MapQuery,
} from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import {
  likelyChecks,
  lostValue,
  productionDayOf,
  productionWindow,
  silenceOf,
} from '@tierscope/domain';
import { farmsWith, requireFarmPermission } from '../../platform/access';
import type { RequestContext } from '../../platform/auth';
import { AppError, notFound } from '../../platform/errors';
import type { EventBus } from '../../platform/events';
import { recordAudit } from '../audit/audit.repository';
import { type ExceptionRow } from '../evaluation/exception-rows.repository';
import { lastCountedAt } from '../evaluation/evaluation.repository';
import {
  findException,
  listExceptions,
  updateException,
} from '../evaluation/exception-rows.repository';
import type { EvaluationService } from '../evaluation/evaluation.service';
import { findHouse } from '../houses/houses.repository';

/** How far back a silent counter's last counted egg is looked for: the cell's 14 days and today. */
const SILENCE_LOOK_BACK_DAYS = 15;

export interface ExceptionsService {
  list(ctx: RequestContext, query: ExceptionsQuery): Promise<ExceptionView[]>;
  acknowledge(ctx: RequestContext, id: number): Promise<ExceptionView>;
  close(ctx: RequestContext, id: number, input: CloseException): Promise<ExceptionView>;
  map(ctx: RequestContext, houseId: number, query: MapQuery): Promise<HouseMap>;
  cell(ctx: RequestContext, houseId: number, row: number, tier: number): Promise<CellDetail>;
  /** One exception as the API shows it (for the live socket). */
  view(id: number): Promise<ExceptionView | undefined>;
}

export function toExceptionView(
  e: ExceptionRow,
  extra: {
    houseName: string;
    timezone: string;
    pricePerDozen: number | null;
    acknowledgedByName: string | null;
  },
): ExceptionView {
  return {
    id: e.id,
    farmId: e.farmId,
    houseId: e.houseId,
    houseName: extra.houseName,
    timezone: extra.timezone,
    kind: e.kind,
    scope: e.scope,
    row: e.row,
    tier: e.tier,
    status: e.status,
    isLearning: e.isLearning,
    openedAt: e.openedAt.toISOString(),
    closedAt: e.closedAt?.toISOString() ?? null,
    eggs: e.eggs,
    expected: e.expected,
    ratio: e.ratio,
    pValue: e.pValue,
    worstRatio: e.worstRatio,
    atOpen: exceptionMeasureSchema.safeParse(e.atOpen).data ?? null,
    eggsLost: e.eggsLost,
    eggsLostValue: lostValue(e.eggsLost, extra.pricePerDozen),
    likelyChecks: likelyChecks(e.kind, e.scope),
    acknowledgedAt: e.acknowledgedAt?.toISOString() ?? null,
    acknowledgedBy: extra.acknowledgedByName,
    closeReason: e.closeReason,
    closeNote: e.closeNote,
  };
}

export function createExceptionsService(
  db: Database,
  evaluation: EvaluationService,
  events: EventBus,
): ExceptionsService {
  async function view(id: number): Promise<ExceptionView | undefined> {
    const e = await findException(db, id);
    if (!e) return undefined;
    const [row] = await listExceptions(db, { farmIds: [e.farmId], houseId: e.houseId }).then(
      (rows) => rows.filter((r) => r.exception.id === id),
    );
    return row ? toExceptionView(row.exception, row) : undefined;
  }

  async function forAction(ctx: RequestContext, id: number): Promise<ExceptionRow> {
    const e = await findException(db, id);
    if (!e || !ctx.user.roles.has(e.farmId)) throw notFound('Exception');
    requireFarmPermission(ctx, e.farmId, 'exceptions.acknowledge', 'Exception');
    return e;
  }

  async function changed(
    ctx: RequestContext,
    before: ExceptionRow,
    after: ExceptionRow | undefined,
    action: string,
  ): Promise<ExceptionView> {
    if (!after) throw notFound('Exception');
    await recordAudit(db, {
      farmId: after.farmId,
      actorUserId: ctx.user.id,
      action,
      entity: 'exception',
      entityId: after.id,
      before: { status: before.status },
      after: { status: after.status, closeReason: after.closeReason, closeNote: after.closeNote },
    });
    events.emit('exception.changed', {
      farmId: after.farmId,
      houseId: after.houseId,
      exception: after,
    });
    const shown = await view(after.id);
    if (!shown) throw notFound('Exception');
    return shown;
  }

  /** A silent counter's cell: since its last counted egg (within the look-back), and what it missed. */
  async function silenceOfCell(
    house: { id: number; farmId: number; timezone: string; lightsOn: string },
    row: number,
    tier: number,
    openedAt: string,
    detail: Pick<CellDetail, 'days' | 'today'>,
  ) {
    const lookBack = new Date(Date.now() - SILENCE_LOOK_BACK_DAYS * 86_400_000);
    const since =
      (await lastCountedAt(db, house.farmId, house.id, row, tier, lookBack)) ?? new Date(openedAt);
    return silenceOf({
      since,
      sinceDay: productionDayOf(since, house.timezone, house.lightsOn),
      days: detail.days,
      today: detail.today,
    });
  }

  return {
    view,

    async list(ctx, query) {
      let farmIds = farmsWith(ctx, 'farm.read');
      if (query.farmId !== undefined) {
        requireFarmPermission(ctx, query.farmId, 'farm.read');
        farmIds = [query.farmId];
      }
      if (query.houseId !== undefined) {
        const house = await findHouse(db, query.houseId);
        if (!house || !ctx.user.roles.has(house.farmId)) throw notFound('House');
        farmIds = farmIds.filter((f) => f === house.farmId);
      }
      const rows = await listExceptions(db, { farmIds, ...query });
      return rows.map((r) => toExceptionView(r.exception, r));
    },

    async acknowledge(ctx, id) {
      const before = await forAction(ctx, id);
      if (before.status === 'closed')
        throw new AppError('conflict', 'This exception is already closed');
      if (before.status === 'acknowledged') {
        const shown = await view(id);
        if (!shown) throw notFound('Exception');
        return shown;
      }
      const after = await updateException(db, before.farmId, id, {
        status: 'acknowledged',
        acknowledgedAt: new Date(),
        acknowledgedBy: ctx.user.id,
      });
      return changed(ctx, before, after, 'exception.acknowledge');
    },

    async close(ctx, id, input) {
      const before = await forAction(ctx, id);
      if (before.status === 'closed')
        throw new AppError('conflict', 'This exception is already closed');
      const after = await updateException(db, before.farmId, id, {
        status: 'closed',
        closedAt: new Date(),
        closedBy: ctx.user.id,
        closeReason: input.reason,
        closeNote: input.note ?? null,
      });
      return changed(ctx, before, after, 'exception.close');
    },

    async cell(ctx, houseId, row, tier) {
      const house = await findHouse(db, houseId);
      if (!house || !ctx.user.roles.has(house.farmId)) throw notFound('House');
      requireFarmPermission(ctx, house.farmId, 'farm.read', 'House');
      const detail = await evaluation.cellDetail(houseId, row, tier);
      if (!detail) throw notFound('Section');
      const covers = (e: ExceptionRow) =>
        (e.scope === 'section' && e.row === row && e.tier === tier) ||
        (e.scope === 'row' && e.row === row) ||
        (e.scope === 'tier' && e.tier === tier);
      const live = (
        await listExceptions(db, { farmIds: [house.farmId], houseId, status: 'live' })
      ).find((r) => covers(r.exception));
      const exception = live ? toExceptionView(live.exception, live) : null;
      return {
        ...detail,
        exception,
        silence:
          exception?.kind === 'silent_counter' && exception.scope === 'section'
            ? await silenceOfCell(house, row, tier, exception.openedAt, detail)
            : null,
        likelyChecks: exception?.likelyChecks ?? likelyChecks('shortfall', 'section'),
      };
    },

    async map(ctx, houseId, query) {
      const house = await findHouse(db, houseId);
      if (!house || !ctx.user.roles.has(house.farmId)) throw notFound('House');
      requireFarmPermission(ctx, house.farmId, 'farm.read', 'House');
      const window = productionWindow(
        query.window,
        new Date(),
        house,
        query.from && query.to ? { firstDay: query.from, lastDay: query.to } : undefined,
      );
      const map = await evaluation.buildMap(houseId, window);
      if (!map) throw notFound('House');
      return map;
    },
  };
}
