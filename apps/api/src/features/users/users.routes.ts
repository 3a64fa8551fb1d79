import { endpoints } from '@tierscope/contracts';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { UsersService } from './users.service';

export function usersRoutes(service: UsersService) {
  return declareRoutes('Users', [
    route({
      ...endpoints.users.list,
      handle: ({ req }) => service.list(contextOf(req)),
    }),
    route({
      ...endpoints.users.create,
      handle: ({ req, body }) => service.create(contextOf(req), body),
    }),
    route({
      ...endpoints.users.update,
      handle: ({ req, params, body }) => service.update(contextOf(req), params.userId, body),
    }),
  ]);
}
