import type { Gateway, GatewayCreate, GatewayCreated } from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import { requireFarmPermission } from '../../platform/access';
import type { RequestContext } from '../../platform/auth';
import { notFound } from '../../platform/errors';
import { newGatewayKey } from '../../platform/gateway-keys';
import { recordAudit } from '../audit/audit.repository';
import {
  findGateway,
  insertGateway,
  listGateways,
  revokeGateway,
  type GatewayRow,
} from './gateways.repository';

export interface GatewaysService {
  list(ctx: RequestContext, farmId: number): Promise<Gateway[]>;
  create(ctx: RequestContext, farmId: number, input: GatewayCreate): Promise<GatewayCreated>;
  revoke(ctx: RequestContext, gatewayId: number): Promise<Gateway>;
}

export function createGatewaysService(db: Database): GatewaysService {
  return {
    async list(ctx, farmId) {
      requireFarmPermission(ctx, farmId, 'gateways.manage');
      return (await listGateways(db, farmId)).map(toGateway);
    },

    async create(ctx, farmId, input) {
      requireFarmPermission(ctx, farmId, 'gateways.manage');
      const { key, hash, prefix } = newGatewayKey();
      const row = await db.transaction(async (tx) => {
        const created = await insertGateway(tx, {
          farmId,
          name: input.name,
          keyHash: hash,
          keyPrefix: prefix,
          createdBy: ctx.user.id,
        });
        await recordAudit(tx, {
          farmId,
          actorUserId: ctx.user.id,
          action: 'gateway.create',
          entity: 'gateway',
          entityId: created.id,
          after: { name: created.name, keyPrefix: prefix },
        });
        return created;
      });
      return { ...toGateway(row), key };
    },

    async revoke(ctx, gatewayId) {
      const gateway = await findGateway(db, gatewayId);
      if (!gateway || !ctx.user.roles.has(gateway.farmId)) throw notFound('Gateway');
      requireFarmPermission(ctx, gateway.farmId, 'gateways.manage', 'Gateway');
      const revoked = await db.transaction(async (tx) => {
        const row = await revokeGateway(tx, gatewayId);
        if (!row) throw notFound('Gateway');
        await recordAudit(tx, {
          farmId: row.farmId,
          actorUserId: ctx.user.id,
          action: 'gateway.revoke',
          entity: 'gateway',
          entityId: row.id,
          before: { revokedAt: gateway.revokedAt },
          after: { revokedAt: row.revokedAt },
        });
        return row;
      });
      return toGateway(revoked);
    },
  };
}

function toGateway(row: GatewayRow): Gateway {
  return {
    id: row.id,
    farmId: row.farmId,
    name: row.name,
    keyPrefix: row.keyPrefix,
    createdAt: row.createdAt.toISOString(),
    revokedAt: row.revokedAt?.toISOString() ?? null,
    lastUsedAt: row.lastUsedAt?.toISOString() ?? null,
  };
}
