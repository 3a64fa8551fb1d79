import { z } from 'zod';
import { endpoint } from './endpoint';
import { idParam } from './primitives.schema';
import { userCreateSchema, userSchema, userUpdateSchema } from './user.schema';

export const usersEndpoints = {
  list: endpoint({
    method: 'get',
    path: '/users',
    summary: 'Users of the farms you administer',
    permission: 'users.manage',
    answer: z.array(userSchema),
  }),
  create: endpoint({
    method: 'post',
    path: '/users',
    summary: 'Create a user with farm roles',
    permission: 'users.manage',
    body: userCreateSchema,
    status: 201,
    answer: userSchema,
    errors: { 409: 'E-mail in use' },
  }),
  update: endpoint({
    method: 'patch',
    path: '/users/:userId',
    summary: "Rename, disable or change a user's roles",
    permission: 'users.manage',
    params: z.object({ userId: idParam }),
    body: userUpdateSchema,
    answer: userSchema,
  }),
};
