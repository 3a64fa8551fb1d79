import { idParam, userCreateSchema, userSchema, userUpdateSchema } from '@tierscope/contracts';
import { z } from 'zod';
import { contextOf } from '../../platform/auth';
import { declareRoutes, route } from '../../platform/route';
import type { UsersService } from './users.service';

export function usersRoutes(service: UsersService) {
  return declareRoutes('Users', [
    route({
      method: 'get',
      path: '/users',
      summary: 'Users of the farms you administer',
      answer: z.array(userSchema),
      handle: ({ req }) => service.list(contextOf(req)),
    }),
    route({
      method: 'post',
      path: '/users',
      summary: 'Create a user with farm roles',
      body: userCreateSchema,
      status: 201,
      answer: userSchema,
      errors: { 409: 'E-mail in use' },
      handle: ({ req, body }) => service.create(contextOf(req), body),
    }),
    route({
      method: 'patch',
      path: '/users/:userId',
      summary: "Rename, disable or change a user's roles",
      params: z.object({ userId: idParam }),
      body: userUpdateSchema,
      answer: userSchema,
      handle: ({ req, params, body }) => service.update(contextOf(req), params.userId, body),
    }),
  ]);
}
