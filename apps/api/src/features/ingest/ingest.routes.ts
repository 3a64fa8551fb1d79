import { endpoints } from '@tierscope/contracts';
import type { Database } from '@tierscope/db';
import express, { type RequestHandler } from 'express';
import { AppError } from '../../platform/errors';
import { declareRoutes, route } from '../../platform/route';
import { hashGatewayKey, looksLikeGatewayKey } from '../../platform/gateway-keys';
import { findActiveGatewayByHash, touchGateway } from '../gateways/gateways.repository';
import type { GatewayContext, IngestService } from './ingest.service';

/** 10,000 readings with long counter ids and full ISO times fit well inside this. */
export const INGEST_BODY_LIMIT = '4mb';

declare module 'express-serve-static-core' {
  interface Request {
    gateway?: GatewayContext;
  }
}

/** Gateway keys only: a user's token cannot ingest, and a gateway key opens nothing else. */
function gatewayAuth(db: Database): RequestHandler {
  return async (req, _res, next) => {
    const header = req.headers.authorization ?? '';
    const token = header.startsWith('Bearer ') ? header.slice('Bearer '.length).trim() : '';
    if (!looksLikeGatewayKey(token)) {
      next(
        new AppError(
          'unauthenticated',
          'Send a gateway key as the bearer token; user sign-ins cannot ingest',
        ),
      );
      return;
    }
    const gateway = await findActiveGatewayByHash(db, hashGatewayKey(token));
    if (!gateway) {
      next(new AppError('unauthenticated', 'This gateway key is unknown or has been revoked'));
      return;
    }
    req.gateway = { gatewayId: gateway.id, farmId: gateway.farmId };
    // Best effort: a missed "last used" stamp must never fail an ingest.
    touchGateway(db, gateway.id).catch(() => undefined);
    next();
  };
}

export function ingestRoutes(
  db: Database,
  service: IngestService,
  info: (message: string) => void,
) {
  return declareRoutes('Ingest', [
    route({
      ...endpoints.ingest.readings,
      before: [gatewayAuth(db), express.json({ limit: INGEST_BODY_LIMIT })],
      handle: async ({ req, body }) => {
        const gateway = req.gateway;
        if (!gateway) throw new AppError('unauthenticated', 'Send a gateway key');
        const result = await service.ingest(gateway, body.readings);
        if (body.readings.length > 0) {
          info(
            `ingest: farm ${gateway.farmId} gateway ${gateway.gatewayId}: ${result.accepted} new, ${result.duplicates} duplicates, ${result.rejected.length} rejected`,
          );
        }
        return result;
      },
    }),
  ]);
}
